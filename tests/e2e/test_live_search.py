"""The live-search view in headless Chromium.

A whole classic search is entered in the page (with a declined offer and two
undos); the advice at every step must equal what CPython's
``seqpick.advise.advise`` gives for the same seen list. Also: a reload in the
middle keeps every entry, export to a file and import back, erase with its
inline confirmation, a corrupted saved record set aside while another
survives, a full storage quota, bad import files, and labels and names with
markup shown as text with nothing executed.
"""

from __future__ import annotations

import json
import re
import sys
from pathlib import Path

import pytest
from playwright.sync_api import expect

ROOT = Path(__file__).resolve().parents[2]
# Compare with the engine of this checkout (the one built into the site's wheel).
sys.path.insert(0, str(ROOT / "pylib"))

from seqpick.advise import advise  # noqa: E402

INDEX_KEY = "seqpick.searches.v1"
XSS = "<img src=x onerror=alert(1)>"
TEN = {"version": 1, "title": "Ten applicants for the workshop lead", "pool": {"size": 10},
       "goal": {"type": "best"}}


# --- helpers ---------------------------------------------------------------------------


def open_live(page, site_server, scenario=None):
    page.goto(site_server + "/")
    if scenario is not None:
        # app.js's documented hook: replace the plan form with a scenario.
        page.evaluate("async (s) => (await import('./js/app.js')).loadScenario(s)", scenario)
    page.get_by_role("button", name="Live search").click()


def start_search(page, name=None):
    page.get_by_role("button", name=re.compile(r"^(Start a search from the current plan|New search from the plan)$")).click()
    if name is not None:
        page.get_by_label("Name of the search").fill(name)
    page.get_by_role("button", name="Start the search").click()
    expect(page.get_by_role("button", name="Add candidate")).to_be_visible()
    # The plan's rule in words arrives from the engine (and is saved with the search).
    expect(page.locator(".cmp-plan")).not_to_contain_text("being worked out")


def advice_region(page):
    return page.get_by_role("status", name="Advice")


def wait_advice(page, stage: int) -> dict:
    """Wait until the Advice region shows advice for candidate `stage`; return what it shows."""
    page.wait_for_function(
        """(stage) => {
             const box = document.querySelector('[role="status"][aria-label="Advice"]');
             const s = box && box.querySelector('.cmp-advice-stage');
             return box && box.dataset.state === 'ready' && s && s.textContent === 'Candidate ' + stage;
           }""",
        arg=stage,
    )
    return advice_region(page).evaluate(
        """(box) => ({
             decision: box.dataset.decision,
             heading: box.querySelector('.cmp-advice-decision').textContent,
             reason: box.querySelector('.cmp-advice-reason').textContent,
             offer_value: box.dataset.offerValue === undefined ? null : Number(box.dataset.offerValue),
             pass_value: box.dataset.passValue === undefined ? null : Number(box.dataset.passValue),
             value_kind: box.dataset.valueKind,
           })"""
    )


def choose_rank(page, rank: int):
    ordinal = {1: "1st", 2: "2nd", 3: "3rd"}.get(rank, f"{rank}th")
    page.get_by_role("radio", name=re.compile(rf"^{ordinal}\b")).check()


def add(page, rank: int, label: str | None = None):
    choose_rank(page, rank)
    if label is not None:
        page.get_by_label(re.compile(r"^Label")).fill(label)
    page.get_by_role("button", name="Add candidate").click()


OUTCOME_BUTTON = {"passed": "Passed", "accepted": "Offer accepted", "declined": "Offer declined"}


def seen_list(entries):
    """The engine's seen list for (rank, outcome) pairs; the last one is the newest."""
    seen = []
    for rank, outcome in entries:
        item = {"relative_rank": rank}
        if outcome in ("accepted", "declined"):
            item["offered"] = True
        if outcome == "declined":
            item["declined"] = True
        seen.append(item)
    return seen


def same_value(shown, want) -> bool:
    """Pyodide's maths library may differ from CPython's in the last bit of
    exp/log results, so values agree to 12 significant digits, not bit for bit."""
    if shown is None or want is None:
        return shown is want
    return shown == pytest.approx(want, rel=1e-12, abs=1e-15)


def check_advice(page, scenario, entries):
    shown = wait_advice(page, len(entries))
    want = advise(scenario, seen_list(entries[:-1]) + [{"relative_rank": entries[-1][0]}]).to_dict()
    assert shown["decision"] == want["decision"]
    assert shown["heading"] == {"offer": "Make an offer", "pass": "Pass"}[want["decision"]]
    assert shown["reason"] == want["reason"]
    assert shown["value_kind"] == want["value_kind"]
    assert same_value(shown["offer_value"], want["offer_value"])
    assert same_value(shown["pass_value"], want["pass_value"])
    return want


def history_rows(page):
    return page.locator(".cmp-table tbody tr").evaluate_all(
        "rows => rows.map(r => [...r.cells].map(c => c.textContent))"
    )


def storage(page) -> dict:
    return page.evaluate("() => Object.fromEntries(Object.entries(localStorage))")


# --- the whole search ---------------------------------------------------------------------

# (relative rank, outcome) for ten candidates of a classic search with n = 10:
# the plan passes the first 3 and then offers to a best-so-far.
SEARCH = [
    (1, "passed"), (2, "passed"), (1, "passed"), (3, "passed"),
    (1, "declined"),  # best so far after the cutoff: offer, declined
    (2, "passed"), (4, "passed"), (5, "passed"), (3, "passed"),
    (1, "accepted"),  # the last one, best so far: hired
]


def test_whole_classic_search_reload_export_import_erase(page, site_server, tmp_path):
    dialogs = []
    page.on("dialog", lambda d: (dialogs.append(d.message), d.dismiss()))
    open_live(page, site_server, TEN)
    start_search(page, "Workshop lead, spring")

    # Caution, plan summary and the rule in words are shown.
    live = page.locator("#view-live")
    expect(live).to_contain_text("Decision support only")
    expect(live).to_contain_text("10 candidates · goal: hire the best · 1 opening")
    expect(live).to_contain_text("Pass on the first 3, then make an offer")

    done = []
    for k, (rank, outcome) in enumerate(SEARCH, start=1):
        label = f"Applicant {k}"
        if k == 2:
            # The rank control works from the keyboard: arrow keys move the choice.
            page.get_by_role("radio", name=re.compile(r"^1st\b")).focus()
            page.keyboard.press("ArrowRight")
            expect(page.get_by_role("radio", name=re.compile(r"^2nd\b"))).to_be_checked()
            page.get_by_label(re.compile(r"^Label")).fill(label)
            page.get_by_role("button", name="Add candidate").click()
        elif k == 7:
            # A wrong entry, undone: the candidate is removed and the form refilled.
            add(page, 1, label)
            check_advice(page, TEN, done + [(1, None)])
            page.get_by_role("button", name="Undo last entry").click()
            expect(page.get_by_role("button", name="Add candidate")).to_be_visible()
            expect(page.get_by_label(re.compile(r"^Label"))).to_have_value(label)
            expect(page.get_by_role("radio", name=re.compile(r"^1st\b"))).to_be_checked()
            add(page, rank, label)
        else:
            add(page, rank, label)
        want = check_advice(page, TEN, done + [(rank, None)])
        if k in (5, 10):
            assert want["decision"] == "offer"
        page.get_by_role("button", name=OUTCOME_BUTTON[outcome]).click()
        if k == 6:
            # Undo an outcome: the candidate waits for a decision again, then is recorded again.
            page.get_by_role("button", name="Undo last entry").click()
            check_advice(page, TEN, done + [(rank, None)])
            page.get_by_role("button", name=OUTCOME_BUTTON[outcome]).click()
        done.append((rank, outcome))

        if k == 6:
            # Reload in the middle: every entry is still there.
            before = history_rows(page)
            page.reload()
            # The page reopens on the view left last, without a click.
            expect(page.get_by_role("button", name="Live search")).to_have_attribute("aria-current", "page")
            expect(page.locator("#view-plan")).to_be_hidden()
            expect(page.locator(".cmp-table tbody tr")).to_have_count(6)
            assert history_rows(page) == before
            expect(page.get_by_role("button", name="Add candidate")).to_be_visible()

    # The search is over: the summary names the hire and judges the plan.
    summary = page.get_by_role("region", name="Search summary")
    expect(summary).to_contain_text("Hired: “Applicant 10” (candidate 10), of the 10 you saw.")
    expect(summary).to_contain_text("Best of all 10 you saw.")
    expect(summary).to_contain_text("Advice followed at 10 of 10 decisions.")
    expect(summary).to_contain_text("2 offers made, 1 declined.")
    expect(summary).to_contain_text("would first have made an offer at “Applicant 5” (candidate 5)")
    expect(page.get_by_role("button", name="Add candidate")).to_have_count(0)
    rows = history_rows(page)
    assert [r[1] for r in rows] == [f"Applicant {k}" for k in range(1, 11)]
    assert [r[-1] for r in rows] == [
        {"passed": "Passed", "accepted": "Offer accepted", "declined": "Offer declined"}[o] for _, o in SEARCH
    ]

    # Saved: the index names the search, the record holds the ten entries.
    saved = storage(page)
    index = json.loads(saved[INDEX_KEY])
    (sid,) = index["order"]
    record = json.loads(saved[f"seqpick.search.{sid}"])
    assert record["format"] == "seqpick-search" and record["version"] == 1
    assert [(e["relative_rank"], e["outcome"]) for e in record["entries"]] == SEARCH

    # Export to a file.
    with page.expect_download() as dl:
        page.get_by_role("button", name="Export").click()
    download = dl.value
    assert download.suggested_filename == "seqpick-Workshop-lead-spring.json"
    path = tmp_path / download.suggested_filename
    download.save_as(path)
    exported = json.loads(path.read_text())
    assert exported["entries"] == record["entries"]
    assert exported["scenario"] == record["scenario"]

    # Erase, with the inline confirmation (no window.confirm).
    page.get_by_role("button", name="Erase this search").click()
    page.get_by_role("button", name="Keep it").click()
    assert f"seqpick.search.{sid}" in storage(page)
    page.get_by_role("button", name="Erase this search").click()
    page.get_by_role("button", name="Yes, erase it").click()
    expect(page.get_by_role("button", name="Start a search from the current plan")).to_be_visible()
    after = storage(page)
    assert f"seqpick.search.{sid}" not in after
    assert json.loads(after[INDEX_KEY])["order"] == []

    # Import it back: the same search, every entry intact.
    with page.expect_file_chooser() as fc:
        page.get_by_role("button", name="Import…").click()
    fc.value.set_files(str(path))
    expect(page.locator("#view-live")).to_contain_text("Imported “Workshop lead, spring” with 10 candidates.")
    assert history_rows(page) == rows
    expect(page.get_by_role("region", name="Search summary")).to_contain_text("Advice followed at 10 of 10 decisions.")
    again = storage(page)
    (new_id,) = json.loads(again[INDEX_KEY])["order"]
    assert new_id != sid
    assert json.loads(again[f"seqpick.search.{new_id}"])["entries"] == record["entries"]
    assert dialogs == []


def test_bad_import_files_change_nothing(page, site_server, tmp_path):
    open_live(page, site_server, TEN)
    start_search(page, "Kept")
    add(page, 1)
    wait_advice(page, 1)
    before = storage(page)

    good = json.loads(json.dumps({
        "format": "seqpick-search", "version": 1, "id": "abc", "name": "From a file",
        "scenario": TEN, "rule": None, "ended": False,
        "entries": [{"relative_rank": 1, "outcome": "passed", "advice": None}],
    }))
    cases = {
        "not-json.json": ("{ this is not json", "it is not a JSON file"),
        "other.json": (json.dumps({"hello": "world"}), "it is not a Seqpick search export"),
        "newer.json": (json.dumps({**good, "version": 7}), "saved by a newer version of Seqpick"),
        "rank.json": (json.dumps({**good, "entries": [{"relative_rank": 2, "outcome": "passed"}]}),
                      "candidate 1 has no valid rank so far"),
        # Shape is fine, but the engine refuses the plan: checked before anything is kept.
        "engine.json": (json.dumps({**good, "scenario": {"version": 1, "pool": {"size": -3}}}),
                        "pool.size"),
    }
    for name, (text, message) in cases.items():
        f = tmp_path / name
        f.write_text(text)
        with page.expect_file_chooser() as fc:
            page.get_by_role("button", name="Import…").click()
        fc.value.set_files(str(f))
        notice = page.locator(".cmp-notice-error").last
        expect(notice).to_contain_text("This file cannot be imported")
        expect(notice).to_contain_text(message)
        expect(notice).to_contain_text("Nothing was changed.")
        assert storage(page) == before, name
    expect(page.get_by_role("combobox", name="Search").locator("option")).to_have_count(1)


# --- storage problems ------------------------------------------------------------------------


def _record(sid: str, name: str, entries):
    return {
        "format": "seqpick-search", "version": 1, "id": sid, "name": name,
        "created": "2026-01-05T10:00:00.000Z", "updated": "2026-01-05T10:00:00.000Z",
        "scenario": TEN, "rule": None, "ended": False, "entries": entries,
    }


def test_corrupted_record_is_set_aside_and_the_other_survives(page, site_server):
    page.goto(site_server + "/")
    good = _record("good01", "Survivor", [
        {"relative_rank": 1, "outcome": "passed", "advice": None, "label": "First"},
        {"relative_rank": 1, "outcome": "pending", "advice": None, "label": "Second"},
    ])
    page.evaluate(
        """([good, index]) => {
             localStorage.setItem('seqpick.search.good01', JSON.stringify(good));
             localStorage.setItem('seqpick.search.bad02', '{"format": "seqpick-search", "version": 1, trunc');
             localStorage.setItem('seqpick.search.foreign', JSON.stringify({format: 'someone-else', data: [1, 2]}));
             localStorage.setItem('seqpick.searches.v1', JSON.stringify(index));
           }""",
        [good, {"version": 1, "order": ["good01", "bad02", "foreign"], "selected": "bad02"}],
    )
    page.reload()
    page.get_by_role("button", name="Live search").click()
    live = page.locator("#view-live")
    expect(live).to_contain_text("2 saved searches could not be read and were set aside; the others are unharmed.")
    # The surviving search is selected and its waiting candidate gets advice.
    expect(page.get_by_role("heading", name="Survivor")).to_be_visible()
    shown = wait_advice(page, 2)
    want = advise(TEN, [{"relative_rank": 1}, {"relative_rank": 1}]).to_dict()
    assert shown["reason"] == want["reason"]
    saved = storage(page)
    assert saved["seqpick.quarantine.bad02"] == '{"format": "seqpick-search", "version": 1, trunc'
    assert json.loads(saved["seqpick.quarantine.foreign"])["format"] == "someone-else"
    assert "seqpick.search.bad02" not in saved and "seqpick.search.foreign" not in saved
    assert json.loads(saved[INDEX_KEY])["order"] == ["good01"]
    # A second load reports nothing more.
    page.reload()
    page.get_by_role("button", name="Live search").click()
    expect(page.get_by_role("heading", name="Survivor")).to_be_visible()
    expect(live).not_to_contain_text("could not be read")


def test_full_storage_shows_a_message_and_keeps_the_entries(page, site_server):
    page.add_init_script(
        """(() => {
             const real = Storage.prototype.setItem;
             Storage.prototype.setItem = function (key, value) {
               if (window.__full && key.startsWith('seqpick.search')) {
                 throw new DOMException('The quota has been exceeded.', 'QuotaExceededError');
               }
               return real.call(this, key, value);
             };
           })()"""
    )
    open_live(page, site_server, TEN)
    start_search(page, "Quota")
    add(page, 1, "Kept in the tab")
    wait_advice(page, 1)
    page.get_by_role("button", name="Passed").click()
    before = storage(page)
    page.evaluate("() => { window.__full = true; }")
    add(page, 2, "Not saved")
    wait_advice(page, 2)
    expect(page.locator(".cmp-notice-error")).to_contain_text("storage for this page is full")
    # In the tab: both candidates; in storage: what was saved before, untouched.
    assert [r[1] for r in history_rows(page)] == ["Kept in the tab", "Not saved"]
    assert storage(page) == before
    # Room again: the next change saves everything and the message goes away.
    page.evaluate("() => { window.__full = false; }")
    page.get_by_role("button", name="Passed").click()
    expect(page.locator(".cmp-notice-error")).to_have_count(0)
    (sid,) = json.loads(storage(page)[INDEX_KEY])["order"]
    assert len(json.loads(storage(page)[f"seqpick.search.{sid}"])["entries"]) == 2


# --- user text stays text ----------------------------------------------------------------------


def test_markup_in_labels_and_names_is_shown_as_text(page, site_server, tmp_path):
    dialogs = []
    page.on("dialog", lambda d: (dialogs.append(d.message), d.dismiss()))
    name = "<b>Bold</b><script>window.__pwned = 1</script>"
    open_live(page, site_server, TEN)
    start_search(page, name)
    add(page, 1, XSS)
    wait_advice(page, 1)
    page.get_by_role("button", name="Passed").click()
    add(page, 1, '"><svg onload=alert(2)>')
    wait_advice(page, 2)

    live = page.locator("#view-live")
    assert live.locator("img, svg, script, b").count() == 0
    assert [r[1] for r in history_rows(page)] == [XSS, '"><svg onload=alert(2)>']
    expect(page.get_by_role("heading", name=name)).to_be_visible()
    expect(page.get_by_role("combobox", name="Search")).to_contain_text(name)
    assert page.evaluate("() => window.__pwned") is None
    # Names never reach a URL: the page address is unchanged.
    assert "Bold" not in page.url and "img" not in page.url
    # The exported file's name keeps letters and digits only.
    with page.expect_download() as dl:
        page.get_by_role("button", name="Export").click()
    assert dl.value.suggested_filename == "seqpick-b-Bold-b-script-window-__pwned-1-script.json"
    assert dialogs == []


# --- several searches, and a time window -----------------------------------------------------


def test_searches_side_by_side_switch_and_rename(page, site_server):
    open_live(page, site_server, TEN)
    start_search(page, "Morning round")
    add(page, 1, "M1")
    wait_advice(page, 1)
    page.get_by_role("button", name="Passed").click()

    page.get_by_role("button", name="New search from the plan").click()
    page.get_by_label("Name of the search").fill("Evening round")
    page.get_by_role("button", name="Start the search").click()
    expect(page.get_by_role("heading", name="Evening round")).to_be_visible()
    expect(page.locator(".cmp-table")).to_have_count(0)  # a fresh record
    add(page, 1, "E1")
    wait_advice(page, 1)

    picker = page.get_by_role("combobox", name="Search")
    picker.select_option(label="Morning round — 1 seen")
    expect(page.get_by_role("heading", name="Morning round")).to_be_visible()
    assert [r[1] for r in history_rows(page)] == ["M1"]

    page.get_by_role("button", name="Rename").click()
    page.get_by_label("Name of the search").fill("  Morning   round, day 2 ")
    page.get_by_role("button", name="Save name").click()
    expect(page.get_by_role("heading", name="Morning round, day 2")).to_be_visible()

    page.reload()
    page.get_by_role("button", name="Live search").click()
    expect(page.get_by_role("heading", name="Morning round, day 2")).to_be_visible()
    options = page.get_by_role("combobox", name="Search").locator("option").all_text_contents()
    assert options == ["Morning round, day 2 — 1 seen", "Evening round — 1 seen"]
    picker = page.get_by_role("combobox", name="Search")
    picker.select_option(label="Evening round — 1 seen")
    # The waiting candidate of the other search still has its advice.
    shown = wait_advice(page, 1)
    assert shown["reason"] == advise(TEN, [{"relative_rank": 1}]).to_dict()["reason"]


def test_time_window_search_takes_now_as_the_default_arrival(page, site_server):
    from datetime import datetime, timedelta

    start = (datetime.now() - timedelta(days=2)).strftime("%Y-%m-%dT%H:%M")
    scenario = {"version": 1, "title": "Flat hunt",
                "pool": {"window": 14, "arrivals_per_unit": 1.5, "unit": "day", "start": start},
                "goal": {"type": "best"}}
    open_live(page, site_server, scenario)
    start_search(page)
    arrival = page.get_by_label(re.compile(r"^Arrival time \(days since the window opened\)"))
    # Two days (give or take the minutes the page took) after the window opened.
    assert 1.99 <= float(arrival.input_value()) <= 2.01
    add(page, 1)
    shown = wait_advice(page, 1)
    saved = storage(page)
    (sid,) = json.loads(saved[INDEX_KEY])["order"]
    entry = json.loads(saved[f"seqpick.search.{sid}"])["entries"][0]
    assert 1.99 <= entry["time"] <= 2.01
    want = advise(json.loads(saved[f"seqpick.search.{sid}"])["scenario"],
                  [{"relative_rank": 1, "time": entry["time"]}]).to_dict()
    assert shown["reason"] == want["reason"]
    assert same_value(shown["offer_value"], want["offer_value"])
    assert same_value(shown["pass_value"], want["pass_value"])
    page.get_by_role("button", name="Passed").click()
    # An arrival before the previous one is refused at the field, and nothing is added.
    arrival.fill("1")
    choose_rank(page, 1)
    page.get_by_role("button", name="Add candidate").click()
    expect(page.locator(".cmp-add .cmp-error")).to_contain_text("Enter an arrival time from")
    expect(arrival).to_have_attribute("aria-invalid", "true")
    expect(page.locator(".cmp-table tbody tr")).to_have_count(1)
