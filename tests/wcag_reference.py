"""The WCAG 2.2 formulas written out once for the tests, as the standard states them.

Source: W3C, WCAG 2.2 Recommendation, definitions of "relative luminance" (sRGB channels
linearised with the 0.04045 threshold; 0.2126 R + 0.7152 G + 0.0722 B) and "contrast ratio"
((L1 + 0.05) / (L2 + 0.05), lighter over darker). Kept apart from tinctura.colour so the tests
do not check the code against itself.
"""


def _lin(c):
    return c / 12.92 if c <= 0.04045 else ((c + 0.055) / 1.055) ** 2.4


def luminance(rgb):
    """Relative luminance of an sRGB colour given as floats 0..1 or '#rrggbb'."""
    if isinstance(rgb, str):
        rgb = tuple(int(rgb[i:i + 2], 16) / 255 for i in (1, 3, 5))
    return 0.2126 * _lin(rgb[0]) + 0.7152 * _lin(rgb[1]) + 0.0722 * _lin(rgb[2])


def ratio(a, b):
    """Contrast ratio of two colours, lighter over darker."""
    la, lb = sorted((luminance(a), luminance(b)))
    return (lb + 0.05) / (la + 0.05)
