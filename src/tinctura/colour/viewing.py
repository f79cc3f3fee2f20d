"""Viewing conditions: how light reflected by the screen lowers the contrast a reader gets.

Ambient light of illuminance E (lux) falling on a screen of diffuse reflectance R adds the same
luminance R E / pi (cd/m2, a Lambertian surface: common practice) to text and background alike.
Relative to the display's white luminance Lw that is the flare

    F = R * E / (pi * Lw)

and a pair of relative luminances L1 >= L2 keeps the effective ratio (L1 + F) / (L2 + F).

WCAG 2's contrast ratio already adds 0.05 to both luminances: the WCAG 2 definition of contrast
ratio says that term stands for flare. Our judgement (not a standard's): the 0.05 is WCAG's
allowance for ordinary office viewing, whose reference is the sRGB viewing environment
(IEC 61966-2-1). A profile therefore adds what its light reflects *beyond* the office's:

    F_eff = 0.05 + (F_profile - F_office)

so the ``office`` profile gives exactly the WCAG 2 ratio, a darker room a little more, and
daylight less. For APCA (``apca.py``) the extra flare ``max(0, F_profile - F_office)`` is added
to both of APCA's luminances before its soft black clamp (APCA's own clamp stands for the
office-level flare; a dimmer room is not credited, since the clamp would absorb it).

The profiles are data (E, R, Lw); the values and why:

- ``office``: the sRGB reference viewing conditions (IEC 61966-2-1, values from memory):
  display white 80 cd/m2, ambient illuminance 64 lux, viewing flare 1 % of white. R is the
  reflectance that makes that ambient give that flare: 0.01 * pi * 80 / 64 = 0.0393.
- ``dim``: a dim room, 50 lux (common practice, from memory), the same display (80 cd/m2) with
  a matte anti-reflective finish, R = 0.02 (the upper end of the 0.5-2 % usually quoted).
- ``daylight``: a tablet read outdoors in overcast daylight or shade, 5,000 lux (the issue's
  "several thousand lux"; overcast daylight spans 1,000-10,000 lux, from memory), at a high
  brightness of 500 cd/m2 (tablets reach 400-1,000 cd/m2), R = 0.02. Our judgement: a middle
  case, not the worst (direct sun is about 100,000 lux and washes out almost any screen).

References
----------
- IEC 61966-2-1:1999, sRGB: reference viewing environment (values from memory).
- W3C, WCAG 2.2, definition of contrast ratio (the 0.05 flare term).
"""
from __future__ import annotations

import math
from dataclasses import dataclass

from . import apca, wcag

WCAG_FLARE = 0.05  # the term in WCAG 2's contrast ratio


@dataclass(frozen=True)
class Profile:
    """A viewing condition: ambient illuminance (lux), screen reflectance, white (cd/m2)."""

    name: str
    illuminance: float  # E, lux
    reflectance: float  # R, diffuse, 0..1
    white: float  # Lw, cd/m2
    about: str = ""

    @property
    def reflected(self) -> float:
        """Luminance the ambient light adds, cd/m2 (R E / pi)."""
        return self.reflectance * self.illuminance / math.pi

    @property
    def flare(self) -> float:
        """F = R E / (pi Lw), relative to the display's white."""
        return self.reflected / self.white


OFFICE = Profile("office", 64.0, 0.01 * math.pi * 80.0 / 64.0, 80.0,
                 "sRGB reference conditions (IEC 61966-2-1): 64 lux, 80 cd/m2, flare 1 %")
DIM = Profile("dim", 50.0, 0.02, 80.0, "a dim room: 50 lux, 80 cd/m2, matte screen")
DAYLIGHT = Profile("daylight", 5000.0, 0.02, 500.0,
                   "a tablet outdoors in shade: 5,000 lux, 500 cd/m2")

PROFILES = {p.name: p for p in (OFFICE, DIM, DAYLIGHT)}
DEFAULT_PROFILES = ("daylight",)


def get(name: str) -> Profile:
    try:
        return PROFILES[name.strip().lower()]
    except KeyError:
        raise ValueError(f"unknown viewing profile {name!r}; "
                         f"expected one of {', '.join(PROFILES)}") from None


def effective_flare(profile: Profile) -> float:
    """The term added to both relative luminances in the effective ratio (see the docstring)."""
    return WCAG_FLARE + profile.flare - OFFICE.flare


def lc_flare(profile: Profile) -> float:
    """The flare added to APCA's luminances: only what the profile adds beyond the office."""
    return max(0.0, profile.flare - OFFICE.flare)


def effective_ratio(rgb1, rgb2, profile: Profile) -> float:
    """(L1 + F) / (L2 + F) with F = :func:`effective_flare`; ``office`` gives the WCAG 2 ratio."""
    l1, l2 = wcag.relative_luminance(rgb1), wcag.relative_luminance(rgb2)
    if l1 < l2:
        l1, l2 = l2, l1
    f = effective_flare(profile)
    return (l1 + f) / (l2 + f)


def effective_lc(text, background, profile: Profile) -> float:
    """APCA Lc with the profile's extra flare on both luminances."""
    return apca.lightness_contrast(text, background, flare=lc_flare(profile))


def luminance_cd(rgb, profile: Profile) -> float:
    """The luminance (cd/m2) a reader gets from ``rgb`` in ``profile``: emitted plus reflected."""
    return wcag.relative_luminance(rgb) * profile.white + profile.reflected
