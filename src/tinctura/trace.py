"""Why is this text this colour? The cascade of one element, per scheme.

``trace(site_root, page, target, options)`` finds the element (an XPath, a CSS selector or a
text excerpt) and returns, for each scheme, the rules that matched it in cascade order with their
declarations of the properties tinctura reads, and the element's samples (colours, ratios,
custom-property chains and background layers). ``format_trace`` renders it as text.
"""
from __future__ import annotations

import os
from dataclasses import dataclass, field

import cssselect2
import lxml.etree
import tinycss2

from .colour.convert import to_hex
from .colour.wcag import contrast_ratio, truncate
from .engine import Options, Site
from .extract import bounds
from .extract import schemes as scheme_mod
from .extract.html import decode, own_text, parse_html
from .extract.media import Environment
from .extract.sheet import parse_declarations
from .extract.style import cascade


@dataclass
class MatchedRule:
    where: str  # sheet:line or "style attribute"
    selector: str
    origin: str
    layer: str
    declarations: list  # (property, value, important, wins)


@dataclass
class SchemeTrace:
    scheme: str
    rules: list = field(default_factory=list)
    samples: list = field(default_factory=list)


@dataclass
class Trace:
    page: str
    xpath: str
    text: str
    schemes: list = field(default_factory=list)


def find_element(root, target: str):
    target = target.strip()
    if target.startswith("/"):
        try:
            found = root.xpath(target)
        except lxml.etree.XPathError as exc:
            raise LookupError(f"not a valid XPath: {target!r} ({exc})") from None
        if not isinstance(found, list):  # count(), string(): a value, not an element
            raise LookupError(f"the XPath {target!r} selects a value, not an element")
        found = [el for el in found if isinstance(el, lxml.etree._Element)]
        return found[0] if found else None
    try:
        compiled = cssselect2.compile_selector_list(tinycss2.parse_component_value_list(target))
        wrapper = cssselect2.ElementWrapper.from_html_root(root)
        for w in wrapper.iter_subtree():
            if any(c.test(w) for c in compiled):
                return w.etree_element
    except Exception:
        pass
    needle = " ".join(target.split()).lower()
    body = root.find("body")
    for el in (body if body is not None else root).iter():
        if isinstance(el.tag, str) and el.tag not in ("script", "style", "template") \
                and needle in own_text(el).lower():
            return el
    return None


def trace(site_root: str, page: str, target: str, options: Options | None = None) -> Trace:
    options = options or Options()
    site = Site(site_root, options)
    path = os.path.join(site.root, page)
    source = decode(bounds.read_inside(path, site.loader.real_root, options.max_file_bytes))
    root = parse_html(source)  # as the engine parses it
    el = find_element(root, target)
    if el is None:
        raise LookupError(f"{page}: no element matches {target!r}")
    xpath = root.getroottree().getpath(el)
    result = Trace(page, xpath, own_text(el)[:60])
    ruleset, _ = site.loader.ruleset_for(root, path, source)
    schemes = options.schemes or scheme_mod.discover(root, ruleset)
    samples = site.check_page(page).samples
    for scheme in schemes:
        st = SchemeTrace(scheme.name)
        restore = scheme_mod.apply(root, scheme)
        try:
            index = ruleset.index(Environment(options.viewport_width, scheme_media=scheme.media))
            wrapper = _wrapper_for(root, el)
            rules = index.match(wrapper)
            inline = el.get("style")
            inline_decls = parse_declarations(inline) if inline else ()
            winners = cascade(rules, inline_decls, ruleset)
            won = {(id(w.decl)) for w in winners.values()}
            ordered = sorted((r for r in rules if r.pseudo is None),
                             key=lambda r: (r.origin == "author", ruleset.layer_rank(r.layer),
                                            r.specificity, r.order), reverse=True)
            for r in ordered:
                st.rules.append(MatchedRule(
                    f"{r.sheet}:{r.decls[0].line}" if r.decls else r.sheet, r.selector_text,
                    r.origin, ".".join(r.layer),
                    [(d.name, d.text, d.important, id(d) in won) for d in r.decls]))
            if inline_decls:
                st.rules.insert(0, MatchedRule("style attribute", "", "inline", "",
                                               [(d.name, d.text, d.important, id(d) in won)
                                                for d in inline_decls]))
        finally:
            restore()
        st.samples = [s for s in samples if s.scheme == scheme.name
                      and (s.xpath == xpath or s.xpath.startswith(xpath + "::"))]
        result.schemes.append(st)
    return result


def _wrapper_for(root, el):
    wanted = el
    for w in cssselect2.ElementWrapper.from_html_root(root).iter_subtree():
        if w.etree_element is wanted:
            return w
    raise LookupError("element vanished")


def format_trace(t: Trace) -> str:
    lines = [f"{t.page}  {t.xpath}", f"  text: {t.text!r}"]
    for st in t.schemes:
        lines.append(f"\nscheme {st.scheme}")
        lines.append("  matched rules, winning first:")
        for r in st.rules:
            layer = f" @layer {r.layer}" if r.layer else ""
            lines.append(f"    {r.where}  {r.selector or '(inline)'}  [{r.origin}{layer}]")
            for name, value, important, wins in r.declarations:
                mark = "*" if wins else " "
                imp = " !important" if important else ""
                lines.append(f"      {mark} {name}: {value}{imp}")
        if not st.samples:
            lines.append("  no rendered text sample for this element in this scheme")
        for s in st.samples:
            lines.append(f"  sample ({s.state}, {s.kind}): {_hex(s.fg)} on {_hex(s.bg)}"
                         + (f"  {truncate(contrast_ratio(s.fg, s.bg)):.2f}:1" if s.fg and s.bg
                            else "") + f"  {s.status}" + (f" ({s.reason})" if s.reason else ""))
            c = s.fg_cause
            if c and c.declaration:
                d = c.declaration
                src = f"inherited from {c.inherited_from}, " if c.inherited_from else ""
                lines.append(f"    colour: {src}{d.property}: {d.value}  at {d.where()}"
                             f"  ({d.selector or d.origin})")
                for step in c.chain:
                    lines.append(f"      <- {step.property}: {step.value}  at {step.where()}"
                                 f"  ({step.selector})")
            for layer in s.bg_layers:
                col = _hex(layer.colour[:3]) if layer.colour else "?"
                alpha = f" alpha {layer.colour[3]:.3g}" if layer.colour and len(layer.colour) > 3 \
                    and layer.colour[3] < 1 else ""
                where = ""
                if layer.cause and layer.cause.declaration:
                    d = layer.cause.declaration
                    where = f"  {d.property}: {d.value} at {d.where()} ({d.selector})"
                    for step in layer.cause.chain:
                        where += f" <- {step.property} at {step.where()}"
                lines.append(f"    layer {layer.kind} {col}{alpha} from {layer.xpath or 'canvas'}"
                             f"{where}")
    return "\n".join(lines)


def _hex(c):
    return to_hex(c) if c is not None else "?"
