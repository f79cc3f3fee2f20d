"""The audit report: one self-contained HTML document for the whole site.

Scope and method, results per WCAG success criterion, per rule and per scheme, the distribution
of contrast ratios, pages ranked by findings, problems ranked by occurrences (with swatches of
the words in their real colours beside the suggested fix), what was not judged and why, and the
limits of an automated check. No script, no external resource: it opens from disk and prints
(a print stylesheet keeps each problem on one page). It follows ``prefers-color-scheme`` and
passes tinctura's own check in both schemes (tested). Every string that comes from a page, a
stylesheet or the command line goes through :func:`e`.
"""
from __future__ import annotations

import re
from html import escape

from tinctura import distribution
from tinctura.colour import wcag
from tinctura.problems import faded, target_declaration

from . import audit, charts, swatch
from .appearance import is_appearance
from .appearance import problem_lines as appearance_lines
from . import messages as m
from .base import Formatter, Header
from .notice import DISCLAIMER
from .outputs import record_counts
from .scope import Scope, now
from .text_report import cause_fix_lines, examples

BEYOND = (
    "APCA and the colour-appearance rules (surround, look-alike colours, viewing conditions, "
    "colour-vision deficiency) are advice beyond WCAG 2: they are not WCAG 2 requirements, "
    "and a finding from them is not a WCAG 2 failure."
)

CANNOT_JUDGE = (
    "Text inside images, video, canvas and background pictures.",
    "Text shown only by scripts (menus, dialogs, search results) or after a user's action that "
    "the check does not simulate.",
    "Whether colour is the only means of conveying information (WCAG SC 1.4.1), and whether "
    "links can be told apart from their sentence for the reader.",
    "The contrast of icons, focus indicators, form-field borders and charts (SC 1.4.11, 2.4.7, "
    "2.4.13), unless a rule of this run names them.",
    "Whether text the check treats as exempt (inactive controls, logos, decoration) is really "
    "exempt, and whether the page makes sense to people using assistive technology.",
    "Colours that follow their own standards: safety colours and signs follow ISO 3864, "
    "ANSI Z535 and local regulations, which this report does not check.",
)

STATUS_CLASS = {audit.FAIL: "fail", audit.PASS: "pass", audit.REVIEW: "review",
                audit.NOT_CHECKED: "none"}
EXAMPLE_ROWS = 3


def e(value) -> str:
    """Escape for HTML text and double- or single-quoted attributes."""
    return escape("" if value is None else str(value), quote=True)


def code(value) -> str:
    return f"<code>{e(value)}</code>"


_TICKS = re.compile(r"`([^`]*)`")


def prose(text: str) -> str:
    """Escape ``text``, then show its `back-quoted` parts (CSS values) as code."""
    return _TICKS.sub(r"<code>\1</code>", e(text))


class HtmlFormatter(Formatter):
    # the page counts need each occurrence's situation only: read as records, not findings
    wants_occurrences = True

    def __init__(self, stream, header: Header):
        super().__init__(stream, header)
        self.tally = audit.Tally()
        self.problems: list = []
        self.diagnostics: list = []

    def page(self, page, findings) -> None:
        self.tally.add(page.page, findings, audit.undetermined_of(page))

    def occurrences(self, page, store) -> None:
        templates = store.situations
        self.tally.add(page.page, [templates[r[0]] for r in store.occurrences(page.page)
                                   if record_counts(r)], audit.undetermined_of(page),
                       templates=True)

    def problem(self, index, problem) -> None:
        self.problems.append(problem)

    def diagnostic(self, diagnostic) -> None:
        self.diagnostics.append(diagnostic)

    def stop(self, summary) -> None:
        self.summary = summary
        # a caller that gave no scope (the plugin, say): at least the date
        self.about = getattr(self.header, "scope", None) or Scope(date=now())
        scope = self.about
        self.chosen = audit.selected_rules(getattr(self.header, "rules", ()) or
                                           getattr(scope, "rules", ()) or ())
        w = self.stream.write
        w(HEAD.format(title=e(self.title()), version=e(self.header.version), css=CSS))
        w(self.cover())
        w('<main id="main">\n')
        for part in (self.caution, self.glance, self.scope, self.criteria, self.rules_and_schemes,
                     self.ratios, self.pages, self.problem_list, self.not_judged, self.limits):
            w(part())
        w("</main>\n")
        date = getattr(self.about, "date", "")
        w(f"<footer><p>Written by tinctura {e(self.header.version)}"
          f"{' on ' + e(date) if date else ''}. Automated checks cover only part of WCAG; "
          f"conformance needs a review by qualified people.</p></footer>\n</body>\n</html>\n")

    # -- parts ---------------------------------------------------------------------------

    def title(self) -> str:
        scope = self.about
        name = getattr(scope, "title", "") or ", ".join(getattr(scope, "paths", []) or [])
        return f"Colour contrast audit: {name}" if name else "Colour contrast audit"

    def cover(self) -> str:
        scope = self.about
        name = getattr(scope, "title", "") or ", ".join(getattr(scope, "paths", []) or [])
        date = getattr(scope, "date", "")
        when = f" on {e(date)}" if date else ""
        return (f'<header class="cover"><p class="kicker">Colour contrast audit</p>'
                f"<h1>{e(name) or 'Built site'}</h1>"
                f'<p class="meta">Checked{when} with tinctura {e(self.header.version)} against '
                f"WCAG 2.2 level {e(self.header.level)}.</p>{TOC}</header>\n")

    def caution(self) -> str:
        return section("caution", "Read this first", f"<p>{e(DISCLAIMER)}</p><p>{e(BEYOND)}</p>",
                       cls="caution")

    def glance(self) -> str:
        s = self.summary
        figures = (
            ("Pages checked", s.pages), ("Texts judged", self.judged()),
            ("Findings", s.findings), ("Problems (distinct causes)", s.problems),
            ("Pages with findings", s.pages_with_findings), ("Texts not judged", s.undetermined),
        )
        cells = "".join(f'<div><dt>{e(label)}</dt><dd data-figure="{e(label)}">{n:,}</dd></div>'
                        for label, n in figures)
        sev = ", ".join(e(m.plural(n, name, name if name == "info" else None))
                        for name, n in s.by_severity.items())
        return section("glance", "At a glance", f'<dl class="figures">{cells}</dl>',
                       f"<p>Findings by severity: {sev}. A problem groups the findings that one "
                       f"pair of declarations causes: fixing the declaration fixes every "
                       f"occurrence.</p>")

    def judged(self) -> int:
        return sum(sum(bins.values()) for bins in self.summary.ratios.values())

    def scope(self) -> str:
        s, sc, h = self.summary, self.about, self.header
        paths = ", ".join(getattr(sc, "paths", []) or []) or "not recorded"
        site = f"{sc.title} ({paths})" if getattr(sc, "title", "") else paths
        rows = [("Site", site),
                ("Date", getattr(sc, "date", "") or "not recorded"),
                ("Tool", f"tinctura {h.version}"),
                ("Level", f"WCAG 2.2 level {h.level}"),
                ("Colour schemes", ", ".join(s.schemes) or "none found"),
                ("States", ("resting, :hover, :focus and :focus-visible of links and controls"
                            if getattr(sc, "states", True) else "resting state")
                 + "; closed sections (details), tabs and theme menus opened; "
                   "table-of-contents entries marked as a theme's scroll spy marks them"),
                ("Viewport width", f"{getattr(sc, 'viewport_width', 1280)} CSS pixels"),
                ("Pages checked", f"{s.pages:,}"),
                ("Pages excluded", self.excluded())]
        rows.extend((label, value) for label, value in getattr(sc, "extra", []) or [])
        if swatch.deficiencies():
            rows.append(("Colour-vision previews", ", ".join(swatch.deficiencies()) +
                         " (Machado 2009 simulation, full severity), shown beside each problem"))
        if not any(label.lower().startswith("viewing") for label, _ in rows):
            rows.append(("Viewing profiles", "none: contrast is judged as WCAG 2 defines it, "
                                             "without ambient light"))
        rule_items = "".join(
            f"<li>{code(r.code)} {e(r.slug)}: {e(r.title)}. Method: "
            f"{e('; '.join(t for t, _ in r.docs.references) or 'see the rule')}.</li>"
            for r in self.chosen)
        dl = "".join(f"<div><dt>{e(k)}</dt><dd>{e(v)}</dd></div>" for k, v in rows)
        pages = "".join(f"<li>{e(p)}</li>" for p in self.tally.pages)
        return section(
            "scope", "Scope and method", f'<dl class="scope">{dl}</dl>',
            f"<h3>Rules run</h3><ul>{rule_items}</ul>",
            "<p>Each page was read as built, with its stylesheets; the cascade was resolved "
            "without a browser, for every scheme and state above, and every text judged against "
            "its effective background. Ratios are shown floored to two decimals (4.499 shows as "
            "4.49 and fails 4.5).</p>",
            f"<details><summary>Every page checked ({len(self.tally.pages):,})</summary>"
            f'<ul class="columns">{pages}</ul></details>')

    def excluded(self) -> str:
        sc = self.about
        pages = getattr(sc, "excluded_pages", []) or []
        patterns = getattr(sc, "exclude", []) or []
        if not patterns:
            return "none"
        shown = ", ".join(pages[:20]) + (", ..." if len(pages) > 20 else "")
        return f"{len(pages):,} ({shown}) by the patterns {', '.join(patterns)}"

    def criteria(self) -> str:
        per_rule: dict = {}
        for p in self.problems:
            per_rule[p.rule] = per_rule.get(p.rule, 0) + 1
        rows = audit.criteria_rows(self.header.level, self.chosen, self.summary.by_rule,
                                   per_rule, self.summary.undetermined)
        body = [row(f'<a href="{e(r.criterion.url)}">{e(r.criterion.number)} '
                    f"{e(r.criterion.name)}</a>",
                    e(r.criterion.level),
                    f'<span class="status {STATUS_CLASS[r.status]}">'
                    f"{e(r.status.capitalize())}</span>",
                    e(", ".join(r.rules) or "none"), r.findings, e(r.note),
                    attrs=f' data-criterion="{e(r.criterion.number)}"') for r in rows]
        return section(
            "criteria", "WCAG success criteria about colour",
            "<p>\u201cPass\u201d means this tool found no failure in the text it could judge; "
            "it is not a statement of conformance.</p>",
            table("Results per success criterion (WCAG 2.2)",
                  ("Success criterion", "Level", "Result", "Rules", "#Findings", "Notes"), body))

    def rules_and_schemes(self) -> str:
        level = self.header.level
        by_rule = [row(f"{code(r.name)} {e(r.extra['rule'].slug)}",
                       e(self.criterion_of(r.extra["rule"], level)),
                       e(r.extra["rule"].severity), r.findings, r.problems, r.pages,
                       attrs=f' data-rule="{e(r.name)}"')
                   for r in audit.rule_rows(self.chosen, self.summary, self.problems, self.tally)]
        by_scheme = [row(e(r.name), r.extra["judged"], r.findings, r.problems, r.pages,
                         attrs=f' data-scheme="{e(r.name)}"')
                     for r in audit.scheme_rows(self.summary, self.problems, self.tally)]
        counts = ("#Findings", "#Problems", "#Pages")
        advice = audit.other_rules(level, self.chosen)
        note = "" if not advice else (
            f"<p>{e(', '.join(r.code for r in advice))}: {e(BEYOND)}</p>")
        return section(
            "rules", "Results per rule and per colour scheme",
            table("Per rule", ("Rule", "WCAG 2", "Severity") + counts, by_rule), note,
            table("Per colour scheme", ("Scheme", "#Texts judged") + counts, by_scheme))

    @staticmethod
    def criterion_of(rule, level: str) -> str:
        c = audit.applied(rule, level)
        return f"SC {c.number} {c.name}" if c else "beyond WCAG 2 (advice)"

    def ratios(self) -> str:
        hist = self.summary.ratios
        marks = audit.thresholds(self.header.level)
        lines = " and ".join(m.required(t) + ":1" for t in marks)
        peak = max((n for bins in hist.values() for n in bins.values()), default=1)
        figures = []
        for name in self.summary.schemes or sorted(hist):
            bins = hist.get(name, {})
            rows = [row(e(f"{lo:g} to {hi:g}"), n)
                    for lo, hi, n in ((*self.bounds(k), n) for k, n in sorted(bins.items()))]
            figures.append(
                f'<figure class="chart-box">{charts.ratio_histogram(bins, marks, name, peak)}'
                f"<figcaption>Scheme {e(name)}: {sum(bins.values()):,} texts judged. Dashed "
                f"lines: {lines}, the ratios large and normal text need at level "
                f"{e(self.header.level)}; hatched bars lie below {m.required(max(marks))}:1."
                f"</figcaption><details><summary>The numbers (scheme {e(name)})</summary>"
                + table(f"Texts per contrast ratio, scheme {name}", ("Ratio", "#Texts"), rows)
                + "</details></figure>")
        return section("ratios", "How the contrast ratios are spread",
                       "<p>Every text judged, in every state, by its contrast ratio against its "
                       "background. Text close to a threshold passes today but has little "
                       "margin.</p>", *figures)

    @staticmethod
    def bounds(k: int) -> tuple:
        lo, hi = distribution.bin_range(k)
        return max(lo, 1.0), hi

    def pages(self) -> str:
        ranked = self.tally.ranked_pages()
        if not ranked:
            return section("pages", "Pages", "<p>No page has findings.</p>")
        schemes = list(self.summary.schemes)
        rows = [row(e(page), n, *(self.tally.by_page_scheme[page].get(s, 0) for s in schemes),
                    attrs=f' data-page="{e(page)}"') for page, n in ranked]
        clean = self.summary.pages - len(ranked)
        return section(
            "pages", "Pages ranked by findings",
            f'<figure class="chart-box">{charts.page_bars(ranked)}<figcaption>Findings per '
            f"page, most first ({min(len(ranked), 20)} of {len(ranked):,} pages with findings)."
            f"</figcaption></figure>",
            table(f"Findings per page and scheme; {clean:,} other pages have none",
                  ("Page", "#Findings") + tuple("#" + s for s in schemes), rows))

    def problem_list(self) -> str:
        if not self.problems:
            body = "<p>No contrast problems were found in the text that could be judged.</p>"
        else:
            body = "".join(self.problem_article(i, p) for i, p in enumerate(self.problems, 1))
        cvd = ("" if swatch.deficiencies() else
               "<p>Colour-vision deficiency previews are not available in this version.</p>")
        return section("problems", "Problems, most occurrences first",
                       "<p>Each problem is one text colour declaration on one background "
                       "declaration, in every scheme where they meet. The pictures show the words as published and "
                       "with the suggested colour.</p>", cvd, body)

    def problem_article(self, index: int, p) -> str:
        worst = p.worst
        fg, bg = m.finding_colours(worst)
        s = worst.sample
        rule = self.rule(p.rule)
        sc = audit.applied(rule, worst.level) if rule else None
        where = f"SC {sc.number}" if sc else "beyond WCAG 2"
        what = m.non_text(worst) or "text"
        title = prose(f"{index}. {self.value(p.fg_cause, fg, what)} on "
                      f"{self.value(p.bg_cause, bg, 'background')}: {measure(rule, worst)}")
        facts = (f'<p class="facts"><span class="sev">{e(p.severity.capitalize())}</span> '
                 f"{code(p.rule)} {e(p.slug)}, {e(where)}; {schemes_of(p)}; "
                 f"{m.plural(p.occurrences, 'occurrence')} on {m.plural(p.pages, 'page')}.</p>"
                 f"<p>{e(sentence(m.message(worst)))}.</p>")
        fix = self.suggested(p, bg)
        pictures = self.pictures(s, fg, bg, fix, "words" if what == "text" else what)
        cause = (f'<dl class="cause"><div><dt>{e(what[0].upper() + what[1:])} colour</dt><dd>'
                 f"{prose(m.cause(p.fg_cause, 'no declaration (initial value)'))}</dd></div>"
                 f"<div><dt>Background</dt><dd>"
                 f"{prose(m.cause(p.bg_cause, 'no declaration (the canvas)'))}</dd></div>"
                 f"<div><dt>Fix at the cause</dt><dd>{self.fix_text(p, worst)}</dd></div></dl>")
        if is_appearance(worst):  # site-level: the palette entries and every context instead
            cause = ('<dl class="cause"><div><dt>Palette colours and contexts</dt><dd>'
                     + "<br>".join(prose(line) for line in appearance_lines(p))
                     + "</dd></div></dl>")
        return (f'<article class="problem" id="problem-{index}" data-rule="{e(p.rule)}" '
                f'data-occurrences="{p.occurrences}" aria-labelledby="problem-{index}-h">'
                f'<h3 id="problem-{index}-h">{title}</h3>{facts}{pictures}{cause}'
                f"{self.occurrence_list(p)}</article>\n")

    @staticmethod
    def rule(code_):
        from tinctura import rules

        try:
            return rules.get(code_)
        except KeyError:
            return None

    @staticmethod
    def value(cause, rgb, what: str) -> str:
        d = target_declaration(cause)
        if d is None:
            return f"{what} `{m.colour(rgb)}` (not declared)"
        return f"`{d.property}: {d.value}`"

    @staticmethod
    def suggested(p, bg):
        """(colour, label) of the suggested text colour on ``bg``, or None."""
        fix = p.fix_at_cause
        if fix is not None and fix.possible:
            return fix.colour, "Suggested"
        if fix is not None:
            for c in fix.contexts:
                if c.colour is not None and any(tuple(b) == tuple(bg) for b in c.backgrounds):
                    return c.colour, "Suggested on this background"
        for f in p.worst.fixes:
            if f.target == "foreground":
                return f.colour, f"Nearest passing {m.non_text(p.worst) or 'text'} colour"
        return None

    def pictures(self, s, fg, bg, fix, what: str = "words") -> str:
        """Swatches of ``what`` (the words, or a TC110 object) as published, under each
        simulated deficiency, and with the suggested colour."""
        text, size, weight = s.text, s.font_size_px, s.font_weight
        rows = [("Full colour vision", fg, bg, fix[0] if fix else None)]
        for name in swatch.deficiencies():
            sfg, sbg = swatch.simulate(fg, name), swatch.simulate(bg, name)
            sfix = swatch.simulate(fix[0], name) if fix else None
            rows.append((f"{name.capitalize()} (simulated)", sfg, sbg, sfix))

        def cell(fg_, bg_, label):
            ratio = m.ratio(wcag.contrast_ratio(fg_, bg_))
            return (f"{swatch.image(text, fg_, bg_, size, weight, label)}"
                    f'<span class="ratio">{e(m.colour(fg_))} on {e(m.colour(bg_))}, '
                    f"{ratio}:1</span>")

        body = [row(e(label), cell(a, b, label),
                    *(() if c is None else (cell(c, b, label + ", suggested"),)))
                for label, a, b, c in rows]
        heads = ("Vision", "As published") + ((f"{fix[1]}: {m.colour(fix[0])}",) if fix else ())
        seen = "them" if what == "words" else "it"
        return table(f"The {what} as readers see {seen}", heads, body, cls="pictures")

    def fix_text(self, p, worst) -> str:
        lines = cause_fix_lines(p.fix_at_cause, m.needs(worst))
        if faded(worst):  # an ancestor's opacity fades it: no colour undoes that
            unfaded = getattr(p, "worst_unfaded", None)
            if unfaded is None:
                return e(m.RAISE_OPACITY + ".")
            rest = "<br>".join(prose(line.strip()) for line in lines) if lines else e(
                "no single-colour change reaches the ratio; change both colours")
            return e(f"{m.RAISE_OPACITY}; {m.unfaded_too(unfaded)}:") + "<br>" + rest
        if lines:  # (the row's heading says "Fix at the cause")
            lines[0] = lines[0].removeprefix("fix at the cause: ")
        if not lines:
            cue = self.cue_fix(p)
            if cue:
                return cue
            other = m.fixes(worst)
            return e(f"for this occurrence: {other}" if other else "no single-colour change "
                     "reaches the ratio; change both colours")
        return "<br>".join(prose(line.strip()) for line in lines)

    def cue_fix(self, p) -> str:
        """A rule met by a cue besides colour (TC120): the override that underlines the links
        when there is one, else the rule's own advice; "" for the other rules."""
        from tinctura.overrides import CUE_RULES

        if p.rule not in CUE_RULES:
            return ""
        override = getattr(p, "override", None)
        if override is not None:
            checked = "checked again with it applied: it passes" if override.verified else \
                f"not verified: {m.not_verified(override)}"
            return (e(f"underline the links: add to {override.where} ({checked}): ")
                    + f"<code>{e(override.compact())}</code>")
        rule = self.rule(p.rule)
        return e(rule.docs.fix) if rule is not None else ""

    def occurrence_list(self, p) -> str:
        chosen = examples(p.example_pool(), p.worst)[:EXAMPLE_ROWS]
        many = len(getattr(p, "schemes", None) or ()) > 1  # rows told apart by their scheme
        rows = []
        for f in chosen:
            s = f.sample
            efg, ebg = m.finding_colours(f)
            source = source_of(s, self.header)
            context = ([f"scheme {s.scheme}"] if many else []) + \
                ([] if s.state == "rest" else [f":{s.state}"])
            context = f" ({', '.join(context)})" if context else ""
            where = e(f"{s.page}:{s.line}{context}") + (f"<br>source {e(source)}" if source
                                                        else "")
            rows.append(row(where, f'<code class="path">{e(m.css_path(s.xpath))}</code>',
                            e(m.excerpt(s.text, 80)),
                            e(f"{m.colour(efg)} on {m.colour(ebg)}, {m.measured(f)}")))
        rest = p.occurrences - len(chosen)
        more = f"; {m.plural(rest, 'more occurrence')} not shown" if rest > 0 else ""
        return table(f"Where it occurs{more}", ("Page and line", "Element", "Text", "Colours"),
                     rows, cls="occurrences")

    def not_judged(self) -> str:
        s = self.summary
        parts = [f"<p>{s.undetermined:,} texts could not be judged: their colours depend on "
                 f"something a static check cannot know (a picture, backgrounds that disagree). "
                 f"A person must look at them. {s.exempt:,} texts are exempt (for example "
                 f"inactive controls, which WCAG SC 1.4.3 exempts).</p>"]
        if s.undetermined_reasons:
            parts.append(table("Texts not judged, by reason", ("Reason", "#Texts"),
                               [row(e(k), v) for k, v in s.undetermined_reasons.items()]))
            parts.append(table("Pages with texts not judged", ("Page", "Reasons", "#Texts"),
                               [row(e(page), e(", ".join(sorted(found))), sum(found.values()))
                                for page, found in sorted(self.tally.undetermined.items())]))
        if s.skipped:
            parts.append(table("Elements not rendered, so not checked", ("Why", "#Elements"),
                               [row(e(k), v) for k, v in s.skipped.items()]))
        if self.diagnostics:
            items = "".join(f"<li>{e(m.diagnostic_line(d, elsewhere))}</li>"
                            for d, elsewhere in m.grouped_diagnostics(self.diagnostics))
            parts.append(f"<h3>What the check could not read or model</h3><ul>{items}</ul>")
        return section("not-judged", "Not judged, and why", *parts)

    def limits(self) -> str:
        items = "".join(f"<li>{e(t)}</li>" for t in CANNOT_JUDGE)
        return section("limits", "What this check cannot judge", f"<ul>{items}</ul>",
                       "<p>Conformance needs a review by qualified people; see \u201cRead this "
                       "first\u201d.</p>")


def section(id_: str, title: str, *body: str, cls: str = "") -> str:
    klass = f' class="{cls}"' if cls else ""
    return (f'<section id="{id_}"{klass} aria-labelledby="{id_}-h"><h2 id="{id_}-h">'
            f"{e(title)}</h2>{''.join(body)}</section>\n")


def table(caption: str, heads, rows, cls: str = "") -> str:
    """A table with a caption and column headers (a ``#`` before a header marks a numeric
    column); ``rows``: markup from :func:`row`."""
    cells = "".join(f'<th scope="col" class="num">{e(h[1:])}</th>' if h.startswith("#")
                    else f'<th scope="col">{e(h)}</th>' for h in heads)
    klass = f' class="{cls}"' if cls else ""
    return (f"<table{klass}><caption>{e(caption)}</caption><thead><tr>{cells}</tr></thead>"
            f"<tbody>{''.join(rows)}</tbody></table>")


def row(head: str, *cells, attrs: str = "") -> str:
    """A table row: ``head`` (markup) as its header, then cells (markup; ints as numbers)."""
    out = [f'<tr{attrs}><th scope="row">{head}</th>']
    for c in cells:
        out.append(f'<td class="num">{c:,}</td>' if isinstance(c, int) else f"<td>{c}</td>")
    return "".join(out) + "</tr>"


def measure(rule, finding) -> str:
    """``2.32:1, needs 4.5:1``, or what the rule measures instead (its ``measure`` template)."""
    template = m.measure_template(rule, finding)
    if template != m.RATIO_MEASURE:
        try:
            return template.format(**m.message_args(finding))
        except (KeyError, IndexError, ValueError):  # a template this version cannot fill
            pass
    return f"{m.ratio(finding.ratio)}:1, needs {m.required(finding.required)}:1"


def sentence(text: str) -> str:
    text = text.strip().rstrip(".")
    return text[:1].upper() + text[1:]


def source_of(sample, header=None) -> str:
    """The Markdown source location of a sample, when the run can tell ("" otherwise).

    Asks, in turn, the header's ``locate`` (sample -> location with a ``source`` that has a
    ``file`` and a ``line``), the header's ``source`` (page -> ``(path, line)``), and the
    sample's own ``source``; a run without source locations gives "".
    """
    found = None
    locate = getattr(header, "locate", None)
    if callable(locate):
        found = getattr(locate(sample), "source", None)
    source = getattr(header, "source", None)
    if found is None and source is not None:
        found = source(sample.page, sample.line) if callable(source) else source.get(sample.page)
    if found is None:
        found = getattr(sample, "source", None)
    return _where(found)


def _where(found) -> str:
    if not found:
        return ""
    if isinstance(found, str):
        return found
    if isinstance(found, tuple):
        path, line = (tuple(found) + (0,))[:2]
    else:
        path = getattr(found, "file", None) or getattr(found, "path", None)
        line = getattr(found, "line", 0)
    if not path:
        return ""
    return f"{path}:{line}" if line else str(path)


TOC = (
    '<nav aria-labelledby="toc-h"><h2 id="toc-h">Contents</h2><ol>'
    '<li><a href="#caution">Read this first</a></li><li><a href="#glance">At a glance</a></li>'
    '<li><a href="#scope">Scope and method</a></li>'
    '<li><a href="#criteria">WCAG success criteria</a></li>'
    '<li><a href="#rules">Rules and schemes</a></li>'
    '<li><a href="#ratios">Contrast ratios</a></li><li><a href="#pages">Pages</a></li>'
    '<li><a href="#problems">Problems</a></li><li><a href="#not-judged">Not judged</a></li>'
    '<li><a href="#limits">Limits</a></li></ol></nav>'
)

HEAD = """<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<meta name="color-scheme" content="light dark">
<meta name="generator" content="tinctura {version}">
<title>{title}</title>
<style>{css}</style>
</head>
<body>
"""

# Light and dark palettes; every text and bar colour is checked by the report's own test.
CSS = """
:root{--bg:#ffffff;--ink:#1b1d21;--muted:#464b53;--line:#8a919c;--panel:#f2f4f7;
--link:#1d4ea6;--bar:#3b5b8f;--low:#a3401a;--hatch:#ffffff;
--fail:#8f1d13;--fail-bg:#fbe8e5;--pass:#155a2f;--pass-bg:#e5f3e9;--review:#6b4300;
--review-bg:#fdf1d4;--none:#3b4049;--none-bg:#e9ecf0}
@media (prefers-color-scheme: dark){:root{--bg:#15171c;--ink:#e8eaee;--muted:#b9bec7;
--line:#6b7380;--panel:#1f232a;--link:#9fbfff;--bar:#8fb0e8;--low:#f0956b;--hatch:#15171c;
--fail:#ffb3a7;--fail-bg:#3d1a16;--pass:#9fdcb3;--pass-bg:#15321f;--review:#f5d08a;
--review-bg:#3a2c0f;--none:#cfd4dc;--none-bg:#2a2f37}}
*{box-sizing:border-box}
html{background-color:var(--bg);color:var(--ink)}
body{background-color:var(--bg);color:var(--ink);margin:0 auto;max-width:62rem;
padding:1.5rem 1.25rem 3rem;font:16px/1.5 system-ui,-apple-system,"Segoe UI",sans-serif}
h1,h2,h3{line-height:1.25;color:var(--ink)}
h1{font-size:2rem;margin:.2rem 0 .5rem}
h2{font-size:1.45rem;margin:2.5rem 0 .75rem;padding-top:.5rem;border-top:2px solid var(--line)}
h3{font-size:1.1rem;margin:1.5rem 0 .5rem}
a{color:var(--link);text-underline-offset:.15em}
a:hover,a:focus,a:focus-visible{color:var(--link);text-decoration-thickness:2px}
a:focus-visible{outline:3px solid var(--link);outline-offset:2px}
code{font-family:ui-monospace,"SFMono-Regular",Menlo,Consolas,monospace;font-size:.9em;
overflow-wrap:break-word}
.kicker{margin:0;font-weight:700;letter-spacing:.04em;text-transform:uppercase;
color:var(--muted)}
.meta{color:var(--muted);margin:0 0 1rem}
nav ol{columns:2;margin:.25rem 0 0;padding-left:1.5rem}
nav h2{font-size:1rem;border:0;margin:1rem 0 0;padding:0}
.caution{background-color:var(--review-bg);color:var(--ink);border-left:6px solid var(--review);
padding:.25rem 1rem;margin-top:1.5rem}
.caution h2{border:0;margin-top:.75rem;padding-top:0}
.figures{display:grid;grid-template-columns:repeat(auto-fill,minmax(8.5rem,1fr));gap:.75rem;
margin:0}
.figures div{background-color:var(--panel);color:var(--ink);padding:.6rem .8rem;
border:1px solid var(--line)}
.figures dt{font-size:.9rem;color:var(--muted)}
.figures dd{margin:0;font-size:1.6rem;font-weight:700}
dl.scope div,dl.cause div{display:grid;grid-template-columns:11rem 1fr;gap:1rem;
padding:.3rem 0;border-bottom:1px solid var(--line)}
dl.scope dt,dl.cause dt{font-weight:700}
dl.scope dd,dl.cause dd{margin:0;overflow-wrap:anywhere}
table{border-collapse:collapse;width:100%;margin:1rem 0;font-size:.95rem}
caption{text-align:left;font-weight:700;padding:.25rem 0;color:var(--ink)}
th,td{text-align:left;vertical-align:top;padding:.35rem .5rem;border-bottom:1px solid var(--line);
overflow-wrap:break-word}
td.num,th.num{text-align:right;font-variant-numeric:tabular-nums;white-space:nowrap}
thead th{border-bottom:2px solid var(--ink)}
tbody th{font-weight:600}
.status{display:inline-block;padding:0 .4rem;font-weight:700;border:1px solid currentColor;
white-space:nowrap}
.status.fail{color:var(--fail);background-color:var(--fail-bg)}
.status.pass{color:var(--pass);background-color:var(--pass-bg)}
.status.review{color:var(--review);background-color:var(--review-bg)}
.status.none{color:var(--none);background-color:var(--none-bg)}
.columns{columns:2}
details{margin:.5rem 0}
summary{cursor:pointer;color:var(--link)}
figure{margin:1.25rem 0}
figcaption{color:var(--muted);font-size:.95rem}
.chart{width:100%;height:auto;display:block}
.chart text{fill:var(--ink);font:13px system-ui,sans-serif}
.chart .axis{stroke:var(--ink);stroke-width:1}
.chart .rule{stroke:var(--ink);stroke-width:1.5}
.chart .bar{fill:var(--bar)}
.chart .bar-low{fill:var(--low)}
.chart .hatch{stroke:var(--hatch)}
.problem{border:1px solid var(--line);border-left:6px solid var(--fail);padding:.25rem 1rem;
margin:1.25rem 0;background-color:var(--bg)}
.problem h3{margin-top:.75rem;overflow-wrap:anywhere}
.facts{margin:.25rem 0}
.sev{font-weight:700;color:var(--fail)}
.pictures{width:auto}
.pictures img{display:block;max-width:100%;height:auto;border:1px solid var(--line)}
.pictures .ratio{display:block;font-size:.85rem;color:var(--muted)}
.occurrences td:nth-child(3){max-width:18rem}
footer{margin-top:3rem;padding-top:1rem;border-top:2px solid var(--line);color:var(--muted);
font-size:.9rem}
@page{margin:16mm 14mm}
@media print{
:root{--bg:#ffffff;--ink:#000000;--muted:#333333;--line:#777777;--panel:#f2f2f2;--link:#000000;
--bar:#3b5b8f;--low:#a3401a;--hatch:#ffffff;--fail:#8f1d13;--fail-bg:#ffffff;--pass:#155a2f;
--pass-bg:#ffffff;--review:#6b4300;--review-bg:#ffffff;--none:#333333;--none-bg:#ffffff}
body{max-width:none;padding:0;font-size:10.5pt}
nav,details summary{display:none}
details>*{display:block}
h2{break-after:avoid}
h3{break-after:avoid}
.problem,figure,tr,.caution,.figures div,dl div{break-inside:avoid}
a{text-decoration:none}
}
"""


def schemes_of(p) -> str:
    """``scheme slate`` or ``schemes default (1.68:1), slate (1.68:1)``: a problem spans the
    schemes where its cause fails (problems.Problem.schemes)."""
    figures = getattr(p, "schemes", None) or {}
    if len(figures) <= 1:
        return f"scheme {e(p.scheme)}"
    return "schemes " + ", ".join(f"{e(name)} ({m.ratio(f.worst_ratio)}:1)"
                                  for name, f in figures.items())
