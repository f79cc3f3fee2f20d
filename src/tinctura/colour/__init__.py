"""Colour maths for tinctura: parsing CSS colours, conversions, compositing, WCAG 2 contrast
and suggestions of passing colours. Pure computation, no I/O."""
from .composite import flatten, over, with_alpha
from .convert import (
    SPACES,
    clip,
    convert_space,
    from_srgb,
    in_gamut,
    oklab_to_srgb,
    oklch_to_srgb,
    quantize,
    srgb_to_linear,
    linear_to_srgb,
    srgb_to_oklab,
    srgb_to_oklch,
    to_hex,
    to_hex8,
    to_srgb,
)
from .fix import (
    nearest_passing_background,
    nearest_passing_foreground,
    passing_foreground_for_all,
)
from .parse import CURRENTCOLOR, parse_color
from .system import system_colour
from .wcag import (
    NON_TEXT_RATIO,
    contrast_ratio,
    contrast_ratios,
    format_ratio,
    is_large_text,
    passes,
    relative_luminance,
    relative_luminances,
    required_ratio,
    truncate,
)

__all__ = [
    "CURRENTCOLOR", "NON_TEXT_RATIO", "SPACES", "clip", "contrast_ratio", "contrast_ratios",
    "convert_space", "flatten", "format_ratio", "from_srgb", "in_gamut", "is_large_text",
    "linear_to_srgb", "nearest_passing_background", "nearest_passing_foreground",
    "oklab_to_srgb", "oklch_to_srgb", "over", "parse_color", "passes",
    "passing_foreground_for_all", "quantize", "relative_luminance", "relative_luminances",
    "required_ratio", "srgb_to_linear", "srgb_to_oklab", "srgb_to_oklch", "system_colour",
    "to_hex", "to_hex8", "to_srgb", "truncate", "with_alpha",
]


def colour_science():
    """The colour-science package, imported on first use (about half a second and 70 MB: a
    run whose rules do not need it never pays them), its warnings about optional plotting
    packages silenced."""
    import warnings

    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        import colour
    return colour
