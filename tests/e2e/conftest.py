"""Fixtures for end-to-end tests in headless Chromium against the built site.

* ``site_server`` (session): runs ``build_scripts/serve.py --port 0`` and
  yields its origin, e.g. "http://127.0.0.1:41234". When the test command has
  just built the site (SEQPICK_SITE_BUILT=1) the server is started with
  ``--no-build``; otherwise it builds first (fast when cached).
* ``browser`` (session): Playwright's Chromium, from SEQPICK_CHROMIUM or
  ``chromium`` on PATH.
* ``page`` (function): a page in a fresh context. Every request is routed:
  only the server's origin goes through; anything else is recorded and
  aborted. At teardown the test fails if any off-origin request was made or
  any console error, HTTP error (status >= 400) or uncaught page error
  happened. ``page_log`` holds what was recorded, for tests that look at it.

Markers to opt out of the teardown checks, for tests that provoke them:
  @pytest.mark.allow_offorigin        off-origin requests are expected
  @pytest.mark.allow_console_errors   console errors are expected
"""

from __future__ import annotations

import os
import re
import shutil
import subprocess
import sys
import threading
from dataclasses import dataclass, field
from pathlib import Path

import pytest
from playwright.sync_api import expect

ROOT = Path(__file__).resolve().parents[2]
SERVE = ROOT / "build_scripts" / "serve.py"
URL_LINE = re.compile(r"^Serving Seqpick at (http://127\.0\.0\.1:\d+)/\s*$")


def pytest_configure(config):
    config.addinivalue_line("markers", "allow_offorigin: the test expects off-origin requests (negative control)")
    config.addinivalue_line("markers", "allow_console_errors: the test expects console errors")


def pytest_collection_modifyitems(config, items):
    here = Path(__file__).parent
    for item in items:
        if here in Path(str(item.fspath)).parents:
            item.add_marker(pytest.mark.e2e)


def find_chromium() -> str | None:
    path = os.environ.get("SEQPICK_CHROMIUM") or shutil.which("chromium")
    if path and Path(path).exists():
        return path
    return None


@pytest.fixture(scope="session")
def site_server():
    cmd = [sys.executable, str(SERVE), "--port", "0"]
    if os.environ.get("SEQPICK_SITE_BUILT") == "1":
        cmd.append("--no-build")
    proc = subprocess.Popen(
        cmd, cwd=ROOT, stdout=subprocess.PIPE, stderr=subprocess.STDOUT, text=True, bufsize=1
    )
    output: list[str] = []
    origin = None
    assert proc.stdout is not None
    for line in proc.stdout:  # ends when the server exits
        output.append(line)
        m = URL_LINE.match(line)
        if m:
            origin = m.group(1)
            break
    if origin is None:
        proc.wait()
        pytest.fail("serve.py exited without serving:\n" + "".join(output))

    # Keep reading the server's output so its pipe never fills up.
    threading.Thread(target=lambda: output.extend(proc.stdout), daemon=True).start()
    try:
        yield origin
    finally:
        proc.terminate()
        try:
            proc.wait(timeout=10)
        except subprocess.TimeoutExpired:
            proc.kill()
            proc.wait()


@pytest.fixture(scope="session")
def browser():
    path = find_chromium()
    if path is None:
        pytest.skip(
            "no Chromium found (set SEQPICK_CHROMIUM or install Debian's chromium; "
            "`python3 build_scripts/test.py` does this for you)"
        )
    from playwright.sync_api import sync_playwright

    args = [
        # No DNS lookups and no connections except to loopback: Chromium's own
        # background requests (which Playwright's routing never sees) fail fast.
        "--host-resolver-rules=MAP * ~NOTFOUND, EXCLUDE 127.0.0.1",
    ]
    if hasattr(os, "geteuid") and os.geteuid() == 0:
        args.append("--no-sandbox")
    with sync_playwright() as pw:
        b = pw.chromium.launch(executable_path=path, headless=True, args=args)
        try:
            yield b
        finally:
            b.close()


@dataclass
class PageLog:
    origin: str
    offorigin: list[str] = field(default_factory=list)
    console_errors: list[str] = field(default_factory=list)
    page_errors: list[str] = field(default_factory=list)
    console: list[str] = field(default_factory=list)
    http_errors: list[str] = field(default_factory=list)


@pytest.fixture
def page_log(site_server) -> PageLog:
    return PageLog(origin=site_server)


@pytest.fixture
def page(browser, site_server, page_log, request):
    context = browser.new_context(service_workers="allow")
    prefix = site_server + "/"

    def guard(route):
        url = route.request.url
        if url.startswith(prefix):
            route.continue_()
        else:
            page_log.offorigin.append(url)
            route.abort()

    # On the context, so requests from workers are seen too.
    context.route("**/*", guard)

    def on_console(msg):
        where = (msg.location or {}).get("url") or "?"
        text = f"{msg.type}: {msg.text} [{where}]"
        page_log.console.append(text)
        if msg.type == "error":
            page_log.console_errors.append(text)

    context.on("console", on_console)
    context.on(
        "response",
        lambda r: page_log.http_errors.append(f"{r.status} {r.url}") if r.status >= 400 else None,
    )
    pg = context.new_page()
    pg.on("pageerror", lambda exc: page_log.page_errors.append(str(exc)))
    pg.set_default_timeout(60_000)
    try:
        yield pg
    finally:
        context.close()

    if not request.node.get_closest_marker("allow_offorigin"):
        assert page_log.offorigin == [], f"requests outside {site_server}: {page_log.offorigin}"
    if not request.node.get_closest_marker("allow_console_errors"):
        assert page_log.console_errors == [], (
            f"console errors: {page_log.console_errors}; HTTP errors: {page_log.http_errors}"
        )
        assert page_log.http_errors == [], f"HTTP errors: {page_log.http_errors}"
        assert page_log.page_errors == [], f"uncaught page errors: {page_log.page_errors}"


@pytest.fixture(autouse=True)
def _patient_expect():
    """Pyodide takes a few seconds to boot: page assertions wait up to a minute."""
    expect.set_options(timeout=60_000)
    yield
    expect.set_options(timeout=5_000)
