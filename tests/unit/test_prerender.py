"""The build's prerender step: the demo plan worked out by CPython and
written into index.html as JSON that cannot break out of its <script>."""

from __future__ import annotations

import json
import re
import shutil
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[2]
sys.path.insert(0, str(ROOT / "build_scripts"))

import build  # noqa: E402
from seqpick.link import decode_fragment, encode_fragment  # noqa: E402
from seqpick.scenario import parse_scenario  # noqa: E402
from seqpick.solve import solve  # noqa: E402

BLOCK_RE = re.compile(r'<script type="application/json" id="prerendered-plan">(.*?)</script>', re.S)
DEMO_PATH = ROOT / "site" / "demo-scenario.json"


def site_copy(tmp_path: Path, demo: dict | None = None) -> Path:
    """A minimal built site: index.html (with its policy tag) and the demo scenario."""
    site = tmp_path / "site"
    site.mkdir()
    html = build.inject_csp_meta((ROOT / "site" / "index.html").read_text(encoding="utf-8"))
    (site / "index.html").write_text(html, encoding="utf-8")
    if demo is None:
        shutil.copy(DEMO_PATH, site / "demo-scenario.json")
    else:
        (site / "demo-scenario.json").write_text(json.dumps(demo), encoding="utf-8")
    return site


def blocks(html: str) -> list[str]:
    return BLOCK_RE.findall(html)


def test_the_injected_json_is_valid_and_equals_solve_of_the_demo(tmp_path):
    site = site_copy(tmp_path)
    build.prerender(site)
    html = (site / "index.html").read_text(encoding="utf-8")
    found = blocks(html)
    assert len(found) == 1
    text = found[0]
    assert "<" not in text and ">" not in text and "&" not in text  # escaped as \u003c etc.
    data = json.loads(text)
    demo = json.loads(DEMO_PATH.read_text(encoding="utf-8"))
    assert data["scenario"] == demo
    assert data["result"] == solve(demo).to_dict()
    assert data["fragment"] == encode_fragment(demo)
    # The fragment opens the same scenario, with nothing set aside.
    decoded = decode_fragment(data["fragment"])
    assert decoded.warnings == [] and decoded.scenario == parse_scenario(demo).to_dict()
    # It sits in <head>, after the policy tag, before the page's own module runs (modules are deferred).
    head = html[: html.index("</head>")]
    assert text in head
    assert head.index("Content-Security-Policy") < head.index("prerendered-plan")


def test_the_demo_file_is_canonical_as_the_page_sends_it():
    demo = json.loads(DEMO_PATH.read_text(encoding="utf-8"))
    canonical = parse_scenario(demo).to_dict()
    assert json.loads(json.dumps(canonical)) == demo  # 1 == 1.0 in Python's comparison
    assert list(demo) == list(canonical)  # every field, in the engine's order


def test_prerender_is_idempotent(tmp_path):
    site = site_copy(tmp_path)
    build.prerender(site)
    once = (site / "index.html").read_bytes()
    build.prerender(site)
    assert (site / "index.html").read_bytes() == once
    assert len(blocks(once.decode("utf-8"))) == 1


def test_hostile_strings_cannot_leave_the_script_element(tmp_path):
    demo = parse_scenario(json.loads(DEMO_PATH.read_text(encoding="utf-8"))).to_dict()
    demo["title"] = "</script><script>alert(1)</script><!-- & \u2028 \u2029 “quoted”"
    site = site_copy(tmp_path, demo)
    build.prerender(site)
    html = (site / "index.html").read_text(encoding="utf-8")
    assert "alert(1)</script>" not in html
    assert html.count("</script>") == html.count("<script")  # no element ended early
    (text,) = blocks(html)
    assert json.loads(text)["scenario"]["title"] == demo["title"]
    assert json.loads(text)["result"]["scenario"]["title"] == demo["title"]


def test_script_json_escapes_and_round_trips():
    value = {"a": "</SCRIPT>", "b": ["<!--", "-->", "&amp;"], "c": 0.1 + 0.2, "d": None, "e": "\u2028"}
    text = build.script_json(value)
    assert not re.search(r"[<>&\u2028\u2029]", text)
    assert json.loads(text) == value


def test_a_demo_that_is_not_canonical_fails_the_build(tmp_path):
    site = site_copy(tmp_path, {"version": 1, "pool": {"size": 24}})
    with pytest.raises(build.BuildError, match="every field"):
        build.prerender(site)


def test_a_demo_the_engine_rejects_fails_the_build(tmp_path):
    demo = parse_scenario(json.loads(DEMO_PATH.read_text(encoding="utf-8"))).to_dict()
    demo["pool"] = {"size": 0}
    site = site_copy(tmp_path, demo)
    with pytest.raises(build.BuildError, match="pool.size"):
        build.prerender(site)


def test_a_missing_demo_file_fails_the_build(tmp_path):
    site = site_copy(tmp_path)
    (site / "demo-scenario.json").unlink()
    with pytest.raises(build.BuildError, match="demo-scenario.json"):
        build.prerender(site)


def test_the_page_reads_the_demo_from_the_one_file():
    """No second copy of the demo in the page's code: state.js loads it."""
    state_js = (ROOT / "site" / "js" / "state.js").read_text(encoding="utf-8")
    demo = json.loads(DEMO_PATH.read_text(encoding="utf-8"))
    assert "demo-scenario.json" in state_js
    assert demo["title"] not in state_js
    assert build.DEMO_SCENARIO_FILE == DEMO_PATH.name
