"""The plan page in headless Chromium: the demo answer, typing a pool size,
inline errors, compared rules, view switching, and the state <-> scenario
round trip, each checked against the engine run by CPython here."""

from __future__ import annotations

import json
import re
from pathlib import Path

import pytest
from playwright.sync_api import expect

ROOT = Path(__file__).resolve().parents[2]
SITE_JS = ROOT / "site" / "js"


def cpython(command: str, payload) -> dict:
    from seqpick import api

    return json.loads(api.call(command, json.dumps(payload)))


def pct(p: float) -> str:
    """The page's format for a probability: one decimal and a percent sign."""
    return f"{p * 100:.1f}%"


def demo_scenario(page) -> dict:
    return page.evaluate("async () => (await import('./js/state.js')).DEMO_SCENARIO")


def summary(page):
    return page.get_by_role("region", name="Plan summary")


def wait_ready(page):
    expect(page.locator("#engine-status")).to_have_attribute("data-state", "ready")


# --- the demo -----------------------------------------------------------------------------


def test_demo_loads_with_a_real_answer(page, site_server):
    page.goto(site_server + "/")
    demo = demo_scenario(page)
    expected = cpython("solve", demo)
    assert expected["ok"], expected
    result = expected["result"]

    box = summary(page)
    expect(box).to_contain_text(pct(result["success_probability"]))
    expect(box).to_contain_text(result["policy"]["words"])
    expect(box).to_contain_text(demo["title"])
    expect(page.get_by_label("Title")).to_have_value(demo["title"])
    expect(page.get_by_label("Number of candidates")).to_have_value(str(demo["pool"]["size"]))
    # The caution sits next to the summary.
    expect(page.get_by_role("complementary", name="Before you rely on this")).to_contain_text(
        "Decision support only"
    )
    # Cutoff table rows come from policy.groups.
    skip = result["policy"]["skip"]
    cutoffs = page.locator("#sec-cutoffs")
    expect(cutoffs).to_contain_text(f"Stages 1–{skip}")
    expect(cutoffs).to_contain_text("Pass everyone")
    expect(cutoffs).to_contain_text("Offer to a best-so-far")
    # Each compared rule has a row in the comparison table.
    table = page.locator("#sec-compare table")
    for rule in result["compare"]:
        expect(table).to_contain_text(rule["name"])
        expect(table).to_contain_text(pct(rule["success_probability"]))
    # Large-N limits with their sources.
    for limit in result["limits"]:
        expect(page.locator("#sec-limits")).to_contain_text(limit["source"])


def test_status_says_the_solver_is_starting_and_typing_works_meanwhile(page, site_server):
    page.goto(site_server + "/", wait_until="domcontentloaded")
    status = page.locator("#engine-status")
    # Pyodide takes seconds to boot; the page says so politely and the form is usable.
    expect(status).to_have_attribute("role", "status")
    expect(status).to_contain_text("Starting the solver")
    size = page.get_by_label("Number of candidates")
    expect(size).to_be_enabled()
    size.fill("12")
    wait_ready(page)
    expected = cpython("solve", {"pool": {"size": 12}})["result"]
    expect(summary(page)).to_contain_text(pct(expected["success_probability"]))
    expect(summary(page)).to_contain_text("of 12 candidates")


@pytest.mark.allow_console_errors
def test_a_failed_boot_is_reported(page, site_server):
    page.route(site_server + "/build-info.json", lambda route: route.fulfill(status=500, body="no"))
    page.goto(site_server + "/")
    status = page.locator("#engine-status")
    expect(status).to_have_attribute("data-state", "failed")
    expect(status).to_contain_text("could not start")
    expect(summary(page)).to_contain_text("could not start")
    expect(page.get_by_label("Number of candidates")).to_be_editable()


# --- typing a size ---------------------------------------------------------------------------


def test_hundred_candidates_gives_skip_37_and_37_1_percent(page, site_server):
    page.goto(site_server + "/")
    wait_ready(page)
    page.get_by_label("Number of candidates").fill("100")
    # Published value for N = 100: skip 37, P = 0.371 (Gilbert & Mosteller 1966,
    # J. Amer. Statist. Assoc. 61, 35-73, table of the best-choice problem; from memory).
    expected = cpython("solve", {"pool": {"size": 100}})["result"]
    assert expected["policy"]["skip"] == 37
    assert pct(expected["success_probability"]) == "37.1%"
    box = summary(page)
    expect(box).to_contain_text("37.1%")
    expect(box).to_contain_text("37")
    expect(box).to_contain_text("Pass on the first 37")
    expect(page.locator("#sec-cutoffs")).to_contain_text("Stages 38–100")


def test_newest_answer_wins(page, site_server):
    page.goto(site_server + "/")
    wait_ready(page)
    size = page.get_by_label("Number of candidates")
    for text in ["5", "50", "500", "5000", "100"]:
        size.fill(text)
    expect(summary(page)).to_contain_text("of 100 candidates")
    expect(summary(page)).to_contain_text("37.1%")
    # Let any older reply arrive: it must not replace the newest.
    page.wait_for_timeout(800)
    expect(summary(page)).to_contain_text("of 100 candidates")
    expect(summary(page)).not_to_have_class(re.compile("is-pending"))


# --- errors ---------------------------------------------------------------------------------------


@pytest.mark.parametrize("typed, sent", [("0", 0), ("abc", "abc"), ("2.5", 2.5)])
def test_invalid_size_shows_inline_error_and_keeps_the_text(page, site_server, typed, sent):
    page.goto(site_server + "/")
    wait_ready(page)
    expect(summary(page)).to_contain_text("%")  # the demo's answer is on screen
    size = page.get_by_label("Number of candidates")
    size.fill(typed)
    expected = cpython("solve", {"pool": {"size": sent}})
    assert not expected["ok"] and expected["error"]["field"] == "pool.size", expected

    error = page.locator("#f-size-error")
    expect(error).to_be_visible()
    expect(error).to_have_text(expected["error"]["message"])
    expect(size).to_have_attribute("aria-invalid", "true")
    described = size.get_attribute("aria-describedby").split()
    assert "f-size-error" in described and "f-size-help" in described
    expect(size).to_have_value(typed)
    # The last good answer stays, marked as not matching the entries.
    expect(summary(page)).to_contain_text("last entries that worked")

    # Fixing it clears the error.
    size.fill("100")
    expect(error).to_be_hidden()
    expect(size).not_to_have_attribute("aria-invalid", "true")
    expect(summary(page)).to_contain_text("37.1%")


def test_an_error_while_booting_says_what_to_do(page, site_server):
    page.goto(site_server + "/", wait_until="domcontentloaded")
    size = page.get_by_label("Number of candidates")
    size.fill("-3")  # typed while the solver boots: the first solve is already invalid
    wait_ready(page)
    expect(page.locator("#f-size-error")).to_be_visible()
    # The prerendered demo answer stays on screen, marked as not matching the entries.
    expect(summary(page)).to_contain_text("Fix the marked entry")
    expect(summary(page)).to_have_class(re.compile("is-stale"))
    expect(size).to_have_value("-3")


def test_error_in_a_compare_rule_sits_beside_that_rule(page, site_server):
    page.goto(site_server + "/")
    wait_ready(page)
    page.get_by_label("Number of candidates").fill("10")
    rule = page.get_by_role("group", name="Rule 1")
    value = rule.get_by_label("Candidates to pass")
    value.fill("12")
    demo = demo_scenario(page)
    sent = dict(demo, pool={"size": 10}, compare=[{"skip": 12}] + demo["compare"][1:])
    expected = cpython("solve", sent)
    assert expected["error"]["field"] == "compare.0.skip", expected
    expect(rule.locator(".field-error")).to_have_text(expected["error"]["message"])
    expect(value).to_have_attribute("aria-invalid", "true")
    expect(value).to_have_value("12")


# --- compared rules ----------------------------------------------------------------------------------


def test_an_added_compare_rule_shows_its_numbers(page, site_server):
    page.goto(site_server + "/")
    wait_ready(page)
    page.get_by_label("Number of candidates").fill("100")
    page.get_by_role("button", name="Add a rule").click()
    rule = page.get_by_role("group", name="Rule 3")
    rule.get_by_label("Candidates to pass").fill("30")

    demo = demo_scenario(page)
    sent = dict(demo, pool={"size": 100}, compare=demo["compare"] + [{"skip": 30}])
    expected = cpython("solve", sent)["result"]
    mine = expected["compare"][2]
    assert mine["rule"] == {"skip": 30}
    expect(rule.locator("output")).to_contain_text(f"Success {pct(mine['success_probability'])}")
    row = page.locator("#sec-compare tbody tr", has_text=mine["name"])
    expect(row).to_contain_text(pct(mine["success_probability"]))
    expect(row).to_contain_text(f"{mine['expected_interviews']:.1f}")

    # Removing it takes it out of the table.
    rule.get_by_role("button", name="Remove rule 3").click()
    expect(page.get_by_role("group", name="Rule 3")).to_have_count(0)
    expect(page.locator("#sec-compare tbody tr", has_text=mine["name"])).to_have_count(0)


def test_hidden_controls_keep_their_values(page, site_server):
    page.goto(site_server + "/")
    wait_ready(page)
    size = page.get_by_label("Number of candidates")
    size.fill("77")
    page.get_by_label("What you know about the count").select_option("range")
    expect(size).to_be_hidden()
    expect(page.get_by_label("Fewest candidates")).to_be_visible()
    page.get_by_label("What you know about the count").select_option("size")
    expect(size).to_have_value("77")


# --- views ---------------------------------------------------------------------------------------------


def test_views_switch_and_keep_the_plan(page, site_server):
    page.goto(site_server + "/")
    nav = page.get_by_role("navigation", name="Views")
    plan_tab = nav.get_by_role("button", name="Plan")
    live_tab = nav.get_by_role("button", name="Live search")
    expect(plan_tab).to_have_attribute("aria-current", "page")
    live_tab.click()
    expect(live_tab).to_have_attribute("aria-current", "page")
    expect(page.locator("#view-plan")).to_be_hidden()
    plan_tab.click()
    expect(page.locator("#view-plan")).to_be_visible()
    expect(page.get_by_label("Number of candidates")).to_be_visible()


# --- state <-> scenario ----------------------------------------------------------------------------------

ROUND_TRIP = [
    {"pool": {"size": 100}, "compare": [{"skip": 30}, {"skip_share": 0.37}]},
    {"title": "Evening shift", "pool": {"size_min": 10, "size_max": 40}, "goal": {"type": "top", "k": 3},
     "accept_probability": 0.07, "openings": 2, "cost_per_candidate": 0.01},
    {"pool": {"size_mean": 33.3}, "goal": {"type": "rank"}},
    {"pool": {"window": 2.5, "arrivals_per_unit": 4, "unit": "week", "start": "2026-03-02T09:00"},
     "compare": [{"start_share": 1 / 3}]},
    {"pool": {"size": 20}, "goal": {"type": "score"},
     "scores": {"distribution": "normal", "mean": 50, "sd": 12.5}, "compare": [{"score_at_least": 70.5}]},
    {"pool": {"size_weights": [0, 1, 2.5, 1e-9]}, "scores": {"distribution": "sample", "values": [1, 2, 3.5]}},
    {"pool": {"chances": [0.1, 0.2, 0.30000000000000004]}, "must_hire": True},
]


def test_scenario_round_trips_through_the_form_state(page, site_server):
    page.goto(site_server + "/")
    canonical = []
    for raw in ROUND_TRIP:
        reply = cpython("validate", raw)
        assert reply["ok"], (raw, reply)
        canonical.append(reply["result"])
    back = page.evaluate(
        """async (list) => {
          const S = await import('./js/state.js');
          return list.map((s) => S.scenarioFromState(S.stateFromScenario(s)));
        }""",
        canonical,
    )
    assert back == canonical


# --- no markup from strings ----------------------------------------------------------------------------------


def test_page_code_never_parses_strings_as_markup():
    owned = [SITE_JS / "app.js", SITE_JS / "state.js", SITE_JS / "format.js", SITE_JS / "views.js"]
    owned += sorted((SITE_JS / "plan").glob("*.js"))
    pattern = re.compile(r"innerHTML|outerHTML|insertAdjacentHTML|document\.write|setAttribute\(\s*['\"]style")
    offenders = [str(p.relative_to(ROOT)) for p in owned if pattern.search(p.read_text(encoding="utf-8"))]
    assert offenders == []


def test_time_window_pool_from_the_form(page, site_server):
    page.goto(site_server + "/")
    wait_ready(page)
    page.get_by_label("What you know about the count").select_option("window")
    page.get_by_label("Length of the window").fill("10")
    page.get_by_label("Arrivals per unit").fill("3")
    page.get_by_label("Unit of time").select_option("day")
    page.get_by_label("Window opens (optional)").fill("2026-03-02T09:00")
    scenario = page.evaluate(
        "async () => (await import('./js/app.js')).getPlan().scenario"
    )
    assert scenario["pool"] == {"window": 10, "arrivals_per_unit": 3, "start": "2026-03-02T09:00", "unit": "day"}
    # The demo's skip rules still apply; a time-share rule would too.
    expected = cpython("solve", scenario)
    assert expected["ok"], expected
    expect(summary(page)).to_contain_text(pct(expected["result"]["success_probability"]))
    expect(summary(page)).to_contain_text("about 30 candidates expected")
    expect(page.locator("#sec-cutoffs")).to_contain_text("Clock-only version")


def test_long_cutoff_tables_are_capped_with_show_all(page, site_server):
    scenario = {"version": 1, "pool": {"size": 30000}, "goal": {"type": "rank"}, "compare": []}
    groups = cpython("solve", scenario)["result"]["policy"]["groups"]
    assert len(groups) > 200
    page.goto(site_server + "/")
    wait_ready(page)
    page.evaluate("async (s) => (await import('./js/app.js')).loadScenario(s)", scenario)
    expect(summary(page)).to_contain_text("1 = best; 30,000 candidates")
    rows = page.locator("#sec-cutoffs tbody tr")
    expect(rows).to_have_count(200)
    button = page.locator("#sec-cutoffs").get_by_role("button", name=re.compile(r"^Show all [\d,]+ rows$"))
    total = int(re.search(r"[\d,]+", button.inner_text()).group().replace(",", ""))
    assert 200 < total <= len(groups)
    button.click()
    expect(rows).to_have_count(total)
    # The first and last rows are the engine's first and last groups.
    first, last = groups[0], groups[-1]
    expect(rows.first).to_contain_text(f"Stages 1–{first['last']:,}")
    expect(rows.last).to_contain_text(f"{last['last']:,}")


def test_several_openings_show_one_table_per_openings_left(page, site_server):
    scenario = {"version": 1, "pool": {"size": 40}, "openings": 3, "accept_probability": 0.8, "compare": []}
    result = cpython("solve", scenario)["result"]
    by_left = result["policy"]["thresholds_by_openings_left"]
    assert sorted(by_left) == ["1", "2", "3"]
    page.goto(site_server + "/")
    wait_ready(page)
    page.evaluate("async (s) => (await import('./js/app.js')).loadScenario(s)", scenario)
    expect(page.get_by_label("Openings")).to_have_value("3")
    expect(page.get_by_label("Chance an offer is accepted (%)")).to_have_value("80")
    cutoffs = page.locator("#sec-cutoffs")
    for caption in ["With 3 openings left", "With 2 openings left", "With 1 opening left"]:
        expect(cutoffs.locator("caption", has_text=caption)).to_have_count(1)
    # The first "pass everyone" run of each table matches the engine's list.
    for k, caption in [("3", "With 3 openings left"), ("1", "With 1 opening left")]:
        skip = next(i for i, t in enumerate(by_left[k]) if t > 0)
        table = cutoffs.locator("table", has=page.locator("caption", has_text=caption))
        expect(table.locator("tbody tr").first).to_contain_text(f"Stages 1–{skip}")
    expect(summary(page)).to_contain_text(f"{result['expected_hires']:.2f} of 3")
