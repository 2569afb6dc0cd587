"""Share links, CSV downloads, printing and the prerendered answer, in
headless Chromium against the built site, checked against the engine run by
CPython here (the API and the command line).

Each fresh browser context boots Pyodide (seconds), so the tests reuse one
page for several checks: four page loads in all.
"""

from __future__ import annotations

import contextlib
import csv
import io
import json
import os
import re
import shutil
import subprocess
import sys
from pathlib import Path

import pytest
from playwright.sync_api import expect

ROOT = Path(__file__).resolve().parents[2]
DEMO = json.loads((ROOT / "site" / "demo-scenario.json").read_text(encoding="utf-8"))

CUTOFF_HEADER = ["table", "openings_left", "first", "last", "threshold", "action"]
COMPARISON_HEADER = ["rule", "description", "success_probability", "forced_last", "other", "none",
                     "expected_rank", "expected_score", "expected_interviews", "p_no_hire"]


# --- helpers ------------------------------------------------------------------------------------


def cpython(command: str, payload) -> dict:
    from seqpick import api

    reply = json.loads(api.call(command, json.dumps(payload)))
    assert reply["ok"], reply
    return reply["result"]


def cli(*args: str, stdin: str | None = None) -> str:
    """`python -m seqpick ARGS` from this checkout's pylib/; its standard output."""
    env = dict(os.environ, PYTHONPATH=str(ROOT / "pylib"))
    proc = subprocess.run([sys.executable, "-m", "seqpick", *args], input=stdin, capture_output=True,
                          text=True, env=env, cwd=ROOT, timeout=60)
    assert proc.returncode == 0, proc.stdout + proc.stderr
    return proc.stdout.strip()


def pct(p: float) -> str:
    return f"{p * 100:.1f}%"


def summary(page):
    return page.get_by_role("region", name="Plan summary")


def wait_live(page):
    """The engine is ready and the answer on screen is the live engine's, for the entries as they are."""
    expect(page.locator("html")).to_have_attribute("data-engine", "ready")
    expect(summary(page)).to_have_attribute("data-plan-source", "live")
    expect(summary(page)).not_to_have_class(re.compile(r"is-pending"))


def plan_scenario(page) -> dict:
    return page.evaluate("async () => (await import('./js/app.js')).getPlan().scenario")


def read_csv_download(page, button_name: str):
    with page.expect_download() as info:
        page.get_by_role("button", name=button_name).click()
    download = info.value
    raw = Path(download.path()).read_bytes()
    assert raw.startswith(b"\xef\xbb\xbf"), "the download starts with a UTF-8 byte order mark"
    text = raw[3:].decode("utf-8")
    assert_rfc4180_lines(text)
    return download.suggested_filename, list(csv.reader(io.StringIO(text, newline="")))


def assert_rfc4180_lines(text: str) -> None:
    assert text.endswith("\r\n")
    # Outside quoted fields every line break is CRLF.
    outside = re.sub(r'"(?:[^"]|"")*"', "", text)
    assert "\n" not in outside.replace("\r\n", "") and "\r" not in outside.replace("\r\n", "")


def num(cell: str):
    """A CSV cell as the number it holds (None when empty); never locale-formatted."""
    if cell == "":
        return None
    assert re.fullmatch(r"-?\d+(\.\d+)?(e[+-]?\d+)?", cell), f"not a plain number: {cell!r}"
    return float(cell)


def runs_to_list(rows, n: int) -> list:
    """Expand (first, last, value) runs back into a per-stage list of length n."""
    out = [None] * n
    for first, last, value in rows:
        for i in range(int(first), int(last) + 1):
            out[i - 1] = value
    return out


def close(a, b, tol: float = 1e-12) -> bool:
    """Equal, or (numbers) within tol relative: Pyodide's libm may differ from
    CPython's in the last bit, so the browser's and the CLI's answers can."""
    if isinstance(a, (int, float)) and isinstance(b, (int, float)):
        return abs(a - b) <= tol * max(1.0, abs(a), abs(b))
    return a == b


def pdf_page_count(data: bytes) -> int:
    return len(re.findall(rb"/Type\s*/Page(?![a-zA-Z])", data))


@contextlib.contextmanager
def guarded_page(browser, origin: str):
    """A page in a NEW context with the same guards as conftest's `page`:
    only the site's origin, no console or page errors, no HTTP errors."""
    context = browser.new_context(service_workers="allow")
    problems: list[str] = []

    def guard(route):
        if route.request.url.startswith(origin + "/"):
            route.continue_()
        else:
            problems.append(f"off-origin request {route.request.url}")
            route.abort()

    context.route("**/*", guard)
    context.on("console", lambda m: problems.append(f"console error: {m.text}") if m.type == "error" else None)
    context.on("response", lambda r: problems.append(f"HTTP {r.status} {r.url}") if r.status >= 400 else None)
    pg = context.new_page()
    pg.on("pageerror", lambda exc: problems.append(f"page error: {exc}"))
    pg.set_default_timeout(60_000)
    try:
        yield pg
    finally:
        context.close()
    assert problems == []


# The scenario typed into the form in the first test (CPython's canonical form).
TYPED = {
    "version": 1,
    "title": "Night desk = spring intake & co",
    "pool": {"size": 60},
    "goal": {"type": "top", "k": 3},
    "scores": None,
    "accept_probability": 0.8,
    "openings": 1,
    "cost_per_candidate": 0.001,
    "must_hire": True,
    "compare": [{"skip": 8}, {"skip_share": 0.5}, {"skip_share": 0.3}],
}


# --- 1. a plan built in the page: link, CLI, CSV, copy, and a new context ------------------------


def test_link_opens_the_same_plan_elsewhere_and_downloads_match_the_engine(page, site_server, browser):
    page.context.grant_permissions(["clipboard-read", "clipboard-write"], origin=site_server)
    page.goto(site_server + "/")
    entries = page.evaluate("() => history.length")
    expect(page.locator("html")).to_have_attribute("data-engine", "ready")

    page.get_by_label("Title").fill(TYPED["title"])
    page.get_by_label("Number of candidates").fill("60")
    page.get_by_label("Goal", exact=True).select_option("top")
    page.get_by_label("Size of the top group").fill("3")
    page.get_by_label("Chance an offer is accepted (%)").fill("80")
    page.get_by_label("Cost per candidate").fill("0.001")
    page.get_by_label("Must hire someone").check()
    page.get_by_role("group", name="Rule 1").get_by_label("Candidates to pass").fill("8")
    page.get_by_role("button", name="Add a rule").click()
    rule3 = page.get_by_role("group", name="Rule 3")
    rule3.get_by_label("Kind of rule").select_option("skip_share")
    rule3.get_by_label("Share to pass (%)").fill("30")

    canonical = cpython("validate", TYPED)
    result = cpython("solve", TYPED)
    expect(summary(page)).to_contain_text(pct(result["success_probability"]))
    wait_live(page)
    assert plan_scenario(page) == canonical

    # The fragment in the address bar is the one the command line makes.
    fragment = cli("link", stdin=json.dumps(TYPED))
    assert fragment.startswith("#v=1&")
    expect(page).to_have_url(site_server + "/" + fragment)
    assert page.evaluate("() => history.length") == entries, "replaceState: no history entries pile up"
    shown = summary(page).inner_text()

    # --- CSV: the cutoff table, numbers equal to the command line's solve.
    solved = json.loads(cli("solve", stdin=json.dumps(TYPED)))
    on_page = page.evaluate("async () => (await import('./js/app.js')).getPlan().result")
    name, rows = read_csv_download(page, "Download cutoff table (CSV)")
    assert name == "seqpick-cutoffs-night-desk-spring-intake-co.csv"
    assert rows[0] == CUTOFF_HEADER
    groups = solved["policy"]["groups"]
    assert len(rows) == 1 + len(groups)
    for row, g in zip(rows[1:], groups):
        assert row[0] == "relative rank" and num(row[1]) == 1
        assert (num(row[2]), num(row[3]), num(row[4])) == (g["first"], g["last"], g["threshold"])
        assert row[5]  # the action in words
    # The page's last table row says the same as the CSV's last record.
    last_row = page.locator("#sec-cutoffs tbody tr").last
    expect(last_row).to_contain_text(f"Stages {groups[-1]['first']}–{groups[-1]['last']}")
    expect(last_row).to_contain_text(rows[-1][5])

    # --- CSV: the comparison.
    name, rows = read_csv_download(page, "Download comparison (CSV)")
    assert name == "seqpick-comparison-night-desk-spring-intake-co.csv"
    assert rows[0] == COMPARISON_HEADER
    def numbers(r):
        return [r["success_probability"], r["outcome"]["forced_last"], r["outcome"]["other"],
                r["outcome"]["none"], r["expected_rank"], r["expected_score"], r["expected_interviews"],
                r["p_no_hire"]]

    expected_rows = [("Best rule (this plan)", solved["policy"]["words"], solved, on_page)]
    expected_rows += [(c["name"], c["description"], c, p) for c, p in zip(solved["compare"], on_page["compare"])]
    assert len(rows) == 1 + len(expected_rows)
    for row, (rule, description, r, mine) in zip(rows[1:], expected_rows):
        assert row[0] == rule and row[1] == description
        got = [num(x) for x in row[2:]]
        # Exactly the page's result JSON: full precision, no rounding, no locale.
        assert got == numbers(mine), rule
        # And the command line's answer (to the last bit or so).
        assert all(close(g, w) for g, w in zip(got, numbers(r))), (rule, got, numbers(r))

    # --- Copy link: the clipboard gets the address; then the fallback box.
    page.get_by_role("button", name="Copy link", exact=True).click()
    expect(page.locator(".share-message")).to_contain_text("Link copied")
    assert page.evaluate("() => navigator.clipboard.readText()") == page.url
    page.evaluate("() => { navigator.clipboard.writeText = () => Promise.reject(new Error('not allowed')); }")
    page.get_by_role("button", name="Copy link", exact=True).click()
    box = page.get_by_label("Link to this plan")
    expect(box).to_be_visible()
    expect(box).to_have_value(page.url)
    expect(box).to_have_attribute("readonly", "")
    expect(box).to_be_focused()
    assert page.evaluate("() => { const b = document.getElementById('share-url'); "
                         "return b.selectionStart === 0 && b.selectionEnd === b.value.length; }")
    expect(page.locator(".share-message")).to_contain_text(re.compile(r"Link copied|copy it with Ctrl\+C"))

    # --- the link in a NEW browser context: every field, the same numbers.
    with guarded_page(browser, site_server) as other:
        other.goto(page.url)
        wait_live(other)
        expect(other.get_by_label("Title")).to_have_value(TYPED["title"])
        expect(other.get_by_label("What you know about the count")).to_have_value("size")
        expect(other.get_by_label("Number of candidates")).to_have_value("60")
        expect(other.get_by_label("Goal", exact=True)).to_have_value("top")
        expect(other.get_by_label("Size of the top group")).to_have_value("3")
        expect(other.get_by_label("Candidate scores")).to_have_value("none")
        expect(other.get_by_label("Chance an offer is accepted (%)")).to_have_value("80")
        expect(other.get_by_label("Openings")).to_have_value("1")
        expect(other.get_by_label("Cost per candidate")).to_have_value("0.001")
        expect(other.get_by_label("Must hire someone")).to_be_checked()
        for n, kind, value in [(1, "skip", "8"), (2, "skip_share", "50"), (3, "skip_share", "30")]:
            rule = other.get_by_role("group", name=f"Rule {n}")
            expect(rule.get_by_label("Kind of rule")).to_have_value(kind)
            expect(rule.locator("input[type=text]")).to_have_value(value)
        expect(other.get_by_role("group", name="Rule 4")).to_have_count(0)
        expect(other.locator("#link-notice")).to_have_text("")
        assert plan_scenario(other) == canonical
        assert summary(other).inner_text() == shown
        expect(other).to_have_url(site_server + "/" + fragment)


def test_cutoff_csv_of_score_bars_openings_and_time_tables(page, site_server):
    """The other tables of the cutoff CSV, rebuilt into the engine's per-stage lists."""
    page.goto(site_server + "/", wait_until="domcontentloaded")
    scores = cpython("solve", {"pool": {"size": 8}, "goal": {"type": "score"}, "openings": 2,
                               "scores": {"distribution": "uniform", "low": 0, "high": 10}})
    window = cpython("solve", {"pool": {"window": 3, "arrivals_per_unit": 2, "unit": "day"}})
    texts = page.evaluate(
        "async (rs) => { const m = await import('./js/export.js'); return rs.map((r) => m.cutoffCsv(r)); }",
        [scores, window],
    )
    for text in texts:
        assert_rfc4180_lines(text)
    rows = list(csv.reader(io.StringIO(texts[0], newline="")))
    assert rows[0] == CUTOFF_HEADER
    policy = scores["policy"]
    for k in ("1", "2"):
        rank = [(r[2], r[3], num(r[4])) for r in rows[1:] if r[0] == "relative rank" and r[1] == k]
        bars = [(r[2], r[3], num(r[4])) for r in rows[1:] if r[0] == "score bar" and r[1] == k]
        assert runs_to_list(rank, 8) == policy["thresholds_by_openings_left"][k]
        assert runs_to_list(bars, 8) == policy["score_thresholds_by_openings_left"][k]
    rows = list(csv.reader(io.StringIO(texts[1], newline="")))
    times = {r[2]: num(r[4]) for r in rows[1:] if r[0] == "earliest time"}
    assert times == {k: v for k, v in window["policy"]["time_thresholds"].items()}
    assert all("days after the window opens" in r[5] or "day after" in r[5] for r in rows[1:] if r[0] == "earliest time")


# --- 2. bad links: a polite message, per-part fallback; hashchange --------------------------------


def test_bad_links_say_what_was_wrong_and_fall_back(page, site_server):
    held = []
    page.context.route("**/pyodide.asm.wasm", lambda route: held.append(route))
    page.goto(site_server + "/#v=1&pool=size:abc&cmp=skip:3")
    # While the engine boots: no demo numbers presented as the link's.
    expect(summary(page)).to_contain_text("Opening the shared plan…")
    expect(page.locator("#scenario-form")).to_have_attribute("aria-busy", "true")
    page.wait_for_timeout(1500)
    assert held, "the worker asked for the WebAssembly file"
    expect(summary(page)).not_to_contain_text("%")
    expect(summary(page)).not_to_have_attribute("data-plan-source", re.compile(".+"))
    expect(page.get_by_label("Number of candidates")).not_to_be_visible()
    for route in held:
        route.fallback()

    wait_live(page)
    notice = page.locator("#link-notice")
    expect(notice).to_contain_text("Part of this link could not be read")
    expect(notice).to_contain_text("Candidates (“pool=” in the link)")
    expect(notice).to_contain_text("'abc' is not a number")
    decoded = cpython("link_decode", "#v=1&pool=size:abc&cmp=skip:3")
    assert [w["field"] for w in decoded["warnings"]] == ["pool"]
    # The pool fell back to the default; the rest of the link was kept.
    expect(page.get_by_label("Number of candidates")).to_have_value(str(decoded["scenario"]["pool"]["size"]))
    expect(page.get_by_role("group", name="Rule 1").get_by_label("Candidates to pass")).to_have_value("3")
    expect(page.get_by_role("group", name="Rule 2")).to_have_count(0)
    result = cpython("solve", decoded["scenario"])
    expect(summary(page)).to_contain_text(pct(result["success_probability"]))
    expect(page).to_have_url(site_server + "/" + cli("link", stdin=json.dumps(decoded["scenario"])))

    notice.get_by_role("button", name="Dismiss the message about the link").click()
    expect(notice).to_have_text("")
    expect(page.get_by_role("button", name="Copy link", exact=True)).to_be_focused()

    # A link of an unknown version, pasted into the address bar.
    page.evaluate("() => { location.hash = '#v=7&pool=size:10&open=2'; }")
    expect(notice).to_contain_text("This link could not be read")
    expect(notice).to_contain_text("Version (“v=” in the link)")
    expect(notice).to_contain_text("'7' is not known")
    default = cpython("link_decode", "#v=7&pool=size:10")["scenario"]
    wait_live(page)
    expect(page.get_by_label("Number of candidates")).to_have_value(str(default["pool"]["size"]))
    expect(page.get_by_label("Openings")).to_have_value("1")
    expect(page.get_by_role("group", name="Rule 1")).to_have_count(0)

    # A good link pasted in: no message, its plan.
    page.evaluate("() => { location.hash = '#v=1&pool=size:100'; }")
    expect(summary(page)).to_contain_text("37.1%")  # N = 100: Gilbert & Mosteller 1966 (from memory)
    expect(notice).to_have_text("")
    expect(page.get_by_label("Number of candidates")).to_have_value("100")


# --- 3. the prerendered answer, the live engine taking over, and printing --------------------------


def test_prerendered_answer_first_then_live_engine_then_print(page, site_server, page_log):
    held = []
    page.context.route("**/pyodide.asm.wasm", lambda route: held.append(route))
    page.goto(site_server + "/")
    result = cpython("solve", DEMO)
    box = summary(page)
    expect(box).to_contain_text(pct(result["success_probability"]))
    expect(box).to_contain_text(result["policy"]["words"])
    expect(box).to_have_attribute("data-plan-source", "prerendered")
    page.wait_for_timeout(2000)
    assert held, "the worker asked for the WebAssembly file"
    expect(page.locator("html")).not_to_have_attribute("data-engine", "ready")
    expect(page.locator("#engine-status")).to_contain_text("Starting the solver")
    before = box.inner_text()
    assert page.evaluate("async () => (await import('./js/app.js')).getPlan().scenario") == DEMO

    for route in held:
        route.fallback()
    wait_live(page)
    ready_at = page.locator("html").get_attribute("data-engine-ready-at")
    assert float(ready_at) > 0
    assert box.inner_text() == before, "the live engine agrees with the prerendered answer"
    assert not [line for line in page_log.console if "differs from the live engine" in line]
    expect(page).to_have_url(site_server + "/" + cli("link", stdin=json.dumps(DEMO)))

    # --- print: a clean document of at most two pages for the demo.
    last_row = page.locator("#sec-cutoffs tbody tr").last.inner_text()
    page.emulate_media(media="print")
    expect(page.locator("#scenario-form")).to_be_hidden()
    expect(page.get_by_role("button", name="Print plan")).to_be_hidden()
    expect(page.locator("#print-head")).to_be_visible()
    pdf = page.pdf(format="A4")
    assert pdf.startswith(b"%PDF") and len(pdf) > 5_000
    assert 1 <= pdf_page_count(pdf) <= 2

    if shutil.which("pdftotext") is None:
        pytest.skip("pdftotext (poppler-utils) is not installed; build_scripts/test.py installs it")
    proc = subprocess.run(["pdftotext", "-layout", "-", "-"], input=pdf, capture_output=True, check=True)
    text = " ".join(proc.stdout.decode("utf-8").split())
    words = " ".join(last_row.split())
    assert words in text, (words, text[:2000])
    for piece in [DEMO["title"], pct(result["success_probability"]), "Decision support only",
                  "How the search ends", "Compared with simple rules", "Open this plan again"]:
        assert piece in text, piece
    for absent in ["Copy link", "Your search", "Print plan", "Solver ready"]:
        assert absent not in text, absent
    page.emulate_media(media="screen")
    expect(page.locator("#print-head")).to_be_hidden()
