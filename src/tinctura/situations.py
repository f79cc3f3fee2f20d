"""What findings share and what each occurrence adds.

A site with one faint accent colour produces the same finding on every navigation link of every
page: same rule, scheme, state, colours, font, causes. Everything a rule reads of a sample except
where it stands is its *situation*; a rule judges a situation once (rules judge one sample at a
time) and each further occurrence costs only its place: page, XPath, line, text excerpt and the
ancestor an inherited colour comes from.

``sample_key(sample)`` is the situation of a sample (hashable); ``finding_key(finding)`` that of
a finding (its rule and its sample's situation). ``place(finding)`` is what an occurrence adds,
and ``rebuild(template, place, page)`` turns a situation's template finding and a place back
into a full ``Finding`` (outputs that want every finding get them this way).
"""
from __future__ import annotations

import dataclasses
import operator

from .model import Cause, Finding, Layer, Sample

# Sample fields that say where a text stands, not what it looks like. A rule must not read them
# (rules judge colour situations; see DEVELOPERS.md "Rules").
POSITIONAL = ("page", "xpath", "line", "text")
_SPECIAL = ("fg_cause", "bg_layers")  # hold XPaths inside; keyed without them
_SHARED = tuple(f.name for f in dataclasses.fields(Sample)
                if f.name not in POSITIONAL and f.name not in _SPECIAL)
_shared = operator.attrgetter(*_SHARED)
_fields = operator.attrgetter(*(f.name for f in dataclasses.fields(Sample)))


def sample_key(s: Sample) -> tuple:
    """Everything rules can read of ``s``: equal keys get equal verdicts."""
    c = s.fg_cause
    cause = None if c is None else (c.declaration, c.chain, c.inherited_from is not None)
    layers = s.bg_layers
    if layers:
        layers = tuple((layer.kind, layer.colour, layer.cause) for layer in layers)
    return (_shared(s), cause, layers)


def finding_key(f: Finding) -> tuple:
    return (f.rule, sample_key(f.sample))


def place(f: Finding) -> tuple:
    """``(xpath, line, text, inherited_from[, layer xpaths])`` of one occurrence."""
    s = f.sample
    inherited = s.fg_cause.inherited_from if s.fg_cause is not None else None
    if s.bg_layers:
        return (s.xpath, s.line, s.text, inherited, tuple(layer.xpath for layer in s.bg_layers))
    return (s.xpath, s.line, s.text, inherited)


def rebuild(template: Finding, where: tuple, page: str) -> Finding:
    """The finding of ``template``'s situation at ``where`` on ``page``."""
    s = Sample(*_fields(template.sample))
    s.page = page
    s.xpath, s.line, s.text, inherited = where[:4]
    c = s.fg_cause
    if c is not None and c.inherited_from != inherited:
        s.fg_cause = Cause(c.declaration, inherited, c.chain)
    if len(where) > 4:
        s.bg_layers = tuple(Layer(x, layer.kind, layer.colour, layer.cause)
                            for x, layer in zip(where[4], s.bg_layers))
    return occurrence(template, s)


def occurrence(template: Finding, sample: Sample) -> Finding:
    """``template``'s verdict on another sample of the same situation (shares its fixes and
    arguments, which are never changed once made)."""
    t = template
    return Finding(t.rule, t.slug, t.severity, sample, t.ratio, t.required, t.level, t.fixes,
                   t.args)
