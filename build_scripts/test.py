#!/usr/bin/env python3
"""The test command: install, find a browser, build, run the tests.

    python3 build_scripts/test.py [pytest arguments]

1. `pip install -e '.[test]'` (skipped when this checkout is already
   installed in editable mode with every requirement met);
2. find Chromium: $SEQPICK_CHROMIUM, else `chromium` on PATH, else (as root
   with apt-get) Debian's package `chromium`, else Playwright's own download
   (`python -m playwright install chromium`, for machines with open internet);
   and pdftotext (Debian's `poppler-utils`, the same way) for the print test;
3. build the site (build_scripts/build.py);
4. `python -m pytest [arguments]` (tests/ by default), with the browser's
   path in SEQPICK_CHROMIUM. Exits with pytest's status, except that
   "no tests collected" (5) counts as a failure.
"""

from __future__ import annotations

import json
import os
import shutil
import subprocess
import sys
import time
import tomllib
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]


def say(msg: str) -> None:
    print(f"test: {msg}", flush=True)


def die(msg: str) -> None:
    print(f"test: {msg}", file=sys.stderr, flush=True)
    sys.exit(1)


def run_quiet(cmd: list[str], what: str, env: dict | None = None) -> None:
    """Run *cmd*, showing its output only if it fails."""
    proc = subprocess.run(cmd, cwd=ROOT, capture_output=True, text=True, env=env)
    if proc.returncode != 0:
        sys.stderr.write(proc.stdout + proc.stderr)
        die(f"{what} failed (exit {proc.returncode}): {' '.join(cmd)}")


# --- 1. install ---------------------------------------------------------------


def install_satisfied() -> bool:
    """True if this checkout is installed editable and every requirement of
    pyproject.toml (dependencies and the test extra) is met."""
    try:
        from importlib import metadata

        from pip._vendor.packaging.requirements import Requirement
    except ImportError:
        return False
    try:
        dist = metadata.distribution("seqpick")
        direct = json.loads(dist.read_text("direct_url.json") or "{}")
    except (metadata.PackageNotFoundError, ValueError):
        return False
    if direct.get("url") != ROOT.as_uri() or not direct.get("dir_info", {}).get("editable"):
        return False
    project = tomllib.loads((ROOT / "pyproject.toml").read_text())["project"]
    if dist.version != project.get("version"):
        return False
    wanted = list(project.get("dependencies", [])) + list(
        project.get("optional-dependencies", {}).get("test", [])
    )
    for text in wanted:
        req = Requirement(text)
        if req.marker is not None and not req.marker.evaluate({"extra": "test"}):
            continue
        try:
            version = metadata.version(req.name)
        except metadata.PackageNotFoundError:
            return False
        if not req.specifier.contains(version, prereleases=True):
            return False
    return True


def install() -> None:
    if install_satisfied():
        say("install: already satisfied")
        return
    t0 = time.perf_counter()
    env = dict(os.environ, PIP_ROOT_USER_ACTION="ignore", PIP_DISABLE_PIP_VERSION_CHECK="1")
    run_quiet([sys.executable, "-m", "pip", "install", "--quiet", "-e", ".[test]"], "pip install", env)
    say(f"install: pip install -e '.[test]' done in {time.perf_counter() - t0:.1f} s")


# --- 2. browser -------------------------------------------------------------------


def find_browser() -> str:
    given = os.environ.get("SEQPICK_CHROMIUM")
    if given:
        if not Path(given).exists():
            die(f"SEQPICK_CHROMIUM={given} does not exist")
        return given
    found = shutil.which("chromium")
    if found:
        return found

    is_root = hasattr(os, "geteuid") and os.geteuid() == 0
    if is_root and shutil.which("apt-get"):
        say("browser: installing Debian's chromium with apt-get")
        env = dict(os.environ, DEBIAN_FRONTEND="noninteractive")
        run_quiet(["apt-get", "update", "-qq"], "apt-get update", env)
        run_quiet(["apt-get", "install", "-y", "-qq", "chromium"], "apt-get install chromium", env)
        found = shutil.which("chromium")
        if found:
            return found

    say("browser: no chromium on PATH; trying `python -m playwright install chromium`")
    run_quiet([sys.executable, "-m", "playwright", "install", "chromium"], "playwright install")
    proc = subprocess.run(
        [sys.executable, "-c",
         "from playwright.sync_api import sync_playwright\n"
         "with sync_playwright() as pw: print(pw.chromium.executable_path)"],
        capture_output=True, text=True,
    )
    path = proc.stdout.strip()
    if proc.returncode == 0 and path and Path(path).exists():
        return path
    die("no Chromium could be found or installed; set SEQPICK_CHROMIUM to a Chromium binary")
    raise AssertionError  # unreachable


def ensure_pdftotext() -> None:
    """pdftotext (Debian's poppler-utils) reads the printed plan's PDF in
    tests/e2e/test_share_export.py; installed like chromium (as root with
    apt-get) when missing. Without it that check is skipped, not failed."""
    if shutil.which("pdftotext"):
        return
    is_root = hasattr(os, "geteuid") and os.geteuid() == 0
    if not (is_root and shutil.which("apt-get")):
        say("pdftotext: not found and cannot be installed here; the PDF text check will be skipped")
        return
    say("pdftotext: installing Debian's poppler-utils with apt-get")
    env = dict(os.environ, DEBIAN_FRONTEND="noninteractive")
    run_quiet(["apt-get", "update", "-qq"], "apt-get update", env)
    run_quiet(["apt-get", "install", "-y", "-qq", "poppler-utils"], "apt-get install poppler-utils", env)


# --- 3 and 4 --------------------------------------------------------------------


def main(argv: list[str]) -> int:
    install()
    browser = find_browser()
    say(f"browser: {browser}")
    ensure_pdftotext()

    build = subprocess.run([sys.executable, str(ROOT / "build_scripts" / "build.py")], cwd=ROOT)
    if build.returncode != 0:
        die("build failed")

    env = dict(os.environ, SEQPICK_CHROMIUM=browser, SEQPICK_SITE_BUILT="1")
    status = subprocess.run([sys.executable, "-m", "pytest", *argv], cwd=ROOT, env=env).returncode
    if status == 5:
        print("test: pytest collected no tests; that counts as a failure", file=sys.stderr)
        return 1
    return status


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
