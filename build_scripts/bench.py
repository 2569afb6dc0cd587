#!/usr/bin/env python3
"""Benchmark: CPython solve times per variant, growth ratios, browser timings.

    python3 build_scripts/bench.py            # CPython table + browser table
    python3 build_scripts/bench.py --no-browser
    python3 build_scripts/bench.py --quick    # smaller sizes, one browser run

Run on demand; never part of CI's pass/fail.  Prints one table per part,
with the targets beside the figures and a "meets" column.  Times are
medians of several runs (``--repeat``).

Browser part (headless Chromium via Playwright): cold time to the first real
answer on screen (the prerendered plan), cold time until the live engine
answers, a bare page that only boots Pyodide in a worker (the floor), a
repeat visit (service worker), and solve latency for N = 10^4 in the browser
beside CPython.
"""

from __future__ import annotations

import argparse
import json
import math
import os
import shutil
import statistics
import subprocess
import sys
import tempfile
import threading
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT / "pylib"))
sys.path.insert(0, str(ROOT / "build_scripts"))

from seqpick import solve  # noqa: E402
from seqpick.errors import ScenarioError  # noqa: E402


def variants(n: int) -> dict[str, dict]:
    """One scenario per variant at pool size n."""
    return {
        "classic (best)": {"pool": {"size": n}},
        "declines p=0.7": {"pool": {"size": n}, "accept_probability": 0.7},
        "openings 3": {"pool": {"size": n}, "openings": 3},
        "cost 0.0001": {"pool": {"size": n}, "cost_per_candidate": 0.0001},
        "uniform pool 1..n": {"pool": {"size_min": 1, "size_max": n}},
        "poisson pool mean n": {"pool": {"size_mean": n * 0.8}},
        "time window": {"pool": {"window": 1, "arrivals_per_unit": n * 0.8}},
        "odds theorem": {"pool": {"chances": [1.0 / k for k in range(1, n + 1)]}},
        "rank": {"pool": {"size": n}, "goal": {"type": "rank"}},
        "top-10": {"pool": {"size": n}, "goal": {"type": "top", "k": 10}},
        "scores best": {"pool": {"size": n},
                        "scores": {"distribution": "uniform", "low": 0, "high": 1}},
        "scores expected": {"pool": {"size": n}, "goal": {"type": "score"},
                            "scores": {"distribution": "normal", "mean": 50, "sd": 10}},
    }


LINEAR = {"classic (best)", "declines p=0.7", "openings 3", "cost 0.0001", "uniform pool 1..n",
          "poisson pool mean n", "time window", "odds theorem", "rank", "scores best",
          "scores expected"}


def time_solve(scenario: dict, repeat: int) -> float | str:
    times = []
    for _ in range(repeat):
        t = time.perf_counter()
        try:
            solve(scenario).to_dict()
        except ScenarioError as e:
            return f"refused ({e.field})"
        except Exception as e:  # a variant not built yet, or a bug: show it
            return f"error ({type(e).__name__})"
        times.append(time.perf_counter() - t)
    return statistics.median(times)


def fmt_s(x: float | str | None) -> str:
    if x is None:
        return "—"
    if isinstance(x, str):
        return x
    return f"{x * 1000:.1f} ms" if x < 1 else f"{x:.2f} s"


def cpython_table(sizes: list[int], repeat: int) -> dict:
    names = list(variants(10))
    results: dict[str, dict[int, float | str]] = {k: {} for k in names}
    for n in sizes:
        for name, sc in variants(n).items():
            results[name][n] = time_solve(sc, repeat if n <= 10_000 else 1)
    n6 = 1_000_000
    results["classic (best)"][n6] = time_solve({"pool": {"size": n6}}, repeat)
    all_sizes = sizes + [n6]
    head = ["variant"] + [f"N={n:.0e}".replace("+0", "") for n in all_sizes] + \
        ["max ratio/decade", "target"]
    rows = []
    for name in names:
        vals = results[name]
        ratios = []
        for a, b in zip(all_sizes, all_sizes[1:]):
            if isinstance(vals.get(a), float) and isinstance(vals.get(b), float) and \
                    vals[a] > 2e-4:
                # growth per decade: time(10N)/time(N), normalised when the
                # two sizes are more than one decade apart
                ratios.append((vals[b] / vals[a]) ** (1 / math.log10(b / a)))
        ratio = f"{max(ratios):.1f}" if ratios else "—"
        target = "≤12/decade" if name in LINEAR else "O(N·K²)"
        rows.append([name] + [fmt_s(vals.get(n)) for n in all_sizes] + [ratio, target])
    print_table("CPython solve time (median; to_dict included)", head, rows)
    return results


def simulation_ratio() -> None:
    import numpy as np
    n, trials = 100, 100_000
    t = time.perf_counter()
    res = solve({"pool": {"size": n}})
    exact = time.perf_counter() - t
    r = res.policy.skip
    t = time.perf_counter()
    rng = np.random.default_rng(1)
    won = 0
    for chunk in range(10):
        u = rng.random((trials // 10, n))
        best_first = u[:, :r].max(axis=1)
        later = u[:, r:] > best_first[:, None]
        has = later.any(axis=1)
        first = np.where(has, later.argmax(axis=1) + r, n - 1)
        won += int((has & (u[np.arange(len(u)), first] == u.max(axis=1))).sum())
    sim = time.perf_counter() - t
    print_table("Exact engine vs simulation (classic, N=100)", ["method", "time", "answer"], [
        ["exact (closed form)", fmt_s(exact), f"{res.success_probability:.6f}"],
        ["numpy simulation, 100,000 trials", fmt_s(sim),
         f"{won / trials:.6f} ± {math.sqrt(0.23 / trials):.4f}"],
        ["ratio simulation/exact", f"{sim / exact:.0f}×", ""],
    ])


def print_table(title: str, head: list[str], rows: list[list[str]]) -> None:
    widths = [max(len(str(r[i])) for r in [head] + rows) for i in range(len(head))]
    print(f"\n{title}")
    print("| " + " | ".join(h.ljust(w) for h, w in zip(head, widths)) + " |")
    print("|" + "|".join("-" * (w + 2) for w in widths) + "|")
    for r in rows:
        print("| " + " | ".join(str(c).ljust(w) for c, w in zip(r, widths)) + " |")


# ---------------------------------------------------------------- browser part

BARE_HTML = """<!doctype html><html><head><meta charset="utf-8"><title>bare</title>
<script type="module" src="bare.js"></script></head><body>bare</body></html>"""
BARE_JS = """const w = new Worker(new URL('./bare-worker.js', import.meta.url), {type: 'module'});
w.onmessage = (e) => { document.body.dataset.ready = String(e.data); };"""
BARE_WORKER = """import {loadPyodide} from './pyodide/pyodide.mjs';
const info = await (await fetch('./build-info.json')).json();
const py = await loadPyodide({indexURL: new URL('./pyodide/', import.meta.url).href,
  lockFileContents: {info: info.pyodide_lock_info, packages: {}}});
py.runPython('1+1');
postMessage(performance.timeOrigin + performance.now());"""


def _serve(directory: Path):
    from serve import SiteHandler  # type: ignore
    from http.server import ThreadingHTTPServer
    import functools
    handler = functools.partial(SiteHandler, directory=str(directory))
    httpd = ThreadingHTTPServer(("127.0.0.1", 0), handler)
    threading.Thread(target=httpd.serve_forever, daemon=True).start()
    return httpd, f"http://127.0.0.1:{httpd.server_address[1]}/"


def browser_table(runs: int) -> None:
    try:
        from playwright.sync_api import sync_playwright
    except ImportError:
        print("\n(browser part skipped: playwright is not installed)")
        return
    exe = os.environ.get("SEQPICK_CHROMIUM") or shutil.which("chromium")
    if not exe:
        print("\n(browser part skipped: no chromium found)")
        return
    subprocess.run([sys.executable, str(ROOT / "build_scripts" / "build.py"), "--quiet"],
                   check=True)
    tmp = Path(tempfile.mkdtemp(prefix="seqpick-bench-"))
    site = tmp / "site"
    shutil.copytree(ROOT / "dist" / "site", site)
    (site / "bare.html").write_text(BARE_HTML)
    (site / "bare.js").write_text(BARE_JS)
    (site / "bare-worker.js").write_text(BARE_WORKER)
    httpd, url = _serve(site)
    args = ["--host-resolver-rules=MAP * ~NOTFOUND, EXCLUDE 127.0.0.1"]
    if hasattr(os, "geteuid") and os.geteuid() == 0:
        args.append("--no-sandbox")
    solve_cases = dict(variants(10_000))
    solve_cases["classic (best) N=10⁶"] = {"pool": {"size": 1_000_000}}
    first, live, bare, repeat_visit = [], [], [], []
    phases: list[dict] = []
    in_browser: dict[str, list[tuple[float, float]]] = {k: [] for k in solve_cases}
    with sync_playwright() as p:
        browser = p.chromium.launch(executable_path=exe, args=args, headless=True)
        for _ in range(runs):
            ctx = browser.new_context()
            page = ctx.new_page()
            page.goto(url + "bare.html")
            page.wait_for_function("() => document.body.dataset.ready", timeout=120_000)
            bare.append(page.evaluate("Number(document.body.dataset.ready) - performance.timeOrigin") / 1000)
            ctx.close()
            ctx = browser.new_context()
            page = ctx.new_page()
            page.goto(url)
            # app.js marks the moment the prerendered answer is drawn.
            page.wait_for_function(
                "() => performance.getEntriesByName('seqpick:first-answer').length", timeout=60_000)
            first.append(page.evaluate(
                "performance.getEntriesByName('seqpick:first-answer')[0].startTime") / 1000)
            page.wait_for_function("() => document.documentElement.dataset.engine === 'ready'",
                                   timeout=120_000)
            live.append(float(page.evaluate("document.documentElement.dataset.engineReadyAt")) / 1000)
            phases.append(json.loads(page.evaluate("document.documentElement.dataset.enginePhases || '{}'")))
            # The page's own engine: round trip (page -> worker -> page) and
            # the time spent in Python, for each variant; the second of two
            # solves counts (the first also imports the solver's modules).
            got = page.evaluate("""async (cases) => {
                const {engine} = await import('./js/app.js');
                await engine.ready;
                const out = {};
                for (const [name, sc] of Object.entries(cases)) {
                  let trip = 0, py = 0;
                  for (let i = 0; i < 2; i++) {
                    const t = performance.now();
                    try {
                      const r = await engine.requestWithTiming('solve', {version: 1, ...sc},
                                                               {channel: 'bench'});
                      trip = performance.now() - t; py = r.ms;
                    } catch (e) { trip = -1; py = -1; }
                  }
                  out[name] = [trip / 1000, py / 1000];
                }
                return out; }""", solve_cases)
            for name, pair in got.items():
                if pair[0] >= 0:
                    in_browser[name].append(tuple(pair))
            page.reload()
            page.wait_for_function("() => document.documentElement.dataset.engine === 'ready'",
                                   timeout=60_000)
            repeat_visit.append(float(page.evaluate("document.documentElement.dataset.engineReadyAt"))
                                / 1000)
            ctx.close()
        browser.close()
    httpd.shutdown()
    med = statistics.median
    rows = [
        ["first real answer on screen (cold; prerendered)", fmt_s(med(first)), "≤ 0.5 s",
         "yes" if med(first) <= 0.5 else "no"],
        ["live engine answers (cold)", fmt_s(med(live)), "≤ 1.15 × bare",
         "yes" if med(live) <= 1.15 * med(bare) else "no"],
        ["bare Pyodide boot in a worker (floor)", fmt_s(med(bare)), "≈ 3 s", ""],
        ["ratio live / bare", f"{med(live) / med(bare):.2f}", "≤ 1.15",
         "yes" if med(live) <= 1.15 * med(bare) else "no"],
        ["repeat visit (service worker), engine ready", fmt_s(med(repeat_visit)), "≤ 2 s",
         "yes" if med(repeat_visit) <= 2 else "no"],
    ]
    if phases and all("python" in ph and "solver" in ph for ph in phases):
        rows += [
            ["  of which: worker start → Python running", fmt_s(med(ph["python"] for ph in phases) / 1000),
             "", ""],
            ["  of which: unpack + import the engine", fmt_s(med(ph["solver"] - ph["python"]
                                                              for ph in phases) / 1000), "", ""],
        ]
    print_table(f"Browser start-up (headless Chromium, median of {runs} cold runs; "
                f"single runs: first {fmt_list(first)}, live {fmt_list(live)}, "
                f"bare {fmt_list(bare)})",
                ["measure", "figure", "target", "meets"], rows)
    rows = []
    for name, sc in solve_cases.items():
        pairs = in_browser[name]
        cp = time_solve(sc, 3)
        if not pairs or not isinstance(cp, float):
            rows.append([name, "—", "—", fmt_s(cp), "—", "", ""])
            continue
        trip = med(p[0] for p in pairs)
        py = med(p[1] for p in pairs)
        if name.endswith("10⁶"):
            target, ok = "≤ 3 s", trip <= 3
        elif name == "top-10":
            target, ok = "≤ 0.5 s", trip <= 0.5
        else:
            target, ok = "≤ 50 ms", trip <= 0.05
        rows.append([name, fmt_s(trip), fmt_s(py), fmt_s(cp), f"{trip / cp:.1f}×", target,
                     "yes" if ok and trip / cp <= 3 else "no"])
    print_table("Solve latency in the browser, N=10⁴ unless named (round trip page→worker→page; "
                "Python time inside Pyodide; CPython; target for the round trip, and ≤ 3× CPython)",
                ["variant", "browser round trip", "in Pyodide", "CPython", "browser/CPython",
                 "target", "meets"], rows)


def fmt_list(xs: list[float]) -> str:
    return ", ".join(f"{x:.2f}" for x in xs) + " s"


def main() -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--no-browser", action="store_true", help="CPython part only")
    ap.add_argument("--no-cpython", action="store_true", help="browser part only")
    ap.add_argument("--quick", action="store_true")
    ap.add_argument("--repeat", type=int, default=3)
    ap.add_argument("--runs", type=int, default=5, help="cold browser runs")
    a = ap.parse_args()
    sizes = [100, 1000, 10_000] if a.quick else [100, 1000, 10_000, 100_000]
    print(f"Seqpick benchmark — Python {sys.version.split()[0]}, {os.cpu_count()} cores")
    if not a.no_cpython:
        cpython_table(sizes, a.repeat)
        simulation_ratio()
    if not a.no_browser:
        browser_table(1 if a.quick else a.runs)
    return 0


if __name__ == "__main__":
    sys.exit(main())
