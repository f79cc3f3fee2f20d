"""What the colour-appearance rules share (TC200 text-lc, TC400 cvd-ratio, TC500 glare-ratio).

- ``tier``: which APCA readability level a text's size, weight and kind call for.
- ``Requirement``: a rule's pass test, as a hashable record: what a suggested colour must meet
  (this rule and TC100 at once); findings carry it so a fix at the cause can be searched later.
- ``simulate_all``, ``simulated``: CVD simulation, each distinct colour of a run once (cached).
- ``Verdicts``: a bounded cache of verdicts per colour situation (a site repeats a few dozen).

Pure: no I/O. Neither numpy nor colour-science is imported to simulate a deficiency at the
default severity (1, dichromacy); colour-science is, through ``colour.cvd``, at any other.
"""
from __future__ import annotations

from dataclasses import dataclass

from tinctura.colour import apca, viewing, wcag
from tinctura.colour import fix as colour_fix
from tinctura.model import Finding, Fix

# APCA readability levels by use (the published APCA guidance, "bronze" simple mode, values
# from memory: shared reference values). Configurable: Options.lc_levels.
BODY, CONTENT, HEADLINE, ANY = "body", "content", "headline", "any"
DEFAULT_LC_LEVELS = {BODY: 75.0, CONTENT: 60.0, HEADLINE: 45.0, ANY: 30.0}
TIER_TEXT = {
    BODY: "body text (under 24 px, or under 16 px bold)",
    CONTENT: "other content text (24 px, or 16 px bold, and up)",
    HEADLINE: "a large headline (36 px, or 24 px bold, and up)",
    ANY: "placeholder text",
}
BOLD = 700  # as WCAG's large-text rule (wcag.BOLD_WEIGHT)


def tier(size_px: float, weight: int, kind: str = "text") -> str:
    """The APCA level a text calls for. Our mapping of APCA's guidance: 36 px, or 24 px at
    weight 700 and up, is a headline (Lc 45); 24 px, or 16 px bold, other content text (Lc 60);
    anything smaller body text (Lc 75); placeholders, which APCA lists with "any readable
    text", Lc 30. (Disabled controls are exempt before any rule runs.)"""
    if kind == "placeholder":
        return ANY
    bold = weight >= BOLD
    if size_px >= 36 - 1e-6 or (bold and size_px >= 24 - 1e-6):
        return HEADLINE
    if size_px >= 24 - 1e-6 or (bold and size_px >= 16 - 1e-6):
        return CONTENT
    return BODY


def lc_levels(options) -> dict:
    """The Lc level per tier: the defaults, overridden by ``options.lc_levels``."""
    levels = dict(DEFAULT_LC_LEVELS)
    levels.update({k: float(v) for k, v in (getattr(options, "lc_levels", None) or {}).items()})
    return levels


def check_lc_levels(levels) -> dict:
    """Validate a ``lc_levels`` setting: known tiers, numbers 0..110; ValueError otherwise."""
    out = {}
    for name, value in dict(levels or {}).items():
        if name not in DEFAULT_LC_LEVELS:
            raise ValueError(f"unknown text tier {name!r} in lc_levels; "
                             f"expected {', '.join(DEFAULT_LC_LEVELS)}")
        value = float(value)
        if not 0 <= value <= 110:
            raise ValueError(f"lc_levels {name}: Lc must lie in 0..110, got {value:g}")
        out[name] = value
    return out


# -- colour-vision deficiency, batched ---------------------------------------------------------

_SIMULATED: dict = {}  # (deficiency, severity) -> {rgb: simulated rgb}
_SIMULATED_LIMIT = 20000


def simulate_all(colours, deficiencies, severity: float) -> None:
    """Simulate the colours not simulated yet, the distinct colours of a run at once (in plain
    Python: see ``colour.cvd`` for why not in numpy)."""
    from tinctura.colour import cvd  # colour-science only at a severity other than 1

    colours = [tuple(float(c) for c in rgb[:3]) for rgb in colours]
    for deficiency in deficiencies:
        table = _SIMULATED.setdefault((deficiency, severity), {})
        missing = [c for c in colours if c not in table]
        if not missing:
            continue
        if len(table) + len(missing) > _SIMULATED_LIMIT:
            table.clear()
        m = cvd.rows(deficiency, severity)
        table.update((c, cvd.simulate_with(m, c)) for c in missing)


def simulated(rgb, deficiency: str, severity: float) -> tuple:
    """The colour a reader with ``deficiency`` sees (cached)."""
    rgb = tuple(float(c) for c in rgb[:3])
    table = _SIMULATED.setdefault((deficiency, severity), {})
    found = table.get(rgb)
    if found is None:
        from tinctura.colour import cvd

        if len(table) >= _SIMULATED_LIMIT:
            table.clear()
        found = table[rgb] = cvd.simulate_one(rgb, deficiency, severity)
    return found


# -- the pass test every suggestion meets -------------------------------------------------------


@dataclass(frozen=True)
class Requirement:
    """What text must meet: TC100's ratio always; with ``lc`` TC200's |Lc|; with
    ``deficiencies`` TC400 (ratio kept under each, and |Lc| kept when it reached ``cvd_lc``);
    with ``profiles`` TC500 (the effective ratio in each). Called as ``test(text, background)``."""

    ratio: float
    lc: float = 0.0
    deficiencies: tuple = ()
    severity: float = 1.0
    cvd_lc: float = 0.0
    profiles: tuple = ()

    def __call__(self, text, background) -> bool:
        if wcag.contrast_ratio(text, background) < self.ratio:
            return False
        lc = abs(apca.lightness_contrast(text, background)) if (self.lc or self.cvd_lc) else 0
        if self.lc and lc < self.lc:
            return False
        for deficiency in self.deficiencies:
            sim_text = simulated(text, deficiency, self.severity)
            sim_bg = simulated(background, deficiency, self.severity)
            if wcag.contrast_ratio(sim_text, sim_bg) < self.ratio:
                return False
            if self.cvd_lc and lc >= self.cvd_lc and \
                    abs(apca.lightness_contrast(sim_text, sim_bg)) < self.cvd_lc:
                return False
        return all(viewing.effective_ratio(text, background, viewing.get(name)) >= self.ratio
                   for name in self.profiles)


def fixes_for(requirement: Requirement, pairs, fg, bg) -> list:
    """The nearest foreground passing ``requirement`` on every background, and the nearest
    background for the worst pair; each with its WCAG 2 ratio (what TC100 reports)."""
    out = []
    found = colour_fix.nearest_foreground_where(fg, [b for _, b in pairs], requirement)
    if found is not None:
        out.append(Fix("foreground", tuple(found[0]), found[1]))
    found = colour_fix.nearest_background_where(fg, bg, requirement)
    if found is not None:
        out.append(Fix("background", tuple(found[0]), found[1]))
    return out


class Verdicts:
    """Verdicts per colour situation, bounded; a rule is pure, so this only saves time."""

    LIMIT = 20000

    def __init__(self):
        self._seen: dict = {}

    def known(self, key) -> bool:
        return key in self._seen

    def get(self, key, compute):
        try:
            return self._seen[key]
        except KeyError:
            if len(self._seen) >= self.LIMIT:
                self._seen.clear()
            value = self._seen[key] = compute()
            return value


def verdict(ratio, required, args, requirement, pairs, stop, large) -> tuple:
    """A failing situation's verdict ``(ratio, required, args, fixes)``: the rule's own
    ``args`` plus what every appearance finding carries (the pair judged, which background,
    the pass test) and the suggested colours."""
    fg, bg = pairs[stop]
    args.update(large=large, fg=fg, bg=bg, stop=stop, stops=len(pairs), test=requirement)
    return ratio, required, args, fixes_for(requirement, pairs, fg, bg)


def finding(rule, sample, verdict, level: str) -> Finding:
    """A finding from a shared verdict ``(ratio, required, args, fixes)``. The args and fixes
    are shared by every finding of the situation, as replayed findings share them (read
    only): a site repeats one situation thousands of times, and the page store pickles a
    shared object once."""
    ratio, required, args, fixes = verdict
    return Finding(rule=rule.code, slug=rule.slug, severity=rule.severity, sample=sample,
                   ratio=ratio, required=required, level=level, fixes=fixes, args=args)
