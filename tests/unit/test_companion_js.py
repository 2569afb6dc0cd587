"""Runs the live view's JavaScript unit tests (tests/js/*.test.mjs) with
Node's built-in test runner; skipped when Node is not installed."""

from __future__ import annotations

import shutil
import subprocess
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[2]
JS_TESTS = sorted((ROOT / "tests" / "js").glob("*.test.mjs"))


@pytest.mark.skipif(shutil.which("node") is None, reason="Node.js is not installed")
@pytest.mark.parametrize("path", JS_TESTS, ids=lambda p: p.name)
def test_node_unit_tests(path):
    proc = subprocess.run(["node", "--test", str(path)], cwd=ROOT, capture_output=True, text=True, timeout=120)
    assert proc.returncode == 0, proc.stdout[-4000:] + proc.stderr[-2000:]
    assert "# fail 0" in proc.stdout and "# pass 0" not in proc.stdout, proc.stdout[-2000:]
