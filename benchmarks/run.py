#!/usr/bin/env python3
"""Side-by-side speed and memory benchmark: MkDocs build vs. tinctura check.

    python benchmarks/run.py [--pages 1000] [--jobs N] [--small 200] [--repeat 1]

For each site size, in one run on the same machine state, this times:

  build         mkdocs build of a generated mkdocs-material site (plugins: [search])
  build+plugin  the same site with plugins: [search, tinctura]
  check-1       tinctura check SITE --jobs 1 --format json --output FILE   (one core)
  check-N       the same with --jobs N
  parse-only    lxml HTML parse of every built HTML file + tinycss2 parse of the stylesheets

and prints wall and CPU times, pages per second, peak memory, and the ratios the project
targets. Absolute times move a lot on a shared machine; the ratios, measured side by side,
are what to compare between runs. A failing step prints the tail of its stderr and the run
goes on. Results also go to benchmarks/out/bench-<time>.json and benchmarks/out/latest.json.

Memory: "peak RSS" is the command's maximum resident set size as GNU time (/usr/bin/time)
reports it (with worker processes: the largest single process); "tree" is the peak of the
summed PSS of the command and all its descendants, sampled every 0.1 s, which is what
--jobs N really costs (PSS counts pages shared after fork() once).
"""
from __future__ import annotations

import argparse
import json
import os
import platform
import shutil
import signal
import statistics
import subprocess
import sys
import threading
import time
from pathlib import Path

HERE = Path(__file__).resolve().parent
REPO = HERE.parent
DEFAULT_OUT = HERE / "out"

# Targets printed next to the measured numbers. "flat" memory is read as: the one-core check's
# peak RSS grows by at most FLAT_GROWTH from the first fifth of a site's pages to all of them
# (the same pages, so the same page size; between generated sites of different sizes the pages
# themselves grow, since the navigation lists every page).
TARGET_CHECK_OVER_BUILD = 0.5
AIM_CHECK_OVER_BUILD = 0.25
TARGET_PLUGIN_OVERHEAD = 0.3  # issue 17: the plugin adds at most 30 %
TARGET_CHECK_OVER_PARSE = 4.0
TARGET_PEAK_MB = 300.0
FLAT_GROWTH = 0.20

STEP_LABELS = {
    "build": "mkdocs build",
    "build_plugin": "mkdocs build +tinctura",
    "check_1": "tinctura check --jobs 1",
    "check_n": "tinctura check --jobs {n}",
    "parse_only": "parse-only (lxml+tinycss2)",
    "check_part": "tinctura check, 1/5 of pages",
    "check_page": "tinctura check --group page",
}


# --------------------------------------------------------------------------- measuring

def _children(pid: int) -> list[int]:
    kids = []
    try:
        for tid in os.listdir(f"/proc/{pid}/task"):
            try:
                with open(f"/proc/{pid}/task/{tid}/children") as fh:
                    kids.extend(int(x) for x in fh.read().split())
            except OSError:
                pass
    except OSError:
        pass
    return kids


def _pss_kb(pid: int) -> int:
    """PSS of one process in kB (RSS where smaps_rollup is unavailable); 0 once it is gone."""
    for path, key in ((f"/proc/{pid}/smaps_rollup", "Pss:"), (f"/proc/{pid}/status", "VmRSS:")):
        try:
            with open(path) as fh:
                for line in fh:
                    if line.startswith(key):
                        return int(line.split()[1])
        except OSError:
            continue
    return 0


class TreeSampler(threading.Thread):
    """Samples the summed PSS of a process tree; PSS so forked workers' shared pages count once."""

    def __init__(self, pid: int, interval: float = 0.1):
        super().__init__(daemon=True)
        self.pid, self.interval = pid, interval
        self.peak_kb = 0
        self.max_procs = 0
        self._halt = threading.Event()

    def run(self):
        while not self._halt.is_set():
            pids, todo = set(), [self.pid]
            while todo:
                p = todo.pop()
                if p not in pids:
                    pids.add(p)
                    todo.extend(_children(p))
            total = sum(_pss_kb(p) for p in pids)
            self.peak_kb = max(self.peak_kb, total)
            self.max_procs = max(self.max_procs, len(pids))
            self._halt.wait(self.interval)

    def stop(self):
        self._halt.set()
        self.join(timeout=2)


GNU_TIME = "/usr/bin/time"


def _gnu_time_works() -> bool:
    try:
        r = subprocess.run([GNU_TIME, "-f", "%M", "true"], capture_output=True, text=True,
                           timeout=10)
        return r.returncode == 0 and r.stderr.strip().isdigit()
    except (OSError, subprocess.SubprocessError):
        return False


USE_GNU_TIME = os.path.exists(GNU_TIME) and _gnu_time_works()


def run_measured(name: str, argv: list[str], cwd: Path, logdir: Path, timeout: float,
                 env: dict) -> dict:
    """Run argv and measure it; never raises on a failing command.

    Peak RSS comes from GNU time's %M where available: Linux carries a process's RSS
    high-water mark across exec(), and subprocess starts children with vfork(), so the
    rusage of a direct child would report this (large) benchmark process's own peak.
    GNU time is small and fork()s the real command, so %M is the command's own peak.
    """
    logdir.mkdir(parents=True, exist_ok=True)
    out_path, err_path = logdir / f"{name}.stdout", logdir / f"{name}.stderr"
    time_path = logdir / f"{name}.maxrss"
    result = {"argv": argv, "cwd": str(cwd), "ok": False, "returncode": None}
    full = ([GNU_TIME, "-f", "%M", "-o", str(time_path)] + argv) if USE_GNU_TIME else argv
    with open(out_path, "wb") as out, open(err_path, "wb") as err:
        t0 = time.perf_counter()
        try:
            proc = subprocess.Popen(full, cwd=cwd, stdout=out, stderr=err, env=env,
                                    start_new_session=True)
        except OSError as exc:
            result["error"] = str(exc)
            return result
        sampler = TreeSampler(proc.pid)
        sampler.start()
        timed_out = threading.Event()

        def kill_group():
            timed_out.set()
            try:
                os.killpg(proc.pid, signal.SIGKILL)  # the group this run started, by its id
            except OSError:
                pass

        timer = threading.Timer(timeout, kill_group)
        timer.start()
        _pid, status, usage = os.wait4(proc.pid, 0)
        wall = time.perf_counter() - t0
        timer.cancel()
        sampler.stop()
        proc.returncode = os.waitstatus_to_exitcode(status)  # tell Popen it is reaped
    peak_kb = None
    if USE_GNU_TIME:
        try:  # the last line: time writes "Command exited with non-zero status" first
            peak_kb = int(time_path.read_text().split()[-1])
        except (OSError, ValueError, IndexError):
            peak_kb = None
    result.update(
        returncode=proc.returncode,
        wall_s=wall,
        cpu_s=usage.ru_utime + usage.ru_stime,  # includes the reaped workers
        peak_rss_mb=(peak_kb if peak_kb is not None else usage.ru_maxrss) / 1024.0,
        peak_rss_source="gnu-time" if peak_kb is not None else "wait4 (may include parent)",
        tree_peak_mb=sampler.peak_kb / 1024.0,
        max_procs=sampler.max_procs,
        timed_out=timed_out.is_set(),
        stdout_log=str(out_path),
        stderr_log=str(err_path),
    )
    return result


def tail(path: str | Path, lines: int = 12) -> str:
    try:
        text = Path(path).read_text(encoding="utf-8", errors="replace")
    except OSError:
        return ""
    return "\n".join(text.rstrip().splitlines()[-lines:])


# --------------------------------------------------------------------------- parse-only mode

def parse_only(site: Path) -> dict:
    """The floor no check can go below: parse every page and every stylesheet once."""
    t0 = time.perf_counter()
    import lxml.etree
    import tinycss2
    t_import = time.perf_counter() - t0
    # the parser and settings tinctura parses pages with
    parser = lxml.etree.HTMLParser(remove_comments=False, collect_ids=False, huge_tree=True)

    html_files = sorted(site.rglob("*.html"))
    t1 = time.perf_counter()
    html_bytes = 0
    elements = 0
    for path in html_files:
        data = path.read_bytes()
        html_bytes += len(data)
        root = lxml.etree.fromstring(data, parser=parser)
        elements += 1 if root is not None else 0
    t_html = time.perf_counter() - t1

    t2 = time.perf_counter()
    css_files = sorted(p for p in site.rglob("*.css"))
    declarations = 0

    def walk(rules):
        nonlocal declarations
        for rule in rules:
            if rule.type == "qualified-rule":
                declarations += sum(1 for d in tinycss2.parse_blocks_contents(
                    rule.content, skip_comments=True, skip_whitespace=True)
                    if d.type == "declaration")
            elif rule.type == "at-rule" and rule.content is not None:
                walk(tinycss2.parse_blocks_contents(rule.content, skip_comments=True,
                                                    skip_whitespace=True))

    for path in css_files:
        rules, _enc = tinycss2.parse_stylesheet_bytes(path.read_bytes(), skip_comments=True,
                                                      skip_whitespace=True)
        walk(rules)
    t_css = time.perf_counter() - t2
    return {"html_files": len(html_files), "html_bytes": html_bytes, "parsed": elements,
            "css_files": len(css_files), "css_declarations": declarations,
            "import_s": t_import, "html_s": t_html, "css_s": t_css}


# --------------------------------------------------------------------------- site facts

def site_stats(site: Path, sample: int = 40) -> dict:
    """HTML size per page, and elements / text-bearing elements per page on an even sample."""
    import lxml.html

    pages = sorted(p for p in site.rglob("*.html") if p.name != "404.html")
    if not pages:
        return {"html_files": 0}
    total_bytes = sum(p.stat().st_size for p in pages)
    step = max(1, len(pages) // sample)
    picked = pages[::step][:sample]
    elems, texts, body_texts = [], [], []
    for p in picked:
        root = lxml.html.document_fromstring(p.read_bytes())
        n_el = n_txt = 0
        for el in root.iter():
            if not isinstance(el.tag, str):
                continue
            n_el += 1
            own = (el.text or "").strip() or any((c.tail or "").strip() for c in el)
            if own and el.tag not in ("script", "style", "title"):
                n_txt += 1
        # the page's own content: mkdocs-material's <article>, MkDocs' theme's role=main column
        article = root.find(".//article")
        if article is None:
            article = root.find(".//*[@role='main']")
        n_article = 0
        if article is not None:
            for el in article.iter():
                if isinstance(el.tag, str) and ((el.text or "").strip()
                                                or any((c.tail or "").strip() for c in el)):
                    n_article += 1
        elems.append(n_el)
        texts.append(n_txt)
        body_texts.append(n_article)
    return {
        "html_files": len(pages) + (1 if (site / "404.html").exists() else 0),
        "html_bytes_per_page": total_bytes / len(pages),
        "elements_per_page": statistics.mean(elems),
        "text_elements_per_page": statistics.mean(texts),
        "content_text_elements_per_page": statistics.mean(body_texts),
        "sampled_pages": len(picked),
    }


# --------------------------------------------------------------------------- the run

def versions(python: str) -> dict:
    code = ("import json,importlib.metadata as m\nout={}\n"
            "for n in ['mkdocs','mkdocs-material','pymdown-extensions','lxml','tinycss2',"
            "'cssselect2','numpy','colour-science','tinctura']:\n"
            "    try: out[n]=m.version(n)\n"
            "    except Exception: out[n]=None\nprint(json.dumps(out))")
    try:
        return json.loads(subprocess.run([python, "-c", code], capture_output=True, text=True,
                                         timeout=60).stdout)
    except Exception:  # noqa: BLE001 - versions are informative only
        return {}


def read_json(path: Path):
    try:
        return json.loads(path.read_text(encoding="utf-8"))
    except (OSError, ValueError):
        return None


def count_findings(data):
    """Count findings in the check's JSON report, whatever its exact shape turns out to be."""
    if isinstance(data, list):
        return len(data)
    if isinstance(data, dict):
        summary = data.get("summary")
        if isinstance(summary, dict) and isinstance(summary.get("findings"), int):
            return summary["findings"]
        for key in ("findings", "results", "issues"):
            if isinstance(data.get(key), list):
                return len(data[key])
        summary = data.get("summary")
        if isinstance(summary, dict):
            for key in ("findings", "total"):
                if isinstance(summary.get(key), int):
                    return summary[key]
    return None


def bench_size(n_pages: int, args, env: dict, steps: list[str], variant: str = "baseline") -> dict:
    sys.path.insert(0, str(HERE))
    from generate_site import generate

    base = args.out / "sites" / (f"p{n_pages}" if variant == "baseline" else
                                 f"{variant}-p{n_pages}")
    logdir = base / "logs"
    py = sys.executable
    print(f"\n== {variant}, {n_pages} pages: generating into {base}", flush=True)
    t0 = time.perf_counter()
    generate(n_pages, base, seed=args.seed, plugin=False, accent=args.accent, variant=variant)
    gen_s = time.perf_counter() - t0

    site = base / "site-plain"
    commands = {
        "build": [py, "-m", "mkdocs", "build", "-q", "-f", "mkdocs-plain.yml", "-d", "site-plain"],
        "build_plugin": [py, "-m", "mkdocs", "build", "-q", "-f", "mkdocs-plugin.yml", "-d",
                         "site-plugin"],
        "check_1": [py, "-m", "tinctura", "check", str(site), "--jobs", "1", "--format", "json",
                    "--output", str(base / "check-1.json")],
        "check_n": [py, "-m", "tinctura", "check", str(site), "--jobs", str(args.jobs),
                    "--format", "json", "--output", str(base / f"check-{args.jobs}.json")],
        "parse_only": [py, str(Path(__file__).resolve()), "--parse-only", str(site)],
        "check_part": [py, "-m", "tinctura", "check", str(base / "site-part"), "--jobs", "1",
                       "--format", "json", "--output", str(base / "check-part.json")],
        # (the README's demo command: the text report by page, with --jobs N; opt-in step)
        "check_page": [py, "-m", "tinctura", "check", str(site), "--jobs", str(args.jobs),
                       "--group", "page", "--color", "never", "--output",
                       str(base / "check-page.txt")],
    }
    order = list(steps)
    if "build" not in steps and not site.exists():
        print("   (no build step and no earlier site-plain: the checks will fail)")

    outputs = {"check_1": base / "check-1.json", "check_n": base / f"check-{args.jobs}.json",
               "check_part": base / "check-part.json"}
    runs: dict[str, list[dict]] = {s: [] for s in order if not (s == "check_n" and args.jobs == 1)}
    for rep in range(args.repeat):
        # The build stays first; the other steps rotate so none always runs on a warmer machine.
        head = [s for s in runs if s == "build"]
        rest = [s for s in runs if s != "build"]
        k = rep % max(1, len(rest))
        for step in head + rest[k:] + rest[:k]:
            if step in outputs and outputs[step].exists():
                outputs[step].unlink()  # a stale report must not pass for a fresh one
            if step == "check_part":
                part_site(site, base / "site-part")
            label = STEP_LABELS[step].format(n=args.jobs)
            print(f"   {label:<30} ...", end="", flush=True)
            r = run_measured(f"{step}-r{rep}", commands[step], base, logdir, args.timeout, env)
            r["ok"] = r.get("returncode") == 0 and not r.get("timed_out")
            if step in outputs:
                # A linter may exit non-zero because it found something: judge by its report.
                data = read_json(outputs[step])
                r["report_ok"] = data is not None
                r["findings"] = count_findings(data)
                r["report_mb"] = outputs[step].stat().st_size / 1e6 if data is not None else None
                r["ok"] = (not r.get("timed_out")) and data is not None and \
                    (r.get("returncode") or 0) >= 0
            if step == "check_page":  # (exit 1 when it finds errors: judged by its report)
                text = base / "check-page.txt"
                r["ok"] = not r.get("timed_out") and text.exists() and \
                    (r.get("returncode") or 0) in (0, 1)
                r["text_mb"] = text.stat().st_size / 1e6 if text.exists() else None
            if step == "parse_only" and r["ok"]:
                r["detail"] = read_json(Path(r["stdout_log"]))
                r["ok"] = r["detail"] is not None
            runs[step].append(r)
            if r["ok"]:
                print(f" {r['wall_s']:8.2f} s", flush=True)
            else:
                why = "timed out" if r.get("timed_out") else f"exit {r.get('returncode')}"
                after = f" after {r['wall_s']:.2f} s" if "wall_s" in r else ""
                print(f" FAILED ({why}){after}", flush=True)
                t = tail(r.get("stderr_log", "")) or r.get("error", "")
                if t:
                    print("      | " + t.replace("\n", "\n      | "), flush=True)

    stats = site_stats(site) if site.exists() else {}
    return {"pages": n_pages, "variant": variant, "generate_s": gen_s, "site": stats,
            "runs": runs}


def part_site(site: Path, part: Path) -> int:
    """A copy of ``site`` (hard links) with every file but only the first fifth of its pages:
    the same pages, so the same page size, for "does memory grow with the number of pages?"."""
    if part.exists():
        shutil.rmtree(part)
    pages = sorted(p for p in site.rglob("*.html"))
    keep = set(pages[:max(1, len(pages) // 5)])
    for path in site.rglob("*"):
        if path.is_dir() or (path.suffix == ".html" and path not in keep):
            continue
        target = part / path.relative_to(site)
        target.parent.mkdir(parents=True, exist_ok=True)
        try:
            os.link(path, target)
        except OSError:
            shutil.copy2(path, target)
    return len(keep)


def summarise(step_runs: list[dict]) -> dict | None:
    good = [r for r in step_runs if r.get("ok")]
    if not good:
        return None
    med = lambda key: statistics.median(r[key] for r in good)  # noqa: E731
    out = {"wall_s": med("wall_s"), "cpu_s": med("cpu_s"),
           "peak_rss_mb": max(r["peak_rss_mb"] for r in good),
           "tree_peak_mb": max(r["tree_peak_mb"] for r in good), "n": len(good)}
    findings = [r.get("findings") for r in good if r.get("findings") is not None]
    if findings:
        out["findings"] = findings[-1]
    sizes = [r.get("report_mb") for r in good if r.get("report_mb") is not None]
    if sizes:
        out["report_mb"] = sizes[-1]
    texts = [r.get("text_mb") for r in good if r.get("text_mb") is not None]
    if texts:
        out["text_mb"] = texts[-1]
    return out


def verdict(value, limit, lower_is_better=True) -> str:
    if value is None:
        return "n/a"
    return "ok" if (value <= limit if lower_is_better else value >= limit) else "MISSED"


def fmt(v, spec=".2f", none="n/a"):
    return none if v is None else format(v, spec)


def report_size(res: dict, jobs: int) -> dict:
    n = res["pages"]
    s = {k: summarise(v) for k, v in res["runs"].items()}
    st = res.get("site", {})
    print(f"\n-- {res.get('variant', 'baseline')}, {n} pages: "
          f"{st.get('html_files', '?')} HTML files, "
          f"{fmt(st.get('html_bytes_per_page', 0) / 1024, '.0f')} KB/page, "
          f"{fmt(st.get('elements_per_page'), '.0f')} elements/page, "
          f"{fmt(st.get('text_elements_per_page'), '.0f')} text elements/page "
          f"({fmt(st.get('content_text_elements_per_page'), '.0f')} in the article)")
    print(f"   {'step':<30}{'wall s':>9}{'cpu s':>9}{'pages/s':>9}{'peak RSS MB':>13}"
          f"{'tree MB':>9}  note")
    for step in res["runs"]:
        label = STEP_LABELS[step].format(n=jobs)
        m = s.get(step)
        if m is None:
            print(f"   {label:<30}{'failed':>9}")
            continue
        note = ""
        if "findings" in m:
            note = f"{m['findings']} findings"
        if "report_mb" in m:
            note += f", JSON {m['report_mb']:.1f} MB"
        if m.get("text_mb") is not None:
            note = f"text {m['text_mb']:.1f} MB"
        if step == "parse_only":
            d = res["runs"][step][-1].get("detail", {})
            note = f"in-process: html {fmt(d.get('html_s'))} s, css {fmt(d.get('css_s'))} s"
        pages = max(1, n // 5) if step == "check_part" else n
        print(f"   {label:<30}{m['wall_s']:9.2f}{m['cpu_s']:9.2f}{pages / m['wall_s']:9.1f}"
              f"{m['peak_rss_mb']:13.1f}{m['tree_peak_mb']:9.1f}  {note}")

    def ratio(a, b, key="wall_s", minus_one=False):
        if s.get(a) is None or s.get(b) is None or not s[b][key]:
            return None
        r = s[a][key] / s[b][key]
        return r - 1 if minus_one else r

    def pct(v):
        return "n/a" if v is None else f"{v * 100:+.1f} %"

    def paired(a, b):
        """``a``'s wall time over ``b``'s, round by round (both measured in the same round, so
        the machine's drift between rounds cancels): (median, lowest, highest) or None."""
        pairs = zip(res["runs"].get(a) or [], res["runs"].get(b) or [])
        values = [x["wall_s"] / y["wall_s"] for x, y in pairs
                  if x.get("ok") and y.get("ok") and y.get("wall_s")]
        return (statistics.median(values), min(values), max(values)) if values else None

    check_build = ratio("check_1", "build")
    plugin_over = ratio("build_plugin", "build", minus_one=True)
    check_parse = ratio("check_1", "parse_only")
    cpu = {"check_over_build": ratio("check_1", "build", "cpu_s"),
           "plugin_overhead": ratio("build_plugin", "build", "cpu_s", minus_one=True),
           "check_over_parse": ratio("check_1", "parse_only", "cpu_s")}
    speedup = ratio("check_1", "check_n") if "check_n" in s else None
    peak = s["check_1"]["peak_rss_mb"] if s.get("check_1") else None
    print(f"   {'ratio':<34}{'wall':>10}{'cpu':>10}  target (judged on wall)")
    print(f"   {'check (1 core) / build':<34}{fmt(check_build):>10}"
          f"{fmt(cpu['check_over_build']):>10}  <= {TARGET_CHECK_OVER_BUILD} "
          f"(aim {AIM_CHECK_OVER_BUILD})  {verdict(check_build, TARGET_CHECK_OVER_BUILD)}")
    print(f"   {'plugin build / build - 1':<34}{pct(plugin_over):>10}"
          f"{pct(cpu['plugin_overhead']):>10}  <= +{TARGET_PLUGIN_OVERHEAD * 100:.0f} %  "
          f"{verdict(plugin_over, TARGET_PLUGIN_OVERHEAD)}")
    print(f"   {'check (1 core) / parse-only':<34}{fmt(check_parse):>10}"
          f"{fmt(cpu['check_over_parse']):>10}  <= {TARGET_CHECK_OVER_PARSE}  "
          f"{verdict(check_parse, TARGET_CHECK_OVER_PARSE)}")
    if "check_n" in res["runs"]:
        print(f"   {f'check speed-up with --jobs {jobs}':<34}{fmt(speedup):>10}{'':>10}  "
              "(information)")
    rounds = {"plugin_overhead": paired("build_plugin", "build"),
              "check_n_over_build": paired("check_n", "build"),
              "check_page_over_build": paired("check_page", "build")}
    if rounds["plugin_overhead"]:
        m, lo, hi = (v - 1 for v in rounds["plugin_overhead"])
        print(f"   {'plugin build / build - 1, rounds':<34}{pct(m):>10}{'':>10}  "
              f"(each round's own ratio: {lo * 100:+.0f} % to {hi * 100:+.0f} %)")
    if rounds["check_n_over_build"]:
        m, lo, hi = rounds["check_n_over_build"]
        print(f"   {f'check --jobs {jobs} / build, rounds':<34}{fmt(m):>10}{'':>10}  "
              f"(each round's own ratio: {lo:.2f} to {hi:.2f})")
    if rounds["check_page_over_build"]:
        m, lo, hi = rounds["check_page_over_build"]
        print(f"   {'check --group page / build, rounds':<34}{fmt(m):>10}{'':>10}  "
              f"(each round's own ratio: {lo:.2f} to {hi:.2f})")
    print(f"   {'check (1 core) peak RSS MB':<34}{fmt(peak, '.1f'):>10}{'':>10}  "
          f"< {TARGET_PEAK_MB:.0f}  {verdict(peak, TARGET_PEAK_MB)}")
    part = s["check_part"]["peak_rss_mb"] if s.get("check_part") else None
    growth = peak / part - 1 if peak and part else None
    if "check_part" in res["runs"]:
        print(f"   {'peak RSS, all pages / first fifth':<34}{pct(growth):>10}{'':>10}  "
              f"<= +{FLAT_GROWTH * 100:.0f} % (flat)  {verdict(growth, FLAT_GROWTH)}")
    return {"pages": n, "variant": res.get("variant", "baseline"), "site": st, "steps": s,
            "ratios": {
        "check_over_build": check_build, "plugin_overhead": plugin_over,
        "check_over_parse": check_parse, "jobs_speedup": speedup, "check_peak_rss_mb": peak,
        "part_peak_rss_mb": part, "memory_growth_with_pages": growth, "cpu": cpu,
        "rounds": rounds}}


def report_side_by_side(summaries: list[dict], jobs: int) -> None:
    """One line per variant and size: what the README's table quotes (its worst line)."""
    print("\n-- side by side (wall s; ratios to mkdocs build: of the medians, and the median of "
          "each round's own)")
    print(f"   {'variant':<10}{'pages':>6}{'build':>8}{'+plugin':>16}{'check 1 core':>20}"
          f"{f'--jobs {jobs}':>10}{'parse':>8}{'JSON MB':>9}{'findings':>10}{'peak MB':>9}"
          f"{'plugin/round':>14}{'jobs/round':>12}")
    for x in summaries:
        st, r = x["steps"], x["ratios"]

        def wall(step):
            return st[step]["wall_s"] if st.get(step) else None

        plugin = "n/a" if wall("build_plugin") is None else \
            f"{wall('build_plugin'):.1f} ({(r['plugin_overhead'] or 0) * 100:+.0f}%)"
        check = "n/a" if wall("check_1") is None else \
            f"{wall('check_1'):.1f} ({fmt(r['check_over_build'])}x)"
        c1 = st.get("check_1") or {}
        print(f"   {x.get('variant', 'baseline'):<10}{x['pages']:>6}{fmt(wall('build'), '.1f'):>8}"
              f"{plugin:>16}{check:>20}{fmt(wall('check_n'), '.1f'):>10}"
              f"{fmt(wall('parse_only'), '.1f'):>8}{fmt(c1.get('report_mb'), '.1f'):>9}"
              f"{c1.get('findings', 'n/a')!s:>10}{fmt(c1.get('peak_rss_mb'), '.0f'):>9}"
              f"{_round_cell(r, 'plugin_overhead', True):>14}"
              f"{_round_cell(r, 'check_n_over_build'):>12}")


def _round_cell(ratios: dict, key: str, overhead: bool = False) -> str:
    """A ratio taken round by round (``report_size``'s ``rounds``), for the side-by-side table."""
    got = (ratios.get("rounds") or {}).get(key)
    if not got:
        return "n/a"
    return f"{(got[0] - 1) * 100:+.0f}%" if overhead else f"{got[0]:.2f}x"


def report_memory(summaries: list[dict]) -> dict | None:
    summaries = [x for x in summaries if x.get("variant", "baseline") == "baseline"]
    pts = [(x["pages"], x["ratios"]["check_peak_rss_mb"]) for x in summaries
           if x["ratios"]["check_peak_rss_mb"] is not None]
    if len(pts) < 2:
        print("\n-- memory vs. site size: needs the one-core check at two sizes (not measured)")
        return None
    pts.sort()
    (n0, m0), (n1, m1) = pts[0], pts[-1]
    growth = m1 / m0 - 1
    per_k = (m1 - m0) / (n1 - n0) * 1000
    print("\n-- memory vs. site size (check --jobs 1, peak RSS; information: the pages of a "
          "larger generated site are larger too)")
    print("   " + ", ".join(f"{n} pages: {m:.1f} MB" for n, m in pts))
    print(f"   growth {n0} -> {n1} pages: {growth * 100:+.1f} % ({per_k:+.1f} MB per 1000 pages)")
    return {"points": pts, "growth": growth, "mb_per_1000_pages": per_k}


def compile_installed(python: str) -> None:
    """Write current bytecode for the tinctura that ``python`` imports, as installing a
    package does. An editable install is never compiled, and where PYTHONDONTWRITEBYTECODE is
    set (as on our CI machines) every measured run would compile the modules changed since
    their last bytecode, a run that imports more of them (every rule) more: about 0.14 s of
    CPU for the whole package, a few per cent of a 200-page check."""
    code = ("import compileall, tinctura, tinctura.rules, tinctura.plugin\n"
            "for m in (tinctura, tinctura.rules, tinctura.plugin):\n"
            "    for p in m.__path__: compileall.compile_dir(p, quiet=1)")
    subprocess.run([python, "-c", code], capture_output=True, check=False)


def main(argv=None) -> int:
    ap = argparse.ArgumentParser(description="MkDocs build vs. tinctura check, side by side.")
    ap.add_argument("--parse-only", type=Path, metavar="SITE", help=argparse.SUPPRESS)
    ap.add_argument("--pages", default="1000",
                    help="site size(s), comma-separated, e.g. 200,1000 (default 1000)")
    ap.add_argument("--jobs", type=int, default=os.cpu_count() or 2,
                    help="N for the parallel check (default: CPU count); 1 skips that step")
    ap.add_argument("--small", type=int, default=200,
                    help="also build a site of this size and run the one-core check on it, to "
                         "see whether memory grows with pages (0: off; skipped when --pages "
                         "already lists two sizes)")
    ap.add_argument("--repeat", type=int, default=1, help="repeat each step; medians are reported")
    ap.add_argument("--steps", default="build,build_plugin,check_1,check_n,parse_only,check_part",
                    help="comma-separated subset of the steps; check_page (the text report "
                         "by page, the README's demo command) is measured only when named")
    ap.add_argument("--seed", type=int, default=7)
    ap.add_argument("--variants", default="baseline",
                    help="comma-separated site shapes of generate_site.py (baseline, varied, "
                         "states, many; 'all' for every one), each measured at every size")
    ap.add_argument("--accent", default=None,
                    help="light-scheme accent of the generated site (default: the variant's); "
                         "'teal' makes every navigation link a hover/focus finding (N*N findings)")
    ap.add_argument("--timeout", type=float, default=1800, help="seconds per step")
    ap.add_argument("--out", type=Path, default=DEFAULT_OUT)
    args = ap.parse_args(argv)

    if args.parse_only:
        print(json.dumps(parse_only(args.parse_only)))
        return 0

    sizes = [int(x) for x in args.pages.split(",") if x.strip()]
    steps = [x.strip() for x in args.steps.split(",") if x.strip()]
    unknown = set(steps) - set(STEP_LABELS)
    if unknown:
        ap.error(f"unknown steps: {', '.join(sorted(unknown))}")
    sys.path.insert(0, str(HERE))
    from generate_site import VARIANTS

    variants = list(VARIANTS) if args.variants == "all" else \
        [v.strip() for v in args.variants.split(",") if v.strip()]
    if set(variants) - set(VARIANTS):
        ap.error(f"unknown variants: {', '.join(sorted(set(variants) - set(VARIANTS)))}")
    plan = [(n, steps, v) for n in sizes for v in variants]
    if args.small and len(set(sizes)) < 2 and args.small not in sizes:
        plan.insert(0, (args.small, [s for s in ("build", "check_1") if s in steps], variants[0]))

    args.out.mkdir(parents=True, exist_ok=True)
    env = dict(os.environ, NO_MKDOCS_2_WARNING="1", PYTHONUNBUFFERED="1")
    started = time.strftime("%Y-%m-%dT%H:%M:%S")
    load_before = os.getloadavg()
    print(f"tinctura benchmark, {started}, {os.cpu_count()} CPUs, load {load_before[0]:.2f}, "
          f"python {platform.python_version()} ({sys.executable})")
    info = versions(sys.executable)
    compile_installed(sys.executable)
    print("   " + ", ".join(f"{k} {v}" for k, v in info.items()))
    if info and info.get("tinctura") is None:
        print("   note: tinctura is not installed for this interpreter (pip install -e .); "
              "the plugin build and the checks will fail")

    results, summaries = [], []
    for n, st, variant in plan:
        res = bench_size(n, args, env, st, variant)
        results.append(res)
    print("\n================ results (median of runs; a loaded machine stretches wall time, "
          "CPU time less so)")
    for res in results:
        summaries.append(report_size(res, args.jobs))
    report_side_by_side(summaries, args.jobs)
    memory = report_memory(summaries)
    load_after = os.getloadavg()
    print(f"\nload average before {load_before[0]:.2f}, after {load_after[0]:.2f} "
          "(a busy machine stretches all steps; compare ratios, not seconds)")

    record = {"started": started, "cpus": os.cpu_count(), "python": sys.version,
              "versions": info, "args": {k: str(v) for k, v in vars(args).items()},
              "load_before": load_before, "load_after": load_after,
              "targets": {"check_over_build": TARGET_CHECK_OVER_BUILD,
                          "check_over_build_aim": AIM_CHECK_OVER_BUILD,
                          "plugin_overhead": TARGET_PLUGIN_OVERHEAD,
                          "check_over_parse": TARGET_CHECK_OVER_PARSE,
                          "peak_mb": TARGET_PEAK_MB, "flat_growth": FLAT_GROWTH},
              "sizes": summaries, "memory_vs_size": memory, "raw": results}
    stamp = time.strftime("%Y%m%d-%H%M%S")
    for name in (f"bench-{stamp}.json", "latest.json"):
        (args.out / name).write_text(json.dumps(record, indent=2, default=str), encoding="utf-8")
    print(f"results written to {args.out / ('bench-' + stamp + '.json')} (and latest.json)")
    return 0


if __name__ == "__main__":
    sys.exit(main())
