"""Accessibility in headless Chromium.

* axe-core (vendored for the tests only by build_scripts/build.py,
  vendor_for_tests(); never shipped) runs over the Plan view with its charts
  and every figures table open, an inline error, the Live search view with a
  search started and a candidate entered, and both views in dark mode: no
  violation of impact "serious" or "critical" is allowed.
* The charts' text alternatives: each canvas is role="img" with a summary
  naming the exact figures (checked against the engine run by CPython here),
  and a table of the figures; the canvases are drawn in the page's colours,
  light and dark, and follow the width of their box.
* A keyboard-only flow: Tab to "Number of candidates", type 100, Tab on to a
  compared rule's control, then reach the Live search view and its "Add
  candidate" button without the mouse.

axe is injected with page.evaluate(), which the page's Content-Security-Policy
does not govern; the page itself still runs under the policy (the guarded
`page` fixture fails on any console error, violations included).
"""

from __future__ import annotations

import json
import re
import sys
from pathlib import Path

import pytest
from playwright.sync_api import expect

ROOT = Path(__file__).resolve().parents[2]
sys.path.insert(0, str(ROOT / "build_scripts"))

import build  # noqa: E402

BLOCKING = ("serious", "critical")
sys.path.insert(0, str(ROOT / "pylib"))


def cpython(command: str, payload) -> dict:
    from seqpick import api

    return json.loads(api.call(command, json.dumps(payload)))


def pct(p: float) -> str:
    """The page's format for a probability: one decimal and a percent sign."""
    return f"{p * 100:.1f}%"


# How many pixels of a canvas have exactly this colour (line centres and bars do).
COLOUR_COUNT = """([selector, hex]) => {
  const c = document.querySelector(selector);
  const want = [1, 3, 5].map((i) => parseInt(hex.slice(i, i + 2), 16));
  const d = c.getContext("2d").getImageData(0, 0, c.width, c.height).data;
  let n = 0;
  for (let i = 0; i < d.length; i += 4) {
    if (d[i] === want[0] && d[i + 1] === want[1] && d[i + 2] === want[2] && d[i + 3] === 255) n++;
  }
  return n;
}"""


def accent(page) -> str:
    return page.evaluate("getComputedStyle(document.documentElement).getPropertyValue('--accent').trim()")


def check_charts(page, result: dict, where: str) -> None:
    """Text alternatives and colours of both charts, against the engine's result."""
    curve = page.locator("#sec-curve canvas[role=img]")
    label = curve.get_attribute("aria-label")
    skip = result["policy"]["skip"]
    assert f"Highest: {pct(result['success_probability'])} when passing on {skip}" in label, (where, label)
    for rule in result["compare"]:
        assert f"{rule['name']}, {pct(rule['success_probability'])}" in label, (where, label)
    table = page.locator("#sec-curve table")
    expect(table.locator("tr", has_text="best cutoff")).to_contain_text(pct(result["success_probability"]))
    # Each compared rule sits at its skip count: skip r at r, a share x at floor(x * N).
    n = result["scenario"]["pool"]["size"]
    for rule in result["compare"]:
        r = rule["rule"].get("skip", None)
        x = r if r is not None else min(n - 1, int(rule["rule"]["skip_share"] * n))
        row = table.locator("tbody tr").filter(has=page.get_by_role("cell", name=rule["name"], exact=True))
        expect(row.locator("th")).to_have_text(str(x))

    bars = page.locator("#sec-ranks canvas[role=img]")
    rd = result["rank_distribution"]
    assert f"1st (the best): {pct(rd['probabilities'][0])}" in bars.get_attribute("aria-label")
    assert f"no hire: {pct(rd['none'])}" in bars.get_attribute("aria-label")
    ranks = page.locator("#sec-ranks table")
    expect(ranks.locator("tbody tr").first).to_contain_text(pct(rd["probabilities"][0]))
    expect(ranks.locator("tbody tr").last).to_have_text(re.compile(rf"no hire\s*{re.escape(pct(rd['none']))}"))

    colour = accent(page)
    for selector in ("#sec-curve canvas", "#sec-ranks canvas"):
        assert page.evaluate(COLOUR_COUNT, [selector, colour]) > 50, f"{where}: {selector} not drawn in {colour}"


@pytest.fixture(scope="module")
def axe_source() -> str:
    return build.vendor_for_tests()["axe-core/axe.min.js"].read_text(encoding="utf-8")


RUN_AXE = """async () => {
  const r = await axe.run(document, { resultTypes: ["violations"] });
  return r.violations.map((v) => ({
    id: v.id, impact: v.impact, help: v.help,
    nodes: v.nodes.slice(0, 6).map((n) => `${n.target.join(" ")}: ${n.failureSummary}`),
  }));
}"""


def axe_violations(page, source: str, where: str) -> list[str]:
    """The serious and critical violations on the page as it is now, as text."""
    if not page.evaluate("typeof window.axe === 'object'"):
        page.evaluate(source)
    found = page.evaluate(RUN_AXE)
    return [
        f"[{where}] {v['id']} ({v['impact']}): {v['help']}\n    " + "\n    ".join(v["nodes"])
        for v in found
        if v["impact"] in BLOCKING
    ]


def summary(page):
    return page.get_by_role("region", name="Plan summary")


def wait_ready(page):
    expect(page.locator("#engine-status")).to_have_attribute("data-state", "ready")


def wait_charts(page):
    # Both charts of the demo are drawn (canvases labelled for screen readers).
    expect(page.locator("#sec-curve canvas[role=img]")).to_have_count(1)
    expect(page.locator("#sec-ranks canvas[role=img]")).to_have_count(1)


def open_all_details(page):
    page.evaluate("document.querySelectorAll('details').forEach((d) => { d.open = true; })")


def start_search_with_a_candidate(page):
    page.get_by_role("button", name="Live search").click()
    page.get_by_role("button", name=re.compile(r"^(Start a search from the current plan|New search from the plan)$")).click()
    page.get_by_role("button", name="Start the search").click()
    expect(page.get_by_role("button", name="Add candidate")).to_be_visible()
    page.get_by_role("radio", name=re.compile(r"^1st\b")).check()
    page.get_by_role("button", name="Add candidate").click()
    expect(page.get_by_role("status", name="Advice")).not_to_be_empty()


def test_axe_and_the_charts_text_alternatives(page, site_server, axe_source):
    problems: list[str] = []
    page.goto(site_server + "/")
    wait_ready(page)
    demo = page.evaluate("async () => (await import('./js/state.js')).DEMO_SCENARIO")
    result = cpython("solve", demo)["result"]
    wait_charts(page)
    open_all_details(page)
    check_charts(page, result, "light")
    light = accent(page)
    problems += axe_violations(page, axe_source, "plan")

    # The charts follow the width of their box.
    page.set_viewport_size({"width": 400, "height": 800})
    expect(page.locator("#sec-curve .uplot")).to_have_js_property("offsetWidth", page.locator("#sec-curve .chart-box").evaluate("b => b.clientWidth"))
    page.set_viewport_size({"width": 1280, "height": 800})

    size = page.get_by_label("Number of candidates")
    size.fill("abc")
    expect(page.locator("#f-size-error")).to_be_visible()
    expect(summary(page)).to_contain_text("last entries that worked")
    problems += axe_violations(page, axe_source, "plan with an error")
    size.fill("24")
    expect(page.locator("#f-size-error")).to_be_hidden()

    page.emulate_media(color_scheme="dark")
    wait_charts(page)
    assert accent(page) != light
    check_charts(page, result, "dark")  # redrawn in the dark colours
    open_all_details(page)
    problems += axe_violations(page, axe_source, "plan, dark")
    page.emulate_media(color_scheme="light")

    start_search_with_a_candidate(page)
    problems += axe_violations(page, axe_source, "live search")
    page.emulate_media(color_scheme="dark")
    problems += axe_violations(page, axe_source, "live search, dark")

    assert problems == [], "axe-core found serious or critical problems:\n" + "\n".join(problems)


# --- keyboard only ------------------------------------------------------------------------

DESCRIBE_FOCUS = """() => {
  const a = document.activeElement;
  if (!a || a === document.body) return "(body)";
  const name = a.getAttribute("aria-label") || (a.labels && a.labels[0] && a.labels[0].textContent) || a.textContent || "";
  return `${a.tagName.toLowerCase()}#${a.id || ""} ${name.trim().slice(0, 60)}`;
}"""


def press_until(page, key: str, predicate: str, limit: int = 80) -> None:
    """Press `key` until `predicate` (JS, of document.activeElement) holds
    (at once if it already does)."""
    check = f"() => Boolean(({predicate})(document.activeElement))"
    if page.evaluate(check):
        return
    path = []
    for _ in range(limit):
        page.keyboard.press(key)
        if page.evaluate(check):
            return
        path.append(page.evaluate(DESCRIBE_FOCUS))
    pytest.fail(f"pressing {key} {limit} times never reached {predicate}; focus went: " + " | ".join(path))


def test_keyboard_only_plan_and_live_search(page, site_server):
    page.goto(site_server + "/")
    wait_ready(page)

    press_until(page, "Tab", "(a) => a.id === 'f-size'")
    page.keyboard.press("Control+a")
    page.keyboard.type("100")
    expect(summary(page)).to_contain_text("37.1%")
    expect(page.get_by_label("Number of candidates")).to_have_value("100")

    # On to the first compared rule's number, and change it by keyboard.
    press_until(page, "Tab", "(a) => a.matches('input') && a.closest('fieldset')?.querySelector('legend')?.textContent === 'Rule 1'")
    page.keyboard.press("Control+a")
    page.keyboard.type("20")
    expect(page.locator("#sec-compare")).to_contain_text("skip 20")

    # Back up to the views and into the Live search.
    press_until(page, "Shift+Tab", "(a) => a.dataset && a.dataset.view === 'live'", limit=120)
    page.keyboard.press("Enter")
    expect(page.locator("#view-live")).to_be_visible()
    press_until(page, "Tab", "(a) => /^(Start a search from the current plan|New search from the plan)$/.test(a.textContent.trim())")
    page.keyboard.press("Enter")
    press_until(page, "Tab", "(a) => a.textContent.trim() === 'Start the search'", limit=20)
    page.keyboard.press("Enter")
    press_until(page, "Tab", "(a) => a.textContent.trim() === 'Add candidate'", limit=40)
    expect(page.get_by_role("button", name="Add candidate")).to_be_focused()
