"""Colour appearance in context (family ``appearance``): site-level rules over palette uses.

TC300 surround-shift: one palette colour looks different in its contexts (immediate background,
scheme). TC310 lookalike: two palette colours that mean different things look alike, for normal
vision or under a simulated colour-vision deficiency (Machado 2009).

These rules do not judge one sample: they take the palette uses of the whole site
(``tinctura.palette``, merged by the engine) and run once, at the end. Each distinct (colour,
background) pair is modelled once, in one batched CIECAM02 call per run, and compared in
CAM02-UCS. Pure: uses in, findings out.
"""
from __future__ import annotations

from typing import TYPE_CHECKING

from tinctura import palette as palette_mod
from tinctura.model import REST, Finding, Sample

from .catalogue import LOOKALIKE, SURROUND_SHIFT

if TYPE_CHECKING:  # numpy is imported on use, as colour-science is: most runs model nothing
    import numpy as np

CONDITIONS = ("normal vision", "protanopia", "deuteranopia", "tritanopia")
CONTEXTS_PER_COLOUR = 32  # the most frequent contexts of one colour that are compared
ALIAS = 0.5  # dE' below this in normal vision: the same colour under two names, not a collapse
TERM = 2.0  # dE' units a component must change by to be named in the explanation


def check_surround_shift(samples, options) -> list:
    """TC300 over ``samples`` taken as a whole site (tests, documentation examples)."""
    return check_site(_uses(samples, options), options, only=SURROUND_SHIFT.code)


def check_lookalike(samples, options) -> list:
    """TC310 over ``samples`` taken as a whole site."""
    return check_site(_uses(samples, options), options, only=LOOKALIKE.code)


def _uses(samples, options) -> dict:
    return palette_mod.collect(samples, getattr(options, "palette", ()) or ())


def check_site(uses: dict, options, only: str | None = None) -> list:
    """TC300 and TC310 (those selected) over a site's merged palette uses."""
    from . import selected

    codes = {r.code for r in selected(getattr(options, "rules", ()) or ())}
    wanted = {SURROUND_SHIFT.code, LOOKALIKE.code} & codes
    if only is not None:
        wanted = {only}
    groups = _groups(palette_mod.retained(uses)) if wanted else {}
    shifting = {key: cs for key, cs in groups.items()
                if len({(c["bg"], c["colour"]) for c in cs}) >= 2} \
        if SURROUND_SHIFT.code in wanted else {}
    pairs = _pairs(groups) if LOOKALIKE.code in wanted else []
    if not shifting and not pairs:  # nothing to compare: colour-science is not even imported
        return []
    involved = dict(shifting)
    involved.update((key, groups[key]) for pair in pairs for key in pair)
    model = _Model(involved, options, cvd=bool(pairs))
    return _shifts(shifting, model, options) + _lookalikes(pairs, groups, model, options)


def _pairs(groups) -> list:
    """Pairs of colours that could be confused: two entries of one family, in the same role
    (two text colours, or two fills), shown in at least one common scheme."""
    keys = sorted(groups, key=lambda k: (k[0].family, k[0].name, k[1], k[2]))
    out = []
    for n, a in enumerate(keys):
        schemes = {c["scheme"] for c in groups[a]}
        for b in keys[n + 1:]:
            if (a[0].family == b[0].family and a[0].name != b[0].name and a[1] == b[1]
                    and schemes & {c["scheme"] for c in groups[b]}):
                out.append((a, b))
    return out


def _groups(uses: dict) -> dict:
    """(entry, role, colour's declaration) -> its contexts, most frequent first."""
    from tinctura.problems import cause_key

    groups: dict = {}
    for (entry, role, colour, bg, scheme), use in uses.items():
        key = (entry, role, cause_key(use.cause))
        groups.setdefault(key, []).append(
            {"colour": colour, "bg": bg, "scheme": scheme, "count": use.count,
             "where": list(use.where), "cause": use.cause, "role": role})
    for contexts in groups.values():
        # (the colour last: ties do not fall to the order uses were first met in, which
        # depends on the pages each process walked)
        contexts.sort(key=lambda c: (-c["count"], c["scheme"], c["bg"], c["colour"]))
        del contexts[CONTEXTS_PER_COLOUR:]
    return groups


class _Model:
    """CAM02-UCS J'a'b' (and J, M, h) of every distinct (colour, background) pair, for normal
    vision and, when asked, each simulated deficiency: one CIECAM02 call."""

    def __init__(self, groups, options, cvd: bool):
        import numpy as np

        from tinctura.colour import cam02ucs, ciecam02

        pairs = sorted({(c["colour"], c["bg"]) for cs in groups.values() for c in cs})
        self.index = {pair: n for n, pair in enumerate(pairs)}
        colours = np.array([p[0] for p in pairs], dtype=float)
        bgs = np.array([p[1] for p in pairs], dtype=float)
        conditions = CONDITIONS if cvd else CONDITIONS[:1]
        fg_all, bg_all = [colours], [bgs]
        if cvd:
            from tinctura.colour import cvd as cvd_mod

            for deficiency in conditions[1:]:
                fg_all.append(cvd_mod.simulate(colours, deficiency))
                bg_all.append(cvd_mod.simulate(bgs, deficiency))
        spec = ciecam02.appearance(np.concatenate(fg_all), np.concatenate(bg_all),
                                   viewing_conditions(options))
        n = len(pairs)
        jab = cam02ucs.jab(spec.J, spec.M, spec.h)
        self.jab = {c: jab[k * n:(k + 1) * n] for k, c in enumerate(conditions)}
        self.jmh = np.stack([spec.J[:n], spec.M[:n], spec.h[:n]], axis=-1)

    def of(self, contexts, condition: str = CONDITIONS[0]) -> np.ndarray:
        rows = [self.index[(c["colour"], c["bg"])] for c in contexts]
        return self.jab[condition][rows]


def viewing_conditions(options):
    from tinctura.colour.ciecam02 import ViewingConditions

    return ViewingConditions(
        white_luminance=getattr(options, "white_luminance", 80.0) or 80.0,
        surround=getattr(options, "surround", "Average") or "Average")


def _shifts(groups, model, options) -> list:
    import numpy as np

    from tinctura.colour.cam02ucs import delta_e

    threshold = float(getattr(options, "shift_threshold", SHIFT_THRESHOLD))
    findings = []
    for (entry, role, _), contexts in groups.items():
        jab = model.of(contexts)
        d = delta_e(jab[:, None, :], jab[None, :, :])
        i, j = np.unravel_index(int(np.argmax(d)), d.shape)
        if d[i, j] <= threshold:
            continue
        # explained from the lighter background to the darker one
        if _luminance(contexts[i]["bg"]) < _luminance(contexts[j]["bg"]):
            i, j = j, i
        words = opponent_terms(jab[i], jab[j], model.jmh[[model.index[(c["colour"], c["bg"])]
                                                           for c in (contexts[i], contexts[j])]])
        findings.append(_finding(SURROUND_SHIFT, contexts[j], contexts[i], {
            "entry": entry.name, "source": entry.source, "role": role,
            "delta": float(d[i, j]), "threshold": threshold, "terms": ", ".join(words) or
            "different", "from_bg": contexts[i]["bg"], "to_bg": contexts[j]["bg"],
            "contexts": _contexts(contexts, model)}))
    return findings


def opponent_terms(first, second, jmh) -> list:
    """How ``second`` looks compared with ``first`` (J'a'b'), in opponent words."""
    import numpy as np

    dj, da, db = (float(x) for x in np.asarray(second) - np.asarray(first))
    dm = float(jmh[1][1] - jmh[0][1])
    words = []
    for value, plus, minus in ((dj, "lighter", "darker"), (da, "redder", "greener"),
                               (db, "yellower", "bluer")):
        if abs(value) >= TERM:
            words.append(plus if value > 0 else minus)
    if abs(dm) >= TERM:
        words.append("more colourful" if dm > 0 else "less colourful")
    return words


def _lookalikes(pairs, groups, model, options) -> list:
    from tinctura.colour.cam02ucs import delta_e

    threshold = float(getattr(options, "lookalike_threshold", LOOKALIKE_THRESHOLD))
    findings = []
    for a, b in pairs:
        found = _collapse(groups[a], groups[b], model, delta_e, threshold)
        if not found:
            continue
        worst = min(found, key=lambda f: f["delta"])
        ca, cb = groups[a][worst["a"]], groups[b][worst["b"]]
        findings.append(_finding(LOOKALIKE, ca, cb, {
            "entry": a[0].name, "other": b[0].name, "delta": worst["delta"],
            "threshold": threshold, "condition": worst["condition"],
            "conditions": ", ".join(f["condition"] for f in found),
            "other_colour": cb["colour"], "collapses": tuple(found),
            "contexts": _contexts(groups[a], model),
            "other_contexts": _contexts(groups[b], model)},
            other_cause=cb["cause"]))
    return findings


def _collapse(first, second, model, delta_e, threshold) -> list:
    """Per condition, the closest pair of contexts in one scheme when below ``threshold``;
    nothing when the two are the same colour (an alias) for normal vision."""
    import numpy as np

    same = np.array([[ca["scheme"] == cb["scheme"] for cb in second] for ca in first])
    if not same.any():
        return []
    found = []
    for condition in model.jab:
        d = delta_e(model.of(first, condition)[:, None, :],
                    model.of(second, condition)[None, :, :])
        d = np.where(same, d, np.inf)
        i, j = np.unravel_index(int(np.argmin(d)), d.shape)
        if condition == CONDITIONS[0] and d[i, j] < ALIAS:
            return []
        if d[i, j] < threshold:
            found.append({"condition": condition, "delta": float(d[i, j]), "a": int(i),
                          "b": int(j), "scheme": first[i]["scheme"]})
    return found


def _contexts(contexts, model) -> tuple:
    """Contexts for the report, each (role, colour, background) once: the schemes in which it
    occurs are listed together (the appearance does not depend on the scheme's name)."""
    merged: dict = {}
    for c in contexts:
        key = (c["role"], c["colour"], c["bg"])
        got = merged.get(key)
        if got is None:
            J, M, h = (float(x) for x in model.jmh[model.index[(c["colour"], c["bg"])]])
            d = _declaration(c["cause"])
            merged[key] = {"role": c["role"], "colour": c["colour"], "bg": c["bg"],
                           "schemes": [c["scheme"]], "count": c["count"],
                           "where": list(c["where"]), "J": J, "M": M, "h": h,
                           "declaration": d.where() if d is not None else ""}
            continue
        got["schemes"].append(c["scheme"])
        got["count"] += c["count"]
        got["where"] += [w for w in c["where"] if w not in got["where"]]
        del got["where"][palette_mod.EXAMPLES:]
    out = []
    for c in merged.values():
        c["schemes"], c["where"] = tuple(sorted(set(c["schemes"]))), tuple(c["where"])
        out.append(c)
    return tuple(out)


def _declaration(cause):
    from tinctura.problems import target_declaration

    return target_declaration(cause)


def _finding(rule, context, other, args, other_cause=None) -> Finding:
    from tinctura.colour.wcag import contrast_ratio

    page, line, xpath, text = context["where"][0]
    sample = Sample(page=page, scheme=context["scheme"], state=REST, xpath=xpath, line=line,
                    text=text, kind="text", fg=context["colour"], bg=context["bg"],
                    fg_raw=tuple(context["colour"]) + (1.0,), font_size_px=16.0, font_weight=400,
                    fg_cause=context["cause"], bg_cause=other_cause)
    ratio = max(1.0, contrast_ratio(context["colour"], context["bg"]))
    return Finding(rule=rule.code, slug=rule.slug, severity=rule.severity, sample=sample,
                   ratio=ratio, required=1.0, args=args)


def _luminance(rgb) -> float:
    from tinctura.colour.wcag import relative_luminance

    return relative_luminance(rgb)


# Default thresholds in CAM02-UCS dE' units (see the rules' documentation in catalogue.py);
# engine.Options.shift_threshold and lookalike_threshold override them.
SHIFT_THRESHOLD = 10.0
LOOKALIKE_THRESHOLD = 15.0


def shift_between(colour, bg, other_bg, options=None) -> dict:
    """How ``colour`` (sRGB) on ``bg`` compares with itself on ``other_bg``: J, M, h on each,
    dE' and the change in opponent terms (``tinctura pair --on``)."""
    import numpy as np

    from tinctura.colour import cam02ucs, ciecam02

    spec = ciecam02.appearance([colour, colour], [bg, other_bg], viewing_conditions(options))
    jab = cam02ucs.jab(spec.J, spec.M, spec.h)
    jmh = np.stack([spec.J, spec.M, spec.h], axis=-1)
    return {"jmh": [tuple(float(x) for x in row) for row in jmh],
            "delta": float(cam02ucs.delta_e(jab[0], jab[1])),
            "terms": opponent_terms(jab[0], jab[1], jmh),
            "threshold": float(getattr(options, "shift_threshold", SHIFT_THRESHOLD))}


def lookalike_between(colour, other, bg, options=None) -> list:
    """dE' between ``colour`` and ``other`` on ``bg`` for normal vision and each simulated
    deficiency (``tinctura pair --vs``): [(condition, dE', looks alike)]."""
    import numpy as np

    from tinctura.colour import cam02ucs, ciecam02
    from tinctura.colour import cvd as cvd_mod

    fgs, bgs = [colour, other], [bg, bg]
    rows_fg, rows_bg = [np.array(fgs, dtype=float)], [np.array(bgs, dtype=float)]
    for deficiency in CONDITIONS[1:]:
        rows_fg.append(cvd_mod.simulate(np.array(fgs, dtype=float), deficiency))
        rows_bg.append(cvd_mod.simulate(np.array(bgs, dtype=float), deficiency))
    spec = ciecam02.appearance(np.concatenate(rows_fg), np.concatenate(rows_bg),
                               viewing_conditions(options))
    jab = cam02ucs.jab(spec.J, spec.M, spec.h)
    threshold = float(getattr(options, "lookalike_threshold", LOOKALIKE_THRESHOLD))
    out = []
    for k, condition in enumerate(CONDITIONS):
        d = float(cam02ucs.delta_e(jab[2 * k], jab[2 * k + 1]))
        out.append((condition, d, d < threshold))
    return out
