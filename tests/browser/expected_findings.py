"""Turn Chromium's samples into the findings a WCAG 2 AA checker must report.

Library and script::

    python tests/browser/expected_findings.py SAMPLES.jsonl --out example_site/expected_findings.json

The contrast maths is the WCAG 2.2 definition (W3C Recommendation: "relative luminance",
"contrast ratio", "large scale (text)"), applied to the #rrggbb pixels Chromium produced. It is
written here again, apart from tinctura's own code, so that the expectations do not come from the
code under test. The file format is documented in tests/browser/README.md.
"""
from __future__ import annotations

import argparse
import json
import sys

AA_TEXT = 4.5  # SC 1.4.3
AA_LARGE = 3.0
LARGE_PX = 24.0  # 18 pt at 4/3 px per pt (CSS Values 3)
LARGE_BOLD_PX = 14 * 4 / 3  # 14 pt bold = 18.6667 px
BOLD = 700


def _channel(c8: int) -> float:
    c = c8 / 255
    return c / 12.92 if c <= 0.04045 else ((c + 0.055) / 1.055) ** 2.4


def luminance(hex_colour: str) -> float:
    """WCAG 2.2 relative luminance of an opaque #rrggbb colour."""
    h = hex_colour.lstrip("#")
    r, g, b = (_channel(int(h[i:i + 2], 16)) for i in (0, 2, 4))
    return 0.2126 * r + 0.7152 * g + 0.0722 * b


def contrast(a: str, b: str) -> float:
    la, lb = sorted((luminance(a), luminance(b)))
    return (lb + 0.05) / (la + 0.05)


def is_large(font_size_px: float, font_weight: int) -> bool:
    # A hair of tolerance: 14pt bold is 18.666... px and browsers report 18.6667.
    return font_size_px >= LARGE_PX or (font_size_px >= LARGE_BOLD_PX - 1e-3 and font_weight >= BOLD)


def required(sample: dict) -> float:
    return AA_LARGE if is_large(sample["font_size_px"], sample["font_weight"]) else AA_TEXT


def _entry(sample: dict, source: str) -> dict:
    entry = {
        "page": sample["page"], "scheme": sample["scheme"], "state": sample["state"],
        "xpath": sample["xpath"], "text": sample["text"], "fg": sample.get("fg"), "bg": sample.get("bg"),
        "large": is_large(sample["font_size_px"], sample["font_weight"]), "source": source,
    }
    if sample.get("pseudo"):
        entry["pseudo"] = sample["pseudo"]
    return entry


ICON_RATIO = 3.0  # WCAG 2.2 SC 1.4.11 Non-text Contrast: 3:1


def build(records) -> dict:
    """Findings (determined, failing), exempt failures and undetermined samples."""
    source, findings, exempt, undetermined, nontext = "chromium", [], [], [], []
    for r in records:
        if r["type"] == "meta":
            source = r["source"]
        if r["type"] != "sample":
            continue
        need = required(r)
        if r["status"] == "determined":
            ratio = contrast(r["fg"], r["bg"])
            if ratio >= need:
                continue
            entry = dict(_entry(r, source), ratio=round(ratio, 3))
            # "scope": the WCAG 2.2 scope decided in the page (collect.js); older sample files
            # carry only "disabled"
            scope = r["scope"] if "scope" in r else ("inactive-control" if r.get("disabled") else "")
            if scope == "icon" and ratio < ICON_RATIO:
                nontext.append(dict(entry, exempt=scope))
            (exempt if scope else findings).append(dict(entry, exempt=scope) if scope else entry)
        else:
            entry = dict(_entry(r, source), reason=r["reason"])
            if r.get("images"):
                entry["images"] = r["images"]
            if r.get("stops"):
                ratios = [round(contrast(s["fg"], s["bg"]), 3) for s in r["stops"] if "fg" in s]
                entry["stops"] = [dict(stop=s["stop"], fg=s.get("fg"), bg=s.get("bg"), ratio=q)
                                  for s, q in zip(r["stops"], ratios)]
                if ratios and len(ratios) == len(r["stops"]):
                    fails = [q < need for q in ratios]
                    entry["verdict"] = ("fails at every stop" if all(fails)
                                        else "passes at every stop" if not any(fails) else "stops disagree")
            undetermined.append(entry)
    order = lambda e: (e["page"], e["scheme"], e["state"], e["xpath"], e.get("pseudo", ""))  # noqa: E731
    return {
        "about": ("Samples from Chromium that fail WCAG 2 AA (4.5:1; 3:1 for large text) computed with "
                  "the WCAG 2.2 formula from Chromium's pixels; see tests/browser/README.md. Automated "
                  "checks cover only part of WCAG: conformance needs a review by qualified people."),
        "source": source,
        "findings": sorted(findings, key=order),
        "exempt": sorted(exempt, key=order),
        "undetermined": sorted(undetermined, key=order),
        # icon glyphs (not text in a human language) below 3:1: WCAG 2.2 SC 1.4.11 (TC110)
        "nontext": sorted(nontext, key=order),
    }


def read_jsonl(path):
    with open(path, encoding="utf-8") as f:
        return [json.loads(line) for line in f if line.strip()]


def main(argv=None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("samples", help="JSONL written by chromium_reference.py")
    parser.add_argument("--out", required=True)
    args = parser.parse_args(argv)
    result = build(read_jsonl(args.samples))
    with open(args.out, "w", encoding="utf-8") as f:
        json.dump(result, f, indent=1, sort_keys=False, ensure_ascii=False)
        f.write("\n")
    print(f"{len(result['findings'])} findings, {len(result['exempt'])} exempt, "
          f"{len(result['undetermined'])} undetermined -> {args.out}", file=sys.stderr)
    return 0


if __name__ == "__main__":
    sys.exit(main())
