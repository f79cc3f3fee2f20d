"""Words and fields for the site-level appearance findings (TC300 surround-shift, TC310
lookalike): the palette entries, every context once, the shift in opponent terms. Pure."""
from __future__ import annotations

from . import messages as m

NOTICE = ("A risk to review, not a WCAG 2 failure. Safety colours and signs follow ISO 3864, "
          "ANSI Z535 and local rules, which tinctura does not check or replace.")


def is_appearance(finding) -> bool:
    return "contexts" in finding.args and "delta" in finding.args


def appearance_dict(finding) -> dict:
    """The JSON report's ``appearance`` object of a finding (schema: ``$defs/appearance``)."""
    a = finding.args
    out = {"entry": a["entry"], "delta": float(a["delta"]), "threshold": float(a["threshold"]),
           "contexts": [context_dict(c) for c in a["contexts"]]}
    if "terms" in a:
        out["terms"] = a["terms"]
    if "other" in a:
        out["other"] = a["other"]
        out["conditions"] = [{"condition": c["condition"], "delta": float(c["delta"]),
                              "scheme": c["scheme"]} for c in a["collapses"]]
        out["other_contexts"] = [context_dict(c) for c in a["other_contexts"]]
    return out


def context_dict(c) -> dict:
    return {"role": c["role"], "colour": m.colour(c["colour"]), "background": m.colour(c["bg"]),
            "schemes": list(c["schemes"]), "count": int(c["count"]), "J": round(c["J"], 2),
            "M": round(c["M"], 2), "h": round(c["h"], 1), "declaration": c["declaration"],
            "where": [{"page": p, "line": int(line), "xpath": x} for p, line, x, _ in c["where"]]}


def context_line(c, many_schemes: bool = True) -> str:
    """``#e0a000 on #1e2530 (fill, scheme slate): J 68 M 69 h 80; 4 uses, e.g. page:12; set at
    extra.css:40``"""
    role = "text" if c["role"] == "text" else "fill on its surround"
    names = c["schemes"]
    scheme = (f", scheme{'s' if len(names) > 1 else ''} {', '.join(names)}"
              if many_schemes else "")
    page, line, _, _ = c["where"][0]
    at = f"; colour set at {c['declaration']}" if c["declaration"] else ""
    return (f"{m.colour(c['colour'])} on {m.colour(c['bg'])} ({role}{scheme}): "
            f"J {c['J']:.0f}, M {c['M']:.0f}, h {c['h']:.0f}; "
            f"{m.plural(int(c['count']), 'use')}, e.g. {page}:{line}{at}")


def problem_lines(problem, many_schemes: bool = True) -> list:
    """The lines under a TC300/TC310 problem's headline: every context listed once."""
    return finding_lines(problem.worst, many_schemes)


def finding_lines(finding, many_schemes: bool = True) -> list:
    """The palette entries of a TC300/TC310 finding and every context, once."""
    a = finding.args
    lines = []
    if "other" in a:
        lines.append(f"{a['entry']}:")
        lines += [f"  {context_line(c, many_schemes)}" for c in a["contexts"]]
        lines.append(f"{a['other']}:")
        lines += [f"  {context_line(c, many_schemes)}" for c in a["other_contexts"]]
        lines += [f"under {c['condition']}: {c['delta']:.1f} units apart (scheme {c['scheme']})"
                  for c in a["collapses"]]
    else:
        lines.append(f"{a['entry']} in {m.plural(len(a['contexts']), 'context')}:")
        lines += [f"  {context_line(c, many_schemes)}" for c in a["contexts"]]
    lines.append(NOTICE)
    return lines


def headline(problem) -> str:
    """The problem in one sentence, as ``plain.sentence`` words the others."""
    a = problem.worst.args
    if "other" in a:
        return (f"Palette colours {a['entry']} and {a['other']} look alike "
                f"({a['conditions']}).")
    return f"Palette colour {a['entry']} shifts with its surround ({a['terms']})."


def shift_lines(colour, bg, other_bg, shift: dict) -> list:
    """``tinctura pair FG BG --on OTHER``: the appearance on each background and the change."""
    lines = ["Appearance (CIECAM02; differences in CAM02-UCS units):"]
    for (J, M, h), back in zip(shift["jmh"], (bg, other_bg)):
        lines.append(f"  {m.colour(colour)} on {m.colour(back)}: lightness J {J:.1f}, "
                     f"colourfulness M {M:.1f}, hue h {h:.0f}")
    terms = ", ".join(shift["terms"]) or "about the same"
    verdict = "over" if shift["delta"] > shift["threshold"] else "within"
    lines.append(f"  on {m.colour(other_bg)} it looks {terms}: {shift['delta']:.1f} units apart "
                 f"({verdict} the {shift['threshold']:g} units of TC300)")
    return lines


def lookalike_lines(colour, other, bg, results) -> list:
    """``tinctura pair FG BG --vs OTHER``: how far apart the two colours stay per condition."""
    lines = [f"{m.colour(colour)} and {m.colour(other)} on {m.colour(bg)} (CAM02-UCS units):"]
    for condition, delta, alike in results:
        lines.append(f"  {condition}: {delta:.1f}{'  looks alike' if alike else ''}")
    lines.append(f"  {NOTICE}")
    return lines
