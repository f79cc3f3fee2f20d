"""Chromium as the reference engine: what a real browser computes for every rendered text.

Library and script::

    python tests/browser/chromium_reference.py SITE_DIR --out FILE.jsonl [--no-states] [--page GLOB]

Serves a built site on 127.0.0.1, opens each HTML page in headless Debian Chromium (selenium,
chromedriver) with page scripts disabled, so that the DOM is the static HTML the tool reads (a
theme's script would rewrap tables and drop the ``no-js`` class), applies each colour scheme the
page offers as the theme would, and records one sample per rendered text element with the
foreground and background pixels composited as the browser paints them (``collect.js``).
The JSONL format is documented in tests/browser/README.md.
"""
from __future__ import annotations

import argparse
import contextlib
import fnmatch
import functools
import http.server
import json
import os
import re
import shutil
import sys
import tempfile
import threading
from pathlib import Path

CHROMIUM = "/usr/bin/chromium"
CHROMEDRIVER = "/usr/bin/chromedriver"
# Without the networking switches Chromium keeps dialling out and stalls on a closed network.
CHROMIUM_ARGS = (
    "--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
    "--disable-background-networking", "--disable-component-update", "--disable-sync",
    # Nothing but the local server resolves: a page must never reach the internet.
    "--host-resolver-rules=MAP * ~NOTFOUND, EXCLUDE 127.0.0.1",
)
WINDOW = (1280, 900)
INTERACTIVE = "a, button, input, select, textarea"
STATES = ("hover", "focus")
# Transitions would let getComputedStyle report a colour half-way after a forced state or a
# scheme switch; the sheet is adopted (not inserted), so the DOM and the XPaths do not change.
NO_TRANSITIONS = "*, *::before, *::after { transition: none !important; animation: none !important; }"

COLLECT_JS = (Path(__file__).with_name("collect.js")).read_text(encoding="utf-8")


def browser_available() -> bool:
    return os.access(CHROMIUM, os.X_OK) and os.access(CHROMEDRIVER, os.X_OK)


# ---- serving ----------------------------------------------------------------------------------

class _QuietHandler(http.server.SimpleHTTPRequestHandler):
    def log_message(self, format, *args):  # noqa: A002 - signature of the base class
        pass


@contextlib.contextmanager
def serve(site_dir):
    """Serve ``site_dir`` on 127.0.0.1 at a free port; yields the base URL ending in '/'."""
    handler = functools.partial(_QuietHandler, directory=str(site_dir))
    server = http.server.ThreadingHTTPServer(("127.0.0.1", 0), handler)
    thread = threading.Thread(target=server.serve_forever, daemon=True)
    thread.start()
    try:
        yield f"http://127.0.0.1:{server.server_address[1]}/"
    finally:
        server.shutdown()
        server.server_close()
        thread.join(timeout=5)


# ---- browser ----------------------------------------------------------------------------------

@contextlib.contextmanager
def browser(window=WINDOW, scripts=False):
    """A headless Chromium driven by selenium, with a throw-away profile.

    Page scripts are off unless ``scripts`` (tests of what a theme's script changes)."""
    from selenium import webdriver
    from selenium.webdriver.chrome.service import Service

    profile = tempfile.mkdtemp(prefix="tinctura-chromium-")
    options = webdriver.ChromeOptions()
    options.binary_location = CHROMIUM
    for arg in CHROMIUM_ARGS:
        options.add_argument(arg)
    options.add_argument(f"--user-data-dir={profile}")
    options.add_argument(f"--window-size={window[0]},{window[1]}")
    # Page scripts off; selenium's own scripts still run through the DevTools protocol.
    if not scripts:
        options.add_experimental_option("prefs", {"profile.managed_default_content_settings.javascript": 2})
    driver = webdriver.Chrome(service=Service(CHROMEDRIVER), options=options)
    try:
        # A page rewritten between loads (tests) must not come from the cache.
        driver.execute_cdp_cmd("Network.enable", {})
        driver.execute_cdp_cmd("Network.setCacheDisabled", {"cacheDisabled": True})
        driver.execute_cdp_cmd("DOM.enable", {})
        driver.execute_cdp_cmd("CSS.enable", {})
        yield driver
    finally:
        driver.quit()
        shutil.rmtree(profile, ignore_errors=True)


def chromium_version(driver) -> str:
    return driver.capabilities.get("browserVersion", "unknown")


# ---- schemes ----------------------------------------------------------------------------------

# The XPaths, as lxml's getpath writes them (a position only among several siblings of the same
# tag), of the elements matching the CSS selector arguments[0]
_XPATHS_JS = """
const path = el => {
  const steps = [];
  for (; el && el.nodeType === 1; el = el.parentElement) {
    const tag = el.tagName.toLowerCase();
    const same = el.parentElement ? Array.from(el.parentElement.children)
      .filter(c => c.tagName === el.tagName) : [el];
    steps.unshift(same.length > 1 ? `${tag}[${same.indexOf(el) + 1}]` : tag);
  }
  return '/' + steps.join('/');
};
return Array.from(document.querySelectorAll(arguments[0])).map(path);
"""


def xpaths_of(driver, selector: str) -> list[str]:
    """The XPaths of the elements of the current page that match ``selector``."""
    return driver.execute_script(_XPATHS_JS, selector)


_DISCOVER_JS = """
const inputs = Array.from(document.querySelectorAll('input.md-option[data-md-color-scheme]'));
if (inputs.length) return {kind: 'material', entries: inputs.map(i => ({
  media: i.getAttribute('data-md-color-media') || '',
  scheme: i.getAttribute('data-md-color-scheme') || '',
  primary: i.getAttribute('data-md-color-primary') || '',
  accent: i.getAttribute('data-md-color-accent') || ''}))};
if (document.documentElement.hasAttribute('data-bs-theme') || document.querySelector('[data-bs-theme-value]'))
  return {kind: 'bootstrap', entries: []};
return {kind: 'media', entries: []};
"""

_PREFERS = re.compile(r"prefers-color-scheme\s*:\s*(light|dark)")


def discover_schemes(driver) -> list[dict]:
    """The schemes the loaded page offers.

    Each scheme: ``{"name", "media": {"prefers-color-scheme": ...} or {}, "attributes":
    [[selector, attribute, value], ...]}``.
    """
    found = driver.execute_script(_DISCOVER_JS)
    if found["kind"] == "material":
        return _material_schemes(found["entries"])
    if found["kind"] == "bootstrap":  # MkDocs' own theme
        return [{"name": v, "media": {"prefers-color-scheme": v}, "attributes": [["html", "data-bs-theme", v]]}
                for v in ("light", "dark")]
    return [{"name": v, "media": {"prefers-color-scheme": v}, "attributes": []} for v in ("light", "dark")]


def _material_schemes(entries) -> list[dict]:
    """The entries a reader can get, as mkdocs-material's palette script applies them.

    The script resolves an automatic entry (media ``(prefers-color-scheme)``) to the first entry
    whose media is ``(prefers-color-scheme: light)`` or ``: dark``, whichever matches the system
    (``tests/browser/test_theme_scripts.py`` checks this against the script itself); entries that
    set the same colours under the same preference are one scheme.
    """
    explicit, automatic = [], []
    for e in entries:
        m = _PREFERS.search(e["media"])
        key = (e["scheme"], e["primary"], e["accent"])
        if m:
            explicit.append((key, m.group(1), e))
        elif "prefers-color-scheme" in e["media"]:
            automatic.append((key, e))
        else:
            explicit.append((key, "dark" if e["scheme"] == "slate" else "light", e))
    covered = {pref for _, pref, _ in explicit}
    for key, e in automatic:
        explicit.extend((key, pref, e) for pref in ("light", "dark") if pref not in covered)
    unique = list({(key, pref): (key, pref, e) for key, pref, e in explicit}.values())
    schemes = []
    for key, pref, e in unique:
        full = key + (pref,)
        for width in (1, 2, 3, 4):
            if sum((k + (p,))[:width] == full[:width] for k, p, _ in unique) == 1:
                break
        name = "/".join(part for part in full[:width] if part)
        attributes = [["body", f"data-md-color-{k}", e[k]] for k in ("media", "scheme", "primary", "accent")]
        schemes.append({"name": name, "media": {"prefers-color-scheme": pref}, "attributes": attributes})
    return schemes


def apply_scheme(driver, scheme: dict) -> None:
    features = [{"name": k, "value": v} for k, v in scheme["media"].items()]
    driver.execute_cdp_cmd("Emulation.setEmulatedMedia", {"features": features})
    if scheme["attributes"]:
        driver.execute_script(
            "for (const [sel, attr, value] of arguments[0])"
            "  for (const el of document.querySelectorAll(sel)) el.setAttribute(attr, value);",
            scheme["attributes"])


# ---- collecting -------------------------------------------------------------------------------

def _prepare(driver) -> None:
    driver.execute_script(
        "const s = new CSSStyleSheet(); s.replaceSync(arguments[0]);"
        "document.adoptedStyleSheets = [...document.adoptedStyleSheets, s];", NO_TRANSITIONS)


def _key(sample: dict) -> tuple:
    return sample["xpath"], sample.get("pseudo", "")


def _forced_classes(state: str, chain: list[int]) -> dict[int, tuple]:
    """Pseudo-classes a real pointer or focus sets: ``chain`` is the control then its ancestors.

    Hovering an element hovers all its ancestors (Selectors 4, :hover); focus sets :focus on the
    element and :focus-within on its ancestors.
    """
    if state == "hover":
        return {node: ("hover",) for node in chain}
    if state == "focus":
        return {node: ("focus",) if i == 0 else ("focus-within",) for i, node in enumerate(chain)}
    return {chain[0]: (state,)}


class _Forcer:
    """Applies forced pseudo-classes incrementally: neighbours share most of their ancestors."""

    def __init__(self, driver):
        self.driver, self.current = driver, {}

    def set(self, wanted: dict) -> None:
        for node in [n for n in self.current if n not in wanted]:
            self._force(node, ())
        for node, classes in wanted.items():
            if self.current.get(node) != classes:
                self._force(node, classes)
        self.current = dict(wanted)

    def _force(self, node, classes) -> None:
        self.driver.execute_cdp_cmd("CSS.forcePseudoState", {"nodeId": node, "forcedPseudoClasses": list(classes)})


def _parents(node: dict, parent: int | None, out: dict) -> dict:
    out[node["nodeId"]] = parent
    for child in node.get("children", ()):
        if child.get("nodeType") == 1:
            _parents(child, node["nodeId"] if node.get("nodeType") == 1 else None, out)
    return out


def collect_current(driver, states=STATES) -> tuple[list[dict], dict]:
    """Samples of the page as currently displayed: rest, then each forced state of each control.

    A state sample is kept when its pixels or status differ from rest (or the text was not rendered
    at rest). States are forced as a user would cause them (see ``_forced_classes``).
    """
    rest = driver.execute_script(COLLECT_JS, {"root": None, "interactive": INTERACTIVE})
    samples = [dict(s, state="rest") for s in rest["samples"]]
    if not states or not rest["interactive"]:
        return samples, rest["skipped"]
    at_rest = {_key(s): (s.get("fg"), s.get("bg"), s["status"]) for s in rest["samples"]}
    document = driver.execute_cdp_cmd("DOM.getDocument", {"depth": -1})
    parent = _parents(document["root"], None, {})
    node_ids = driver.execute_cdp_cmd(
        "DOM.querySelectorAll", {"nodeId": document["root"]["nodeId"], "selector": INTERACTIVE})["nodeIds"]
    forcer = _Forcer(driver)
    try:
        for state in states:
            for index in rest["interactive"]:
                chain = [node_ids[index]]
                while parent.get(chain[-1]) is not None:
                    chain.append(parent[chain[-1]])
                forcer.set(_forced_classes(state, chain))
                got = driver.execute_script(COLLECT_JS, {"root": index, "interactive": INTERACTIVE})
                for s in got["samples"]:
                    if at_rest.get(_key(s)) != (s.get("fg"), s.get("bg"), s["status"]):
                        samples.append(dict(s, state=state))
    finally:
        forcer.set({})
    return samples, rest["skipped"]


def collect_page(driver, url: str, states=STATES, schemes=None):
    """Yield ``(scheme, samples, skipped)`` for each scheme of the page at ``url``."""
    driver.get(url)
    _prepare(driver)
    for scheme in schemes or discover_schemes(driver):
        apply_scheme(driver, scheme)
        samples, skipped = collect_current(driver, states)
        yield scheme, samples, skipped
    driver.execute_cdp_cmd("Emulation.setEmulatedMedia", {"features": []})


def site_pages(site_dir) -> list[str]:
    root = Path(site_dir)
    return sorted(p.relative_to(root).as_posix() for p in root.rglob("*.html"))


def run_site(site_dir, states=STATES, pattern: str | None = None, log=None):
    """Yield JSONL records for a whole built site: one ``meta``, then ``page`` and ``sample``."""
    pages = [p for p in site_pages(site_dir) if not pattern or fnmatch.fnmatch(p, pattern)]
    with serve(site_dir) as base, browser() as driver:
        source = f"chromium {chromium_version(driver)}"
        yield {"type": "meta", "source": source, "window": list(WINDOW), "states": list(states or ()),
               "page_scripts": False}
        for page in pages:
            if log:
                log(page)
            for scheme, samples, skipped in collect_page(driver, base + page, states):
                yield {"type": "page", "page": page, "scheme": scheme["name"], "media": scheme["media"],
                       "attributes": scheme["attributes"], "samples": len(samples), "skipped": skipped}
                for s in samples:
                    if "images" in s:  # the server's port is not part of the site
                        s["images"] = [i.replace(base, "/") for i in s["images"]]
                    yield dict({"type": "sample", "page": page, "scheme": scheme["name"]}, **s)


def main(argv=None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("site_dir", help="a built site (the directory mkdocs build writes)")
    parser.add_argument("--out", required=True, help="JSONL file to write")
    parser.add_argument("--no-states", action="store_true", help="skip forced :hover / :focus")
    parser.add_argument("--page", help="only pages matching this glob (site-relative)")
    args = parser.parse_args(argv)
    if not browser_available():
        print(f"needs {CHROMIUM} and {CHROMEDRIVER}", file=sys.stderr)
        return 2
    count = 0
    with open(args.out, "w", encoding="utf-8") as out:
        for record in run_site(args.site_dir, () if args.no_states else STATES, args.page,
                               log=lambda p: print(p, file=sys.stderr)):
            out.write(json.dumps(record, sort_keys=True) + "\n")
            count += record["type"] == "sample"
    print(f"{count} samples -> {args.out}", file=sys.stderr)
    return 0


if __name__ == "__main__":
    sys.exit(main())
