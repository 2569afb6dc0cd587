"""The harness itself: the off-origin guard works, the engine worker boots
Pyodide and answers through site/js/engine.js, and the Content-Security-Policy
is in force (from the HTTP header and, for static hosts, from the meta tag)."""

from __future__ import annotations

import json
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[2]
sys.path.insert(0, str(ROOT / "build_scripts"))
from common import CSP_HEADER, CSP_META  # noqa: E402

# The same scenario is solved by CPython here and by Pyodide in the page.
SCENARIO = {"version": 1, "pool": {"size": 12}, "goal": {"type": "best"}}
BAD_SCENARIO = {"version": 1, "pool": {"size": -3}, "goal": {"type": "best"}}

# A guard against a hung engine: page.evaluate has no timeout of its own, so
# every engine script runs under this deadline. It is not a speed check.
HANG_GUARD_S = 300


def with_engine(page, body: str, arg=None):
    """Run *body* (the inside of an async JS function that sees `engine`, a
    fresh createEngine(), and `arg`) in the page; the engine is terminated
    afterwards. Returns the body's return value."""
    script = f"""async (arg) => {{
      const {{ createEngine }} = await import("./js/engine.js");
      const engine = createEngine();
      const work = (async () => {{ {body} }})();
      let timer;
      const stuck = new Promise((_, reject) => {{
        timer = setTimeout(() => reject(new Error("engine gave no answer within {HANG_GUARD_S} s")),
                           {HANG_GUARD_S * 1000});
      }});
      try {{ return await Promise.race([work, stuck]); }}
      finally {{ clearTimeout(timer); engine.terminate(); }}
    }}"""
    return page.evaluate(script, arg)


BLANK_PATH = "/__harness__.html"  # at the root, so "./js/engine.js" resolves as in index.html


def open_blank(page, site_server) -> None:
    """Open an empty page on the site's origin, served with the server's own
    headers (so its policy), for engine tests that should not share two cores
    with the app's own engine booting in index.html."""

    def blank(route):
        real = route.fetch(url=site_server + "/")
        keep = {"content-security-policy", "cache-control", "x-content-type-options"}
        route.fulfill(
            status=200,
            content_type="text/html; charset=utf-8",
            headers={k: v for k, v in real.headers.items() if k.lower() in keep},
            body='<!doctype html><meta charset="utf-8"><title>harness</title>',
        )

    page.context.route(site_server + BLANK_PATH, blank)
    response = page.goto(site_server + BLANK_PATH)
    assert response.headers.get("content-security-policy") == CSP_HEADER


def cpython_call(command: str, payload) -> dict:
    from seqpick import api

    return json.loads(api.call(command, json.dumps(payload)))


# --- the guard ---------------------------------------------------------------


@pytest.mark.allow_offorigin
@pytest.mark.allow_console_errors
def test_offorigin_guard_records_page_and_worker_requests(page, page_log, site_server):
    """Negative control: requests to another origin, from the page and from a
    worker, are seen, recorded and stopped. Without this the zero-requests
    checks of every other test could pass vacuously.

    The site's policy (connect-src 'self') would stop a fetch before it is
    made, so the probes use requests the policy does not govern: a top-level
    navigation, and a fetch from a worker served without a policy (as a static
    host serves workers: a meta tag does not reach them)."""
    from playwright.sync_api import Error as PlaywrightError

    page.goto(site_server + "/")
    worker_js = """
        fetch("http://example.invalid/from-worker").then(
          () => postMessage("loaded"), () => postMessage("failed"));
    """
    page.context.route(
        site_server + "/__probe/worker.js",
        lambda route: route.fulfill(body=worker_js, content_type="text/javascript"),
    )
    outcome = page.evaluate(
        """() => new Promise((resolve) => {
             const w = new Worker("/__probe/worker.js", { type: "module" });
             w.onmessage = (e) => resolve(e.data);
             w.onerror = (e) => resolve("worker error: " + e.message);
           })"""
    )
    assert outcome == "failed"
    assert "http://example.invalid/from-worker" in page_log.offorigin

    with pytest.raises(PlaywrightError):
        page.goto("http://example.invalid/from-page")
    assert "http://example.invalid/from-page" in page_log.offorigin


@pytest.mark.allow_console_errors
def test_policy_stops_offorigin_fetch_from_the_page(page, page_log, site_server):
    """The first line of defence: the policy refuses the fetch outright, so it
    never reaches the network (the guard sees nothing)."""
    page.goto(site_server + "/")
    outcome = page.evaluate(
        """() => new Promise((resolve) => {
             document.addEventListener("securitypolicyviolation",
               (e) => resolve("refused by " + e.effectiveDirective));
             fetch("http://example.invalid/from-page").catch(() => {});
           })"""
    )
    assert outcome == "refused by connect-src"
    assert page_log.offorigin == []


# --- the engine ------------------------------------------------------------------


def test_engine_boots_and_solves_like_cpython(page, page_log, site_server):
    page.goto(site_server + "/")
    out = with_engine(
        page,
        """
        const [scenario, bad] = arg;
        const states = [];
        engine.onStatus((s) => states.push(s));
        await engine.ready;
        const solved = await engine.requestWithTiming("solve", scenario);
        const asError = (p) => p.then(
          (r) => ({ resolved: r }),
          (e) => ({ message: e.message, field: e.field, superseded: e.superseded === true,
                    isError: e instanceof Error }));
        const bad_reply = await asError(engine.request("solve", bad));
        const unknown = await asError(engine.request("no_such_command", {}));
        return { states, solved, bad_reply, unknown };
        """,
        [SCENARIO, BAD_SCENARIO],
    )

    states = out["states"]
    assert [s["state"] for s in states][-1] == "ready", states
    details = [s["detail"] for s in states if s["state"] == "loading"]
    assert details == ["Starting Python", "Loading solver"], states
    assert all(isinstance(s["elapsed_ms"], (int, float)) and s["elapsed_ms"] >= 0 for s in states)

    expected = cpython_call("solve", SCENARIO)
    assert expected["ok"] is True, expected
    assert out["solved"]["result"] == expected["result"]
    assert isinstance(out["solved"]["ms"], (int, float)) and out["solved"]["ms"] >= 0

    bad_expected = cpython_call("solve", BAD_SCENARIO)
    assert bad_expected["ok"] is False
    bad = out["bad_reply"]
    assert bad["isError"] and not bad["superseded"]
    assert bad["field"] == bad_expected["error"]["field"]
    assert bad["message"] == bad_expected["error"]["message"]

    unknown = out["unknown"]
    assert unknown["isError"] and unknown["field"] == "command"
    assert "no_such_command" in unknown["message"]
    assert page_log.offorigin == []


BOOT_FAILURE = """
  const states = [];
  engine.onStatus((s) => states.push(s));
  const early = engine.request("solve", {}).then(() => "resolved", (e) => e.message);
  const ready = await engine.ready.then(() => "resolved", (e) => e.message);
  const late = await engine.request("solve", {}).then(() => "resolved", (e) => e.message);
  return { states, early: await early, ready, late };
"""


@pytest.mark.allow_console_errors
def test_boot_failure_is_reported_and_requests_rejected(page, site_server):
    """If the build's files cannot be had, the worker says "failed" in plain
    words, `ready` rejects and requests are rejected with a message."""
    page.context.route(site_server + "/build-info.json", lambda route: route.fulfill(status=404, body="gone"))
    open_blank(page, site_server)
    out = with_engine(page, BOOT_FAILURE)
    last = out["states"][-1]
    assert last["state"] == "failed", out
    assert "build-info.json" in last["detail"] and "404" in last["detail"], out
    assert "build-info.json" in out["ready"]
    assert out["early"].startswith("The solver could not start") and "404" in out["early"]
    assert out["late"].startswith("The solver could not start")


def test_requests_superseded_on_the_same_channel(page, site_server):
    """Requests sent before the engine is ready wait in the worker's queue;
    of those on one channel only the newest runs. Requests without a channel,
    or on another channel, all run."""
    open_blank(page, site_server)
    out = with_engine(
        page,
        """
        const scenario = arg;
        const settle = (p) => p.then(
          (result) => ({ ok: true, result }),
          (e) => ({ ok: false, superseded: e.superseded === true, message: e.message }));
        // All sent at once, before the worker has booted.
        return await Promise.all([
          settle(engine.request("solve", scenario, { channel: "main" })),
          settle(engine.request("solve", scenario)),
          settle(engine.request("solve", scenario, { channel: "main" })),
          settle(engine.request("solve", scenario, { channel: "other" })),
          settle(engine.request("solve", scenario, { channel: "main" })),
        ]);
        """,
        SCENARIO,
    )
    assert [r["ok"] for r in out] == [False, True, False, True, True], out
    assert out[0]["superseded"] and out[2]["superseded"], out
    expected = cpython_call("solve", SCENARIO)["result"]
    assert out[1]["result"] == out[3]["result"] == out[4]["result"] == expected


# Run by a probe worker: JavaScript eval and new Function must be refused,
# WebAssembly compilation allowed. (Evaluation sent through the DevTools
# protocol, as page.evaluate and worker.evaluate do, is exempt from the page's
# policy, so probes must run as the site's own scripts do: loaded from a URL.)
EVAL_PROBE_JS = """
const tryIt = (f) => { try { f(); return "ran"; } catch (e) { return e.name; } };
const wasm = new Uint8Array([0, 97, 115, 109, 1, 0, 0, 0]);  // empty module
const result = {
  eval: tryIt(() => eval("1 + 1")),
  function: tryIt(() => new Function("return 1")()),
};
WebAssembly.compile(wasm).then(
  () => { result.wasm = "compiled"; },
  (e) => { result.wasm = e.name; },
).then(() => (self.__probeDone ? self.__probeDone(result) : postMessage(result)));
"""


def probe_in_worker(page, site_server, headers: dict) -> dict:
    route_url = site_server + "/__probe/eval-worker.js"
    page.context.route(
        route_url,
        lambda route: route.fulfill(body=EVAL_PROBE_JS, content_type="text/javascript", headers=headers),
    )
    return page.evaluate(
        """(url) => new Promise((resolve) => {
             const w = new Worker(url, { type: "module" });
             w.onmessage = (e) => { resolve(e.data); w.terminate(); };
             w.onerror = (e) => resolve({ error: e.message });
           })""",
        route_url,
    )


@pytest.mark.allow_console_errors
def test_engine_worker_runs_under_the_policy(page, site_server):
    """Pyodide boots in a worker whose response carries the policy. A probe
    worker served with that same response's headers can compile WebAssembly
    but not eval JavaScript: the policy needs 'wasm-unsafe-eval' and no
    'unsafe-eval'. Without 'wasm-unsafe-eval' WebAssembly is refused, so that
    keyword is what lets Pyodide run."""
    worker_headers = {}

    def on_response(response):
        if response.url.endswith("/js/engine-worker.js"):
            worker_headers.update(response.headers)

    page.context.on("response", on_response)
    open_blank(page, site_server)
    result = with_engine(page, "await engine.ready; return await engine.request('solve', arg);", SCENARIO)
    assert result == cpython_call("solve", SCENARIO)["result"]
    assert worker_headers.get("content-security-policy") == CSP_HEADER

    served = {k: v for k, v in worker_headers.items() if k.lower() in {"content-security-policy", "cache-control"}}
    probe = probe_in_worker(page, site_server, served)
    assert probe == {"eval": "EvalError", "function": "EvalError", "wasm": "compiled"}

    no_wasm = CSP_HEADER.replace(" 'wasm-unsafe-eval'", "")
    page.context.unroute(site_server + "/__probe/eval-worker.js")
    probe = probe_in_worker(page, site_server, {"Content-Security-Policy": no_wasm})
    assert probe["wasm"] == "CompileError", probe


@pytest.mark.allow_console_errors
def test_boot_fails_clearly_when_policy_refuses_webassembly(page, site_server):
    """Served under a policy without 'wasm-unsafe-eval', the worker must say
    so and fail, rather than wait forever (Pyodide itself never settles)."""
    no_wasm = CSP_HEADER.replace(" 'wasm-unsafe-eval'", "")

    def strict(route):
        response = route.fetch()
        headers = dict(response.headers, **{"content-security-policy": no_wasm})
        route.fulfill(response=response, headers=headers)

    page.context.route(site_server + "/js/engine-worker.js", strict)
    open_blank(page, site_server)
    out = with_engine(page, BOOT_FAILURE)
    last = out["states"][-1]
    assert last["state"] == "failed", out
    assert "wasm-unsafe-eval" in last["detail"], out
    assert "wasm-unsafe-eval" in out["ready"] and "wasm-unsafe-eval" in out["late"]


# --- the policy on the page -----------------------------------------------------

PAGE_PROBE = """
(probeUrl) => new Promise((resolve) => {
  const violations = [];
  document.addEventListener("securitypolicyviolation", (e) => violations.push(e.effectiveDirective));
  const inline = document.createElement("script");
  inline.textContent = "window.__inlineRan = true;";
  document.head.append(inline);
  // The eval probe, loaded from a URL as the site's own modules are.
  window.__probeDone = (r) => {
    // Violation events are queued; give them a turn to arrive.
    setTimeout(() => resolve({ inlineRan: window.__inlineRan === true, violations, ...r }), 50);
  };
  const external = document.createElement("script");
  external.type = "module";
  external.src = probeUrl;
  document.head.append(external);
})
"""


def probe_page(page, site_server) -> dict:
    probe_url = site_server + "/__probe/eval-page.js"
    page.context.route(
        probe_url,
        lambda route: route.fulfill(body=EVAL_PROBE_JS, content_type="text/javascript"),
    )
    return page.evaluate(PAGE_PROBE, probe_url)


@pytest.mark.allow_console_errors
def test_policy_header_blocks_inline_script_and_eval(page, site_server):
    response = page.goto(site_server + "/")
    assert response.headers.get("content-security-policy") == CSP_HEADER
    out = probe_page(page, site_server)
    assert out["inlineRan"] is False
    assert "script-src-elem" in out["violations"]
    assert out["eval"] == out["function"] == "EvalError"
    assert out["wasm"] == "compiled"


@pytest.mark.allow_console_errors
def test_meta_policy_alone_blocks_inline_script_and_eval(page, site_server):
    """As on a static host that sends no headers: the page's own meta tag
    must enforce the policy by itself."""

    def without_header(route):
        response = route.fetch()
        headers = {k: v for k, v in response.headers.items() if k.lower() != "content-security-policy"}
        route.fulfill(response=response, headers=headers)

    page.route(site_server + "/", without_header)
    response = page.goto(site_server + "/")
    assert "content-security-policy" not in response.headers
    meta = page.eval_on_selector(
        'meta[http-equiv="Content-Security-Policy"]', "m => m.getAttribute('content')"
    )
    assert meta == CSP_META
    out = probe_page(page, site_server)
    assert out["inlineRan"] is False
    assert "script-src-elem" in out["violations"]
    assert out["eval"] == out["function"] == "EvalError"
