"""Offline use in headless Chromium.

One visit installs the service worker (site/sw.js), which stores every file
the build listed in its precache manifest. Then, on a copy of the built site
served by a server of this test's own:

1. a file changes and the build's precache step runs again: the browser
   installs the new worker, which downloads only sw.js and the changed file
   (the others are copied from the old cache) and deletes the old cache;
2. the server is killed, the page is reloaded, and it still boots the solver
   and answers: 100 candidates -> 37.1% (Gilbert & Mosteller 1966, J. Amer.
   Statist. Assoc. 61, 35-73, table for the best-choice problem; from memory;
   also checked against the engine in test_plan_page.py).

The test uses its own browser context with service workers allowed and no
request routing (Playwright's routing does not see requests a service worker
answers); every request is recorded instead and must stay on the origin.
"""

from __future__ import annotations

import json
import re
import shutil
import subprocess
import sys
import threading
import urllib.error
import urllib.request
from pathlib import Path

import pytest
from playwright.sync_api import expect

ROOT = Path(__file__).resolve().parents[2]
DIST_SITE = ROOT / "dist" / "site"
sys.path.insert(0, str(ROOT / "build_scripts"))

import build  # noqa: E402

URL_LINE = re.compile(r"^Serving Seqpick at (http://127\.0\.0\.1:\d+)/\s*$")
REQUEST_LINE = re.compile(r'"GET (\S+) HTTP/[\d.]+" (\d{3})')

# serve.py's own server, on a folder of our choosing, logging every request.
SERVER_CODE = """
import sys
from pathlib import Path
sys.path.insert(0, sys.argv[1])
import serve
server = serve.make_server(Path(sys.argv[2]), 0, verbose=True)
print(f"Serving Seqpick at http://127.0.0.1:{server.server_address[1]}/", flush=True)
server.serve_forever()
"""


class SiteCopy:
    """A copy of dist/site/ served by a subprocess that can be killed."""

    def __init__(self, folder: Path):
        self.folder = folder
        self.requests: list[tuple[str, int]] = []  # (path, status), as the server saw them
        self.proc = subprocess.Popen(
            [sys.executable, "-c", SERVER_CODE, str(ROOT / "build_scripts"), str(folder)],
            stdout=subprocess.PIPE, stderr=subprocess.STDOUT, text=True, bufsize=1,
        )
        assert self.proc.stdout is not None
        self.origin = None
        early = []
        for line in self.proc.stdout:
            early.append(line)
            m = URL_LINE.match(line)
            if m:
                self.origin = m.group(1)
                break
        if self.origin is None:
            self.proc.wait()
            pytest.fail("the test's server did not start:\n" + "".join(early))
        threading.Thread(target=self._read, daemon=True).start()

    def _read(self):
        for line in self.proc.stdout:
            m = REQUEST_LINE.search(line)
            if m:
                self.requests.append((m.group(1), int(m.group(2))))

    def kill(self):
        if self.proc.poll() is None:
            self.proc.kill()
            self.proc.wait(timeout=10)


@pytest.fixture
def site_copy(site_server, tmp_path):
    # site_server: the session's server has built dist/site/ (when needed).
    folder = tmp_path / "site"
    shutil.copytree(DIST_SITE, folder)
    served = SiteCopy(folder)
    try:
        yield served
    finally:
        served.kill()


def manifest_of(folder: Path) -> dict:
    text = (folder / "sw.js").read_text(encoding="utf-8")
    m = re.search(r"/\*PRECACHE\*/(.*?)/\*END PRECACHE\*/", text, re.S)
    assert m, "sw.js has no precache block"
    return json.loads(m.group(1))


CACHE_STATE = """async () => {
  const names = (await caches.keys()).filter((n) => n.startsWith("seqpick-"));
  const out = {};
  for (const name of names) {
    const keys = await (await caches.open(name)).keys();
    out[name] = keys.map((r) => new URL(r.url).pathname.replace(/^\\//, "")).sort();
  }
  return {caches: out, controlled: navigator.serviceWorker.controller !== null};
}"""


def wait_for_cache(page, version: str, files: list[str], what: str) -> dict:
    """Poll until the cache of `version` is the only one, holds `files` and
    controls the page (an install takes a moment after the page is ready)."""
    want = {f"seqpick-{version}": sorted(files)}
    state = None
    for _ in range(240):
        state = page.evaluate(CACHE_STATE)
        if state["controlled"] and state["caches"] == want:
            return state
        page.wait_for_timeout(250)
    pytest.fail(f"{what}: the service worker's cache never became {version} with {len(files)} files; last seen: "
                f"{ {k: len(v) for k, v in (state or {}).get('caches', {}).items()} }, "
                f"controlled={(state or {}).get('controlled')}")


def summary(page):
    return page.get_by_role("region", name="Plan summary")


def test_update_then_offline_reload_still_computes(browser, site_copy):
    origin = site_copy.origin
    first = manifest_of(site_copy.folder)
    assert "index.html" in first["files"] and "sw.js" not in first["files"]
    assert any(f.startswith("pyodide/") for f in first["files"])

    context = browser.new_context(service_workers="allow")
    seen: list[str] = []
    errors: list[str] = []
    context.on("request", lambda r: seen.append(r.url))
    context.on("console", lambda m: errors.append(f"{m.text} [{(m.location or {}).get('url')}]") if m.type == "error" else None)
    page = context.new_page()
    page.on("pageerror", lambda e: errors.append(str(e)))
    page.set_default_timeout(60_000)
    try:
        page.goto(origin + "/")
        expect(page.locator("#engine-status")).to_have_attribute("data-state", "ready")
        wait_for_cache(page, first["version"], list(first["files"]), "first visit")

        # --- a new build with one changed file ---------------------------------------
        changed = "css/charts.css"
        with open(site_copy.folder / changed, "a", encoding="utf-8") as fh:
            fh.write("\n/* offline test: changed */\n")
        second = build.inject_precache(site_copy.folder)
        assert second["version"] != first["version"]
        assert {f for f in first["files"] if first["files"][f] != second["files"][f]} == {changed}
        before = len(site_copy.requests)
        page.evaluate("async () => { await (await navigator.serviceWorker.getRegistration()).update(); }")
        wait_for_cache(page, second["version"], list(second["files"]), "after the update")
        fetched = {path.split("?")[0] for path, _ in site_copy.requests[before:]}
        assert fetched == {"/sw.js", "/" + changed}, f"the update downloaded more than the change: {sorted(fetched)}"

        # --- the server goes away --------------------------------------------------
        site_copy.kill()
        with pytest.raises(urllib.error.URLError):
            urllib.request.urlopen(origin + "/", timeout=5)

        page.reload()
        expect(page.locator("#engine-status")).to_have_attribute("data-state", "ready")
        page.get_by_label("Number of candidates").fill("100")
        expect(summary(page)).to_contain_text("37.1%")
        expect(summary(page)).to_contain_text("of 100 candidates")
        # The files come from the new cache...
        text = page.evaluate("async () => (await fetch('css/charts.css')).text()")
        assert "offline test: changed" in text
        # ...and the network really is gone: a file outside the manifest fails.
        probe = page.evaluate(
            "async () => { try { await fetch('not-in-the-site-' + Date.now()); return 'reached'; }"
            " catch { return 'failed'; } }"
        )
        assert probe == "failed"
    finally:
        context.close()

    # The probe's failure is the only error allowed.
    errors = [e for e in errors if "not-in-the-site-" not in e]
    assert errors == [], f"console or page errors: {errors}"
    outside = [u for u in seen if not u.startswith(origin + "/")]
    assert outside == [], f"requests outside {origin}: {outside}"
    assert not [p for p, status in site_copy.requests if status >= 400], site_copy.requests
