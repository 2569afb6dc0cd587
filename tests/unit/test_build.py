"""Unit tests for the build helpers (no network, no browser)."""

from __future__ import annotations

import io
import json
import shutil
import subprocess
import sys
import tarfile
import urllib.request
import zipfile
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[2]
sys.path.insert(0, str(ROOT / "build_scripts"))

import build  # noqa: E402
import common  # noqa: E402
import serve  # noqa: E402


def make_npm_tarball(path: Path, files: dict[str, bytes], top: str = "package") -> str:
    """Write an npm-style tarball (files under one top folder); return its SRI."""
    with tarfile.open(path, "w:gz") as tar:
        for name, data in files.items():
            info = tarfile.TarInfo(f"{top}/{name}")
            info.size = len(data)
            tar.addfile(info, io.BytesIO(data))
    return common.file_sri(path)


def fake_pack(tarball: Path, calls: list[str]):
    """A stand-in for `npm pack`: copies a local tarball where npm would put it."""

    def pack(spec: str, dest_dir: Path) -> Path:
        calls.append(spec)
        out = dest_dir / tarball.name
        shutil.copyfile(tarball, out)
        return out

    return pack


# --- integrity ----------------------------------------------------------------


def test_verify_integrity_accepts_the_right_hash_and_rejects_others(tmp_path):
    f = tmp_path / "x.tgz"
    f.write_bytes(b"some bytes")
    good = common.sri(b"some bytes")
    common.verify_integrity(f, good)
    common.verify_integrity(f, "sha512-AAAA " + good)  # one match of several is enough
    with pytest.raises(common.IntegrityError, match="mismatch"):
        common.verify_integrity(f, common.sri(b"other bytes"))
    with pytest.raises(common.IntegrityError, match="unsupported"):
        common.verify_integrity(f, "md5-abc")
    with pytest.raises(common.IntegrityError):
        common.verify_integrity(f, "")


def test_sri_matches_npm_format():
    # `printf abc | openssl dgst -sha512 -binary | base64`
    assert common.sri(b"abc") == (
        "sha512-3a81oZNherrMQXNJriBBMRLm+k6JqX6iCp7u5ktV05ohkpkqJ0/BqDa6PCOj/uu9RU1EI2Q86A4qmslPpUyknw=="
    )


def test_pinned_pyodide_integrity_is_an_sri_string():
    algorithm, _, b64 = build.PYODIDE_INTEGRITY.partition("-")
    assert algorithm == "sha512"
    import base64

    assert len(base64.b64decode(b64, validate=True)) == 64


def test_download_with_wrong_integrity_fails_and_caches_nothing(tmp_path):
    tarball = tmp_path / "src" / "lib-1.0.0.tgz"
    tarball.parent.mkdir()
    make_npm_tarball(tarball, {"index.js": b"export default 1;\n"})
    cache = tmp_path / "cache"
    calls: list[str] = []
    with pytest.raises(common.IntegrityError):
        build.ensure_npm_tarball("lib", "1.0.0", common.sri(b"not it"), cache, fake_pack(tarball, calls))
    assert calls == ["lib@1.0.0"]
    assert not (cache / "lib-1.0.0.tgz").exists()


def test_tampered_cached_tarball_fails_the_build(tmp_path):
    tarball = tmp_path / "src" / "lib-1.0.0.tgz"
    tarball.parent.mkdir()
    integrity = make_npm_tarball(tarball, {"index.js": b"export default 1;\n"})
    cache = tmp_path / "cache"
    calls: list[str] = []
    got = build.ensure_npm_tarball("lib", "1.0.0", integrity, cache, fake_pack(tarball, calls))
    assert got == cache / "lib-1.0.0.tgz" and calls == ["lib@1.0.0"]
    # Second call: served from the cache, no download.
    build.ensure_npm_tarball("lib", "1.0.0", integrity, cache, fake_pack(tarball, calls))
    assert calls == ["lib@1.0.0"]
    with open(got, "ab") as f:
        f.write(b"\0")
    with pytest.raises(common.IntegrityError, match="delete it"):
        build.ensure_npm_tarball("lib", "1.0.0", integrity, cache, fake_pack(tarball, calls))


# --- vendoring -------------------------------------------------------------------


def test_vendoring_from_a_local_fake_tarball(tmp_path):
    tarball = tmp_path / "src" / "fancy-lib-2.1.0.tgz"
    tarball.parent.mkdir()
    files = {
        "package.json": b'{"name": "@acme/fancy-lib", "version": "2.1.0"}',
        "dist/fancy.min.js": b"export const fancy = 42;\n",
        "dist/fancy.css": b".fancy{color:red}\n",
        "src/unused.js": b"// not vendored\n",
    }
    integrity = make_npm_tarball(tarball, files)
    cache = tmp_path / "cache"
    calls: list[str] = []
    entries = [("@acme/fancy-lib", "2.1.0", integrity, ["dist/fancy.min.js", "dist/fancy.css"])]

    plan = build.vendor_npm(entries, cache, fake_pack(tarball, calls))
    assert calls == ["@acme/fancy-lib@2.1.0"]
    assert sorted(plan) == ["vendor/@acme/fancy-lib/dist/fancy.css", "vendor/@acme/fancy-lib/dist/fancy.min.js"]
    assert plan["vendor/@acme/fancy-lib/dist/fancy.min.js"].read_bytes() == files["dist/fancy.min.js"]

    # Into a site tree, through the same sync step the build uses.
    site = tmp_path / "site"
    report = build.sync_tree(site, dict(plan))
    assert (site / "vendor/@acme/fancy-lib/dist/fancy.css").read_bytes() == files["dist/fancy.css"]
    assert len(report.written) == 2
    assert not (site / "vendor/@acme/fancy-lib/src").exists()

    # Again: nothing downloaded, nothing written.
    plan2 = build.vendor_npm(entries, cache, fake_pack(tarball, calls))
    assert calls == ["@acme/fancy-lib@2.1.0"]
    assert build.sync_tree(site, dict(plan2)).written == []


def test_vendoring_rejects_missing_files_and_unsafe_paths(tmp_path):
    tarball = tmp_path / "src" / "lib-1.0.0.tgz"
    tarball.parent.mkdir()
    integrity = make_npm_tarball(tarball, {"a.js": b"1"})
    cache = tmp_path / "cache"
    with pytest.raises(build.BuildError, match="no file 'b.js'"):
        build.vendor_npm([("lib", "1.0.0", integrity, ["b.js"])], cache, fake_pack(tarball, []))
    with pytest.raises(build.BuildError, match="unsafe"):
        build.vendor_npm([("lib", "1.0.0", integrity, ["../a.js"])], cache, fake_pack(tarball, []))


# --- sync, HTML, wheel -------------------------------------------------------------


def test_sync_tree_writes_changes_only_and_removes_strays(tmp_path):
    src = tmp_path / "a.bin"
    src.write_bytes(b"A" * 100)
    dest = tmp_path / "out"
    r1 = build.sync_tree(dest, {"a.bin": src, "x/b.txt": b"hello"})
    assert sorted(r1.written) == ["a.bin", "x/b.txt"]
    (dest / "stale.txt").write_text("old")
    r2 = build.sync_tree(dest, {"a.bin": src, "x/b.txt": b"hello"})
    assert r2.written == [] and r2.unchanged == 2 and r2.removed == ["stale.txt"]
    r3 = build.sync_tree(dest, {"a.bin": src, "x/b.txt": b"hello!"})
    assert r3.written == ["x/b.txt"] and (dest / "x/b.txt").read_bytes() == b"hello!"
    r4 = build.sync_tree(dest, {"a.bin": src})
    assert r4.removed == ["x/b.txt"] and not (dest / "x").exists()


def test_inject_csp_meta_puts_policy_first_in_head_and_replaces_old_one():
    html = (
        "<!doctype html><html><HEAD lang=en>\n"
        '<meta http-equiv="content-security-policy" content="default-src *">\n'
        '<meta charset="utf-8"><script type="module" src="js/app.js"></script></head><body></body></html>'
    )
    out = build.inject_csp_meta(html)
    assert out.count("Content-Security-Policy") == 1 and "default-src *" not in out
    assert out.index("Content-Security-Policy") < out.index("<script")
    assert f'content="{common.CSP_META}"' in out
    assert build.inject_csp_meta(out) == out  # idempotent
    with pytest.raises(build.BuildError):
        build.inject_csp_meta("<html><body></body></html>")


def test_meta_policy_is_header_policy_without_frame_ancestors():
    assert "frame-ancestors 'none'" in common.CSP_HEADER
    assert "frame-ancestors" not in common.CSP_META
    header = [d for d in common.CSP_HEADER.split("; ") if not d.startswith("frame-ancestors")]
    assert common.CSP_META.split("; ") == header
    assert "script-src 'self' 'wasm-unsafe-eval'" in common.CSP_HEADER
    assert "'unsafe-eval'" not in common.CSP_HEADER and "'unsafe-inline'" not in common.CSP_HEADER


def test_wheel_is_deterministic_and_installable(tmp_path):
    name, data = build.build_wheel()
    assert name.startswith("seqpick-") and name.endswith("-py3-none-any.whl")
    assert build.build_wheel() == (name, data)
    with zipfile.ZipFile(io.BytesIO(data)) as zf:
        names = zf.namelist()
        assert "seqpick/__init__.py" in names
        assert not any("__pycache__" in n or n.endswith(".pyc") for n in names)
        dist_info = name.split("-py3")[0] + ".dist-info"
        record = zf.read(f"{dist_info}/RECORD").decode()
        for n in names:
            assert n in record
        assert "Root-Is-Purelib: true" in zf.read(f"{dist_info}/WHEEL").decode()
    wheel = tmp_path / name
    wheel.write_bytes(data)
    target = tmp_path / "target"
    subprocess.run(
        [sys.executable, "-m", "pip", "install", "--quiet", "--no-deps", "--no-index",
         "--disable-pip-version-check", "--target", str(target), str(wheel)],
        check=True,
    )
    proc = subprocess.run(
        [sys.executable, "-c", "import seqpick, sys; print(seqpick.__file__)"],
        env={"PYTHONPATH": str(target), "PATH": ""},
        capture_output=True, text=True, check=True,
    )
    assert str(target) in proc.stdout


# --- the server ------------------------------------------------------------------


@pytest.mark.parametrize(
    "name, expected",
    [
        ("pyodide.asm.wasm", "application/wasm"),
        ("pyodide.mjs", "text/javascript"),
        ("engine.js", "text/javascript"),
        ("build-info.json", "application/json"),
        ("site.webmanifest", "application/manifest+json"),
        ("index.html", "text/html"),
        ("style.css", "text/css"),
        ("python_stdlib.zip", "application/zip"),
    ],
)
def test_mime_map(name, expected):
    assert serve.content_type(name).split(";")[0] == expected


def test_server_sends_types_and_policy(tmp_path):
    (tmp_path / "index.html").write_text("<!doctype html><title>t</title>")
    (tmp_path / "m.wasm").write_bytes(b"\0asm\1\0\0\0")
    server = serve.make_server(tmp_path, 0)
    import threading

    t = threading.Thread(target=server.serve_forever, daemon=True)
    t.start()
    try:
        base = f"http://127.0.0.1:{server.server_address[1]}"
        with urllib.request.urlopen(base + "/m.wasm") as r:
            assert r.headers["Content-Type"] == "application/wasm"
            assert r.headers["Content-Security-Policy"] == common.CSP_HEADER
            assert r.headers["Cache-Control"] == "no-cache"
        with urllib.request.urlopen(base + "/") as r:
            assert r.headers["Content-Type"].startswith("text/html")
            assert r.headers["Content-Security-Policy"] == common.CSP_HEADER
    finally:
        server.shutdown()
        server.server_close()


def test_build_info_of_built_site_points_at_existing_files():
    """Runs against dist/site when the site has been built (the test command
    always builds first)."""
    info_path = common.DIST_SITE / "build-info.json"
    if not info_path.exists():
        pytest.skip("dist/site not built; run python3 build_scripts/build.py")
    info = json.loads(info_path.read_text())
    wheel = common.DIST_SITE / "wheels" / info["wheel"]
    assert wheel.is_file()
    assert common.sha256_hex(wheel.read_bytes()) == info["wheel_sha256"]
    assert info["wheel_url"].split("?")[0] == f"wheels/{info['wheel']}"
    assert info["pyodide_version"] == build.PYODIDE_VERSION
    assert set(info["pyodide_lock_info"]) >= {"abi_version", "arch", "platform", "python"}
    for f in build.PYODIDE_FILES:
        assert (common.DIST_SITE / "pyodide" / f).is_file()
    assert not (common.DIST_SITE / "pyodide" / "pyodide-lock.json").exists()
    html = (common.DIST_SITE / "index.html").read_text()
    assert f'<meta http-equiv="Content-Security-Policy" content="{common.CSP_META}">' in html
