"""What the fixes' planning and verification check again after the pages (a faded text's
opacities, a verification page walked without the overrides keeping every sample) is
computed on the check's warm caches: the same answers as computed cold."""
import io
import json

import pytest

from tinctura import cli, engine
from tinctura.engine import Options, Site
from site_pages import write_pages

# Text #000000de inside an element at opacity 0.45 over white, seen as #9b9b9b (CSS Color 4
# compositing, by hand: 0.87 x 0.45 of black), fails 4.5:1; its fix raises the opacity.
CSS = ".dim { opacity: 0.45; } .note { color: #000000de; } nav a { color: #1b4d6b; }"


def _page(n: int) -> str:
    links = "".join(f'<li><a href="../p{k}/">Culvert {k}</a></li>' for k in range(6))
    return ('<!doctype html><html><head><link rel="stylesheet" href="../site.css"></head>'
            f'<body><nav><ul>{links}</ul></nav><div class="dim"><p class="note">Clear the '
            f'grate of culvert {n} after each flood</p></div><p>Log the water level.</p>'
            '</body></html>')


@pytest.fixture
def faded(tmp_path):
    return write_pages(tmp_path, CSS, _page, 6)


def _problems(site, jobs: str) -> list:
    out = io.StringIO()
    cli.main(["check", str(site), "--no-config", "--fail-on", "never", "--jobs", jobs,
              "--format", "json"], out, io.StringIO())
    return json.loads(out.getvalue())["problems"]


def test_faded_texts_layers_come_from_a_kept_worker_with_the_same_fix(faded, monkeypatch):
    if not engine.can_fork():
        pytest.skip("worker processes need fork")
    here = []  # (calls in this process only: a worker's go to its own copy)
    original = engine.opacity_layers
    monkeypatch.setattr(engine, "opacity_layers",
                        lambda *args: here.append(args[1:]) or original(*args))
    alone = _problems(faded, "1")
    assert here, "with one process the page is checked again here"
    here.clear()
    shared = _problems(faded, "2")
    assert here == []  # a worker of the check computed them
    assert shared == alone
    fixes = [p["fix"]["css"] for p in alone if "opacity" in p["sentence"]]
    assert fixes and all("opacity:" in css for css in fixes)


def _samples(site, rel):
    return [(s.scheme, s.state, s.xpath, s.fg, s.bg, s.fg_cause, s.bg_cause,
             [(layer.kind, layer.colour, layer.cause) for layer in s.bg_layers])
            for s in site.check_page(rel).samples]


def test_a_walk_keeping_every_sample_shares_the_computed_styles(faded, monkeypatch):
    """A Site keeping every sample's layers, on the loader of one that checked the page
    without them, computes no style again, and finds what a Site of its own finds."""
    from tinctura.extract.style import Resolver

    checked = Site(str(faded), Options(keep_samples=False))
    checked.check_page("p0/index.html")
    keeping = Site(str(faded), Options(keep_samples=True))
    keeping.loader = checked.loader
    computed = []
    compute = Resolver.compute
    monkeypatch.setattr(Resolver, "compute",
                        lambda self, *a, **k: computed.append(1) or compute(self, *a, **k))
    warm = _samples(keeping, "p0/index.html")
    assert computed == []
    caches = list(checked.loader.style_caches.values())[0]
    by_kind = {key[-1]: cache for key, cache in caches.items()}
    assert by_kind[True].styles is by_kind[False].styles
    assert by_kind[True].memo is not by_kind[False].memo  # (fragments are of their kind)
    assert warm == _samples(Site(str(faded), Options(keep_samples=True)), "p0/index.html")
    assert computed  # (a Site of its own computed them)


def test_the_plugins_worker_gives_a_faded_texts_layers_as_this_process(faded):
    """The MkDocs plugin's worker, its pages answered, checks a faded text's page again for
    the fix's opacities (``PagePool.caller``): what a Site of this process finds."""
    if not engine.can_fork():
        pytest.skip("worker processes need fork")
    options = Options(keep_samples=False)
    pool = engine.PagePool(str(faded), options, 1)
    try:
        for n in range(3):
            rel = f"p{n}/index.html"
            assert pool.submit(rel, (faded / rel).read_text())
        list(pool.results(keep=True))
        there = pool.caller()(engine.worker_opacity_layers, ("p1/index.html", "light"))
    finally:
        pool.close()
    here = engine.opacity_layers(Site(str(faded), Options(keep_samples=True)), "p1/index.html",
                                 "light")
    assert there == here and len(here) == 1  # the faded paragraph, at rest
    ((declaration, value),) = next(iter(here.values()))
    assert (declaration.selector, declaration.value, value) == (".dim", "0.45", 0.45)


def test_kinds_sharing_styles_stay_right_when_the_cache_is_emptied(faded, monkeypatch):
    """The styles both kinds of walk share are emptied when they outgrow their bound (one
    kind's clearing empties the other's shared part, its ids never given again): pages
    checked by turns, each kind finds what a Site of its own finds."""
    from tinctura.extract import samples as samples_mod

    monkeypatch.setattr(samples_mod, "CACHE_LIMIT", 5)
    plain = Site(str(faded), Options(keep_samples=False))
    keeping = Site(str(faded), Options(keep_samples=True))
    keeping.loader = plain.loader
    for n in (0, 1, 2, 1, 0):
        rel = f"p{n}/index.html"
        assert _samples(keeping, rel) == _samples(Site(str(faded), Options(keep_samples=True)),
                                                  rel)
        assert _samples(plain, rel) == _samples(Site(str(faded), Options(keep_samples=False)),
                                                rel)
