"""Conversions between the CSS colour spaces, with CIE XYZ (D65) as the hub.

Coordinates use the units tinycss2 gives them (CSS Color 4 reference ranges):
RGB spaces 0..1; ``xyz-d50``/``xyz-d65`` with Y = 1 for white; ``hsl`` and ``hwb`` hue in
degrees, other channels 0..100; ``lab``/``lch`` L 0..100; ``oklab``/``oklch`` L 0..1.

The matrices are derived at import from each space's published primaries and white point
(CSS Color 4 section 10 and the sample code of its "colour conversion" section; sRGB per
IEC 61966-2-1, Display P3, Adobe RGB (1998), ProPhoto RGB / ROMM, ITU-R BT.2020), and the
D50 <-> D65 step is the linear Bradford transform, as in CSS Color 4. OKLab uses Bjorn
Ottosson's published linear-sRGB -> LMS and LMS' -> Lab matrices; the XYZ -> LMS matrix is
derived from them so that white stays at a = b = 0 (CSS Color 4 re-derived it the same way).

Out-of-gamut values are kept unclipped through all the maths (transfer functions are
extended symmetrically to negative values, as CSS Color 4's sample code does). Only
:func:`clip` reduces a result to the displayable sRGB cube. CSS Color 4 asks for gamut
mapping (a chroma reduction in OKLCh); we clip channel-wise instead, as browsers still do
for most content: it is cheap and the difference only matters for colours that an sRGB
screen cannot show anyway.
"""
from __future__ import annotations

import math

# --- 3x3 helpers (pure Python: single colours are faster without numpy) -------------------


def _mat_vec(m, v):
    return (
        m[0][0] * v[0] + m[0][1] * v[1] + m[0][2] * v[2],
        m[1][0] * v[0] + m[1][1] * v[1] + m[1][2] * v[2],
        m[2][0] * v[0] + m[2][1] * v[1] + m[2][2] * v[2],
    )


def _mat_mul(a, b):
    return tuple(
        tuple(sum(a[i][k] * b[k][j] for k in range(3)) for j in range(3)) for i in range(3)
    )


def _mat_inv(m):
    (a, b, c), (d, e, f), (g, h, i) = m
    det = a * (e * i - f * h) - b * (d * i - f * g) + c * (d * h - e * g)
    return (
        ((e * i - f * h) / det, (c * h - b * i) / det, (b * f - c * e) / det),
        ((f * g - d * i) / det, (a * i - c * g) / det, (c * d - a * f) / det),
        ((d * h - e * g) / det, (b * g - a * h) / det, (a * e - b * d) / det),
    )


def _xy_to_xyz(x, y):
    return (x / y, 1.0, (1 - x - y) / y)


# White points as CSS Color 4 writes them (chromaticities to 4 decimals).
D50 = _xy_to_xyz(0.3457, 0.3585)
D65 = _xy_to_xyz(0.3127, 0.3290)


def _rgb_to_xyz_matrix(primaries, white):
    """Linear RGB -> XYZ from the xy chromaticities of the primaries and the white XYZ."""
    cols = [_xy_to_xyz(x, y) for x, y in primaries]
    p = tuple(tuple(cols[j][i] for j in range(3)) for i in range(3))
    s = _mat_vec(_mat_inv(p), white)
    return tuple(tuple(p[i][j] * s[j] for j in range(3)) for i in range(3))


def _bradford(src, dst):
    """Linear Bradford chromatic adaptation matrix from white ``src`` to white ``dst``."""
    mb = (
        (0.8951, 0.2664, -0.1614),
        (-0.7502, 1.7135, 0.0367),
        (0.0389, -0.0685, 1.0296),
    )
    rs, rd = _mat_vec(mb, src), _mat_vec(mb, dst)
    scale = tuple(tuple((rd[i] / rs[i]) if i == j else 0.0 for j in range(3)) for i in range(3))
    return _mat_mul(_mat_inv(mb), _mat_mul(scale, mb))


D50_TO_D65 = _bradford(D50, D65)
D65_TO_D50 = _bradford(D65, D50)

_SRGB_PRIMARIES = ((0.640, 0.330), (0.300, 0.600), (0.150, 0.060))
_P3_PRIMARIES = ((0.680, 0.320), (0.265, 0.690), (0.150, 0.060))
_A98_PRIMARIES = ((0.640, 0.330), (0.210, 0.710), (0.150, 0.060))
_PROPHOTO_PRIMARIES = ((0.734699, 0.265301), (0.159597, 0.840403), (0.036598, 0.000105))
_REC2020_PRIMARIES = ((0.708, 0.292), (0.170, 0.797), (0.131, 0.046))

LINEAR_SRGB_TO_XYZ = _rgb_to_xyz_matrix(_SRGB_PRIMARIES, D65)
XYZ_TO_LINEAR_SRGB = _mat_inv(LINEAR_SRGB_TO_XYZ)

# space -> (linear RGB -> XYZ-D65, XYZ-D65 -> linear RGB); ProPhoto is D50, so it is adapted.
_RGB_MATRICES = {}
for _name, _prim, _white in (
    ("srgb", _SRGB_PRIMARIES, D65),
    ("display-p3", _P3_PRIMARIES, D65),
    ("a98-rgb", _A98_PRIMARIES, D65),
    ("prophoto-rgb", _PROPHOTO_PRIMARIES, D50),
    ("rec2020", _REC2020_PRIMARIES, D65),
):
    _m = _rgb_to_xyz_matrix(_prim, _white)
    if _white is D50:
        _m = _mat_mul(D50_TO_D65, _m)
    _RGB_MATRICES[_name] = (_m, _mat_inv(_m))
_RGB_MATRICES["srgb-linear"] = _RGB_MATRICES["srgb"]

# OKLab (Ottosson 2020): linear sRGB -> LMS and cube-rooted LMS -> Lab.
_LSRGB_TO_LMS = (
    (0.4122214708, 0.5363325363, 0.0514459929),
    (0.2119034982, 0.6806995451, 0.1073969566),
    (0.0883024619, 0.2817188376, 0.6299787005),
)
_LMS_TO_OKLAB = (
    (0.2104542553, 0.7936177850, -0.0040720468),
    (1.9779984951, -2.4285922050, 0.4505937099),
    (0.0259040371, 0.7827717662, -0.8086757660),
)
_OKLAB_TO_LMS = _mat_inv(_LMS_TO_OKLAB)
_LMS_TO_LSRGB = _mat_inv(_LSRGB_TO_LMS)
_XYZ_TO_LMS = _mat_mul(_LSRGB_TO_LMS, XYZ_TO_LINEAR_SRGB)
_LMS_TO_XYZ = _mat_inv(_XYZ_TO_LMS)

# --- transfer functions (extended to negative values by symmetry) ---------------------------


def srgb_to_linear_channel(c: float) -> float:
    a = abs(c)
    if a <= 0.04045:
        return c / 12.92
    return math.copysign(((a + 0.055) / 1.055) ** 2.4, c)


def linear_to_srgb_channel(c: float) -> float:
    a = abs(c)
    if a <= 0.0031308:
        return c * 12.92
    return math.copysign(1.055 * a ** (1 / 2.4) - 0.055, c)


def srgb_to_linear(rgb):
    return tuple(srgb_to_linear_channel(c) for c in rgb[:3])


def linear_to_srgb(rgb):
    return tuple(linear_to_srgb_channel(c) for c in rgb[:3])


def _a98_decode(c):
    return math.copysign(abs(c) ** (563 / 256), c)


def _a98_encode(c):
    return math.copysign(abs(c) ** (256 / 563), c)


_PROPHOTO_ET2 = 16 / 512  # encoded threshold of the linear segment (ROMM RGB)


def _prophoto_decode(c):
    a = abs(c)
    return c / 16 if a <= _PROPHOTO_ET2 else math.copysign(a ** 1.8, c)


def _prophoto_encode(c):
    a = abs(c)
    return c * 16 if a < 1 / 512 else math.copysign(a ** (1 / 1.8), c)


_R2020_ALPHA = 1.09929682680944
_R2020_BETA = 0.018053968510807


def _rec2020_decode(c):
    a = abs(c)
    if a < _R2020_BETA * 4.5:
        return c / 4.5
    return math.copysign(((a + _R2020_ALPHA - 1) / _R2020_ALPHA) ** (1 / 0.45), c)


def _rec2020_encode(c):
    a = abs(c)
    if a < _R2020_BETA:
        return c * 4.5
    return math.copysign(_R2020_ALPHA * a**0.45 - (_R2020_ALPHA - 1), c)


def _identity(c):
    return c


_TRANSFER = {  # space -> (decode to linear, encode from linear)
    "srgb": (srgb_to_linear_channel, linear_to_srgb_channel),
    "display-p3": (srgb_to_linear_channel, linear_to_srgb_channel),
    "srgb-linear": (_identity, _identity),
    "a98-rgb": (_a98_decode, _a98_encode),
    "prophoto-rgb": (_prophoto_decode, _prophoto_encode),
    "rec2020": (_rec2020_decode, _rec2020_encode),
}

# --- cylindrical and CIE spaces --------------------------------------------------------------

_KAPPA = 24389 / 27
_EPSILON = 216 / 24389


def xyz_d50_to_lab(xyz):
    f = []
    for v, w in zip(xyz, D50):
        t = v / w
        f.append(math.copysign(abs(t) ** (1 / 3), t) if t > _EPSILON else (_KAPPA * t + 16) / 116)
    return (116 * f[1] - 16, 500 * (f[0] - f[1]), 200 * (f[1] - f[2]))


def lab_to_xyz_d50(lab):
    L, a, b = lab
    f1 = (L + 16) / 116
    f0 = a / 500 + f1
    f2 = f1 - b / 200
    x = f0**3 if f0**3 > _EPSILON else (116 * f0 - 16) / _KAPPA
    y = f1**3 if L > _KAPPA * _EPSILON else L / _KAPPA
    z = f2**3 if f2**3 > _EPSILON else (116 * f2 - 16) / _KAPPA
    return (x * D50[0], y * D50[1], z * D50[2])


def xyz_d65_to_oklab(xyz):
    lms = _mat_vec(_XYZ_TO_LMS, xyz)
    return _mat_vec(_LMS_TO_OKLAB, tuple(math.copysign(abs(v) ** (1 / 3), v) for v in lms))


def oklab_to_xyz_d65(lab):
    lms = _mat_vec(_OKLAB_TO_LMS, lab)
    return _mat_vec(_LMS_TO_XYZ, tuple(v**3 for v in lms))


def linear_srgb_to_oklab(rgb):
    lms = _mat_vec(_LSRGB_TO_LMS, rgb)
    return _mat_vec(_LMS_TO_OKLAB, tuple(math.copysign(abs(v) ** (1 / 3), v) for v in lms))


def oklab_to_linear_srgb(lab):
    lms = _mat_vec(_OKLAB_TO_LMS, lab)
    return _mat_vec(_LMS_TO_LSRGB, tuple(v**3 for v in lms))


def to_polar(lab):
    """(L, a, b) -> (L, C, h) with h in degrees 0..360."""
    L, a, b = lab
    return (L, math.hypot(a, b), math.degrees(math.atan2(b, a)) % 360)


def from_polar(lch):
    L, C, h = lch
    r = math.radians(h)
    return (L, C * math.cos(r), C * math.sin(r))


def hsl_to_srgb(hsl):
    """CSS Color 4 hslToRgb; s and l in 0..100."""
    h, s, l = hsl[0] % 360, hsl[1] / 100, hsl[2] / 100
    a = s * min(l, 1 - l)

    def f(n):
        k = (n + h / 30) % 12
        return l - a * max(-1, min(k - 3, 9 - k, 1))

    return (f(0), f(8), f(4))


def srgb_to_hsl(rgb):
    """CSS Color 4 rgbToHsl (hue 0 for achromatic colours)."""
    r, g, b = rgb[:3]
    mx, mn = max(r, g, b), min(r, g, b)
    h, s, l = 0.0, 0.0, (mn + mx) / 2
    d = mx - mn
    if d != 0:
        s = 0.0 if l in (0, 1) else (mx - l) / min(l, 1 - l)
        if mx == r:
            h = (g - b) / d + (6 if g < b else 0)
        elif mx == g:
            h = (b - r) / d + 2
        else:
            h = (r - g) / d + 4
        h *= 60
    if s < 0:  # out-of-gamut input can give a negative saturation: flip the hue instead
        h += 180
        s = abs(s)
    return (h % 360, s * 100, l * 100)


def hwb_to_srgb(hwb):
    h, w, b = hwb[0], hwb[1] / 100, hwb[2] / 100
    if w + b >= 1:
        grey = w / (w + b)
        return (grey, grey, grey)
    return tuple(c * (1 - w - b) + w for c in hsl_to_srgb((h, 100, 50)))


def srgb_to_hwb(rgb):
    h = srgb_to_hsl(rgb)[0]
    w, b = min(rgb[:3]), 1 - max(rgb[:3])
    return (h, w * 100, b * 100)


# --- the hub ---------------------------------------------------------------------------------

RGB_SPACES = frozenset(_TRANSFER)
POLAR_SPACES = frozenset({"hsl", "hwb", "lch", "oklch"})
SPACES = RGB_SPACES | POLAR_SPACES | {"lab", "oklab", "xyz", "xyz-d50", "xyz-d65"}


def to_xyz_d65(space: str, coords) -> tuple:
    """Coordinates in ``space`` -> CIE XYZ relative to D65 (Y = 1 for white)."""
    if space in _TRANSFER:
        decode = _TRANSFER[space][0]
        return _mat_vec(_RGB_MATRICES[space][0], tuple(decode(c) for c in coords))
    if space in ("xyz-d65", "xyz"):
        return tuple(coords)
    if space == "xyz-d50":
        return _mat_vec(D50_TO_D65, coords)
    if space == "lab":
        return _mat_vec(D50_TO_D65, lab_to_xyz_d50(coords))
    if space == "lch":
        return _mat_vec(D50_TO_D65, lab_to_xyz_d50(from_polar(coords)))
    if space == "oklab":
        return oklab_to_xyz_d65(coords)
    if space == "oklch":
        return oklab_to_xyz_d65(from_polar(coords))
    if space == "hsl":
        return to_xyz_d65("srgb", hsl_to_srgb(coords))
    if space == "hwb":
        return to_xyz_d65("srgb", hwb_to_srgb(coords))
    raise ValueError(f"unknown colour space {space!r}")


def from_xyz_d65(space: str, xyz) -> tuple:
    """CIE XYZ (D65) -> coordinates in ``space``."""
    if space in _TRANSFER:
        encode = _TRANSFER[space][1]
        return tuple(encode(c) for c in _mat_vec(_RGB_MATRICES[space][1], xyz))
    if space in ("xyz-d65", "xyz"):
        return tuple(xyz)
    if space == "xyz-d50":
        return _mat_vec(D65_TO_D50, xyz)
    if space == "lab":
        return xyz_d50_to_lab(_mat_vec(D65_TO_D50, xyz))
    if space == "lch":
        return to_polar(xyz_d50_to_lab(_mat_vec(D65_TO_D50, xyz)))
    if space == "oklab":
        return xyz_d65_to_oklab(xyz)
    if space == "oklch":
        return to_polar(xyz_d65_to_oklab(xyz))
    if space == "hsl":
        return srgb_to_hsl(from_xyz_d65("srgb", xyz))
    if space == "hwb":
        return srgb_to_hwb(from_xyz_d65("srgb", xyz))
    raise ValueError(f"unknown colour space {space!r}")


def to_srgb(space: str, coords) -> tuple:
    """Coordinates in ``space`` -> sRGB-encoded (r, g, b), unclipped.

    Short paths avoid XYZ where the result is the same (and exact).
    """
    if space == "srgb":
        return tuple(coords)
    if space == "hsl":
        return hsl_to_srgb(coords)
    if space == "hwb":
        return hwb_to_srgb(coords)
    if space == "srgb-linear":
        return linear_to_srgb(coords)
    if space == "oklab":
        return linear_to_srgb(oklab_to_linear_srgb(coords))
    if space == "oklch":
        return linear_to_srgb(oklab_to_linear_srgb(from_polar(coords)))
    return from_xyz_d65("srgb", to_xyz_d65(space, coords))


def from_srgb(space: str, rgb) -> tuple:
    """sRGB-encoded (r, g, b) -> coordinates in ``space``."""
    rgb = tuple(rgb[:3])
    if space == "srgb":
        return rgb
    if space == "hsl":
        return srgb_to_hsl(rgb)
    if space == "hwb":
        return srgb_to_hwb(rgb)
    if space == "srgb-linear":
        return srgb_to_linear(rgb)
    if space == "oklab":
        return linear_srgb_to_oklab(srgb_to_linear(rgb))
    if space == "oklch":
        return to_polar(linear_srgb_to_oklab(srgb_to_linear(rgb)))
    return from_xyz_d65(space, to_xyz_d65("srgb", rgb))


def convert_space(coords, source: str, target: str) -> tuple:
    """Convert coordinates between any two of :data:`SPACES` (unclipped)."""
    if source == target:
        return tuple(coords)
    if target == "srgb":
        return to_srgb(source, coords)
    if source == "srgb":
        return from_srgb(target, coords)
    return from_xyz_d65(target, to_xyz_d65(source, coords))


def srgb_to_oklab(rgb) -> tuple:
    return linear_srgb_to_oklab(srgb_to_linear(rgb))


def oklab_to_srgb(lab) -> tuple:
    return linear_to_srgb(oklab_to_linear_srgb(lab))


def srgb_to_oklch(rgb) -> tuple:
    return to_polar(srgb_to_oklab(rgb))


def oklch_to_srgb(lch) -> tuple:
    return oklab_to_srgb(from_polar(lch))


# --- display ---------------------------------------------------------------------------------


def clip(rgb) -> tuple:
    """Clip each channel (and alpha, if present) to 0..1: our stand-in for gamut mapping."""
    return tuple(0.0 if c < 0 else 1.0 if c > 1 else float(c) for c in rgb)


def in_gamut(rgb, tolerance: float = 1e-6) -> bool:
    return all(-tolerance <= c <= 1 + tolerance for c in rgb[:3])


def to_8bit(c: float) -> int:
    """0..1 -> 0..255: clip, then round half up on value * 255."""
    c = 0.0 if c < 0 else 1.0 if c > 1 else c
    return int(math.floor(c * 255 + 0.5))


def to_hex(rgb) -> str:
    """(r, g, b[, a]) -> ``#rrggbb`` (alpha ignored)."""
    return "#%02x%02x%02x" % tuple(to_8bit(c) for c in rgb[:3])


def to_hex8(rgba) -> str:
    """``#rrggbbaa`` when alpha < 1, else ``#rrggbb``."""
    if len(rgba) < 4 or to_8bit(rgba[3]) == 255:
        return to_hex(rgba)
    return to_hex(rgba) + "%02x" % to_8bit(rgba[3])


def quantize(rgb) -> tuple:
    """The colour an ``#rrggbb`` rendering of ``rgb`` stands for: channels k / 255."""
    return tuple(to_8bit(c) / 255 for c in rgb[:3])
