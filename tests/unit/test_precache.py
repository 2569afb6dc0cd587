"""The build's precache step (build_scripts/build.py: precache_manifest,
inject_precache) and the pins of the vendored npm files. No network, no browser."""

from __future__ import annotations

import base64
import hashlib
import json
import re
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[2]
sys.path.insert(0, str(ROOT / "build_scripts"))

import build  # noqa: E402

BLOCK = re.compile(r"/\*PRECACHE\*/(.*?)/\*END PRECACHE\*/", re.S)


def make_site(folder: Path) -> None:
    (folder / "js").mkdir(parents=True)
    (folder / "index.html").write_text("<!doctype html><title>x</title>\n")
    (folder / "js" / "app.js").write_text("export {};\n")
    (folder / "sw.js").write_text((ROOT / "site" / "sw.js").read_text())


def block_of(folder: Path) -> dict:
    m = BLOCK.search((folder / "sw.js").read_text())
    assert m
    return json.loads(m.group(1))


def test_manifest_lists_every_file_but_the_worker_with_its_sha256(tmp_path):
    make_site(tmp_path)
    m = build.precache_manifest(tmp_path)
    assert sorted(m["files"]) == ["index.html", "js/app.js"]
    assert m["files"]["js/app.js"] == hashlib.sha256(b"export {};\n").hexdigest()
    assert re.fullmatch(r"[0-9a-f]{20}", m["version"])


def test_version_changes_exactly_when_a_file_does(tmp_path):
    make_site(tmp_path)
    v0 = build.precache_manifest(tmp_path)["version"]
    assert build.precache_manifest(tmp_path)["version"] == v0  # nothing changed
    (tmp_path / "sw.js").write_text((tmp_path / "sw.js").read_text() + "// note\n")
    assert build.precache_manifest(tmp_path)["version"] == v0  # the worker itself is not listed

    app = tmp_path / "js" / "app.js"
    app.write_text("export const x = 1;\n")
    v1 = build.precache_manifest(tmp_path)["version"]
    assert v1 != v0
    app.write_text("export {};\n")
    assert build.precache_manifest(tmp_path)["version"] == v0  # content, not time

    (tmp_path / "js" / "app2.js").write_text("export {};\n")
    v2 = build.precache_manifest(tmp_path)["version"]
    (tmp_path / "js" / "app2.js").rename(tmp_path / "js" / "app3.js")
    v3 = build.precache_manifest(tmp_path)["version"]
    assert len({v0, v1, v2, v3}) == 4  # added and renamed files count too


def test_inject_writes_the_manifest_into_the_worker(tmp_path):
    make_site(tmp_path)
    m = build.inject_precache(tmp_path)
    assert block_of(tmp_path) == m
    before = (tmp_path / "sw.js").read_text()
    assert build.inject_precache(tmp_path) == m
    assert (tmp_path / "sw.js").read_text() == before  # idempotent
    (tmp_path / "index.html").write_text("<!doctype html><title>y</title>\n")
    m2 = build.inject_precache(tmp_path)
    assert block_of(tmp_path) == m2 and m2["version"] != m["version"]


def test_inject_without_worker_or_markers(tmp_path):
    assert build.inject_precache(tmp_path) is None
    (tmp_path / "sw.js").write_text("// no markers\n")
    with pytest.raises(build.BuildError, match="PRECACHE"):
        build.inject_precache(tmp_path)


def test_source_worker_has_one_unbuilt_block():
    text = (ROOT / "site" / "sw.js").read_text()
    found = BLOCK.findall(text)
    assert len(found) == 1
    assert json.loads(found[0]) == {"version": "unbuilt", "files": {}}


def test_built_worker_matches_the_built_site():
    dist = ROOT / "dist" / "site"
    if not (dist / "sw.js").is_file():
        pytest.skip("site not built (python3 build_scripts/build.py)")
    m = block_of(dist)
    assert m == build.precache_manifest(dist)
    assert "index.html" in m["files"] and "vendor/uplot/dist/uPlot.esm.js" in m["files"]
    # The test-only library is never shipped.
    assert not any("axe" in f for f in m["files"])


@pytest.mark.parametrize("entries", [build.VENDOR_NPM, build.VENDOR_NPM_TESTS])
def test_vendor_pins_are_exact_versions_with_sha512(entries):
    assert entries
    for package, version, integrity, files in entries:
        assert re.fullmatch(r"\d+\.\d+\.\d+", version), (package, version)
        algorithm, _, b64 = integrity.partition("-")
        assert algorithm == "sha512" and len(base64.b64decode(b64, validate=True)) == 64
        assert files and all(not f.startswith("/") and ".." not in f for f in files)


def test_vendor_for_tests_uses_the_pinned_tarball(tmp_path):
    import io
    import tarfile

    tarball = tmp_path / "src" / "checker-1.0.0.tgz"
    tarball.parent.mkdir()
    with tarfile.open(tarball, "w:gz") as tar:
        data = b"window.checker = 1;\n"
        info = tarfile.TarInfo("package/checker.min.js")
        info.size = len(data)
        tar.addfile(info, io.BytesIO(data))
    from common import file_sri

    entries = [("checker", "1.0.0", file_sri(tarball), ["checker.min.js"])]

    def pack(spec, dest):
        out = dest / tarball.name
        out.write_bytes(tarball.read_bytes())
        return out

    got = build.vendor_for_tests(entries, tmp_path / "cache", pack)
    assert list(got) == ["checker/checker.min.js"]
    assert got["checker/checker.min.js"].read_bytes() == b"window.checker = 1;\n"
