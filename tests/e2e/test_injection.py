"""Hostile text: markup and script payloads through every text input of the plan
form and through the share link's text fields must show as text and never run.

Detection is threefold: a payload that ran would set ``window.__pwned`` or
open a dialog; an injected element would appear in the DOM (and an injected
``<img src=x>`` would request ``/x``, which the page fixture reports as an
HTTP error); and the Content-Security-Policy reports any blocked inline
script as a console error, which the fixture also fails on.
"""

from __future__ import annotations

from urllib.parse import quote

import pytest
from playwright.sync_api import expect

PAYLOADS = [
    '<img src=x onerror="window.__pwned=1">',
    '"><script>window.__pwned=2</script>',
    "</textarea><svg onload=window.__pwned=3>",
    "javascript:window.__pwned=4",
    "{{constructor.constructor('window.__pwned=5')()}}",
]

ALL = " ".join(PAYLOADS)


def _no_injection(page):
    assert page.evaluate("window.__pwned === undefined")
    # No element built from a payload: no <img>, <svg onload> or stray <script>.
    assert page.locator("img[src='x']").count() == 0
    assert page.locator("svg[onload]").count() == 0
    assert page.evaluate(
        "[...document.scripts].every(s => s.src || s.type === 'application/json')")


def test_form_text_inputs(page, site_server):
    dialogs = []
    page.on("dialog", lambda d: (dialogs.append(d.message), d.dismiss()))
    page.goto(site_server + "/")
    expect(page.locator("#engine-status")).to_have_attribute("data-state", "ready")
    title = page.get_by_label("Title")
    title.fill(ALL[:200])
    expect(page.get_by_role("region", name="Plan summary")).to_contain_text(PAYLOADS[0])
    # Every text field of every pool / score form gets each payload.
    form_fields = [
        ("What you know about the count", None, "Weights for 1, 2, 3, … candidates"),
        ("What you know about the count", None, "Chance for each stage"),
        ("What you know about the count", None, "Window opens (optional)"),
        ("Candidate scores", None, "Past scores"),
    ]
    for chooser, _, label in form_fields:
        select = page.get_by_label(chooser)
        options = select.locator("option")
        for i in range(options.count()):
            select.select_option(index=i)
            target = page.get_by_label(label)
            if target.count() and target.first.is_visible():
                break
        target = page.get_by_label(label)
        expect(target).to_be_visible()
        limit = target.get_attribute("maxlength")
        for payload in PAYLOADS:
            target.fill(payload)
            page.wait_for_timeout(300)  # let the page validate and render the error
            kept = payload[: int(limit)] if limit else payload
            expect(target).to_have_value(kept)
            _no_injection(page)
    assert dialogs == []
    _no_injection(page)


def test_link_text_fields(page, site_server):
    dialogs = []
    page.on("dialog", lambda d: (dialogs.append(d.message), d.dismiss()))
    payload = PAYLOADS[0] + PAYLOADS[1]
    fragment = ("#v=1&title=" + quote(payload, safe="") + "&pool=window:10,2,day,"
                + quote(quote(PAYLOADS[2], safe=""), safe="")
                + "&" + quote(PAYLOADS[3], safe="") + "=1")
    page.goto(site_server + "/" + fragment)
    expect(page.locator("#engine-status")).to_have_attribute("data-state", "ready")
    # The link's title is shown as text, exactly.
    expect(page.get_by_label("Title")).to_have_value(payload)
    expect(page.get_by_role("region", name="Plan summary")).to_contain_text(PAYLOADS[0])
    page.wait_for_timeout(500)
    assert dialogs == []
    _no_injection(page)
