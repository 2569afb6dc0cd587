#!/usr/bin/env python3
"""Assemble the deployable Seqpick site into dist/site/.

    python3 build_scripts/build.py [--clean] [--quiet]

What ends up in dist/site/:
  * everything under site/ (HTML, CSS, ES modules, ...), with the
    Content-Security-Policy written into every HTML page as a
    <meta http-equiv> tag so static hosts that send no headers enforce it too;
  * pyodide/  - the four runtime files of the npm package ``pyodide`` at the
    pinned version, taken from a tarball whose sha512 must equal
    PYODIDE_INTEGRITY (a changed or tampered tarball fails the build);
  * wheels/   - the ``seqpick`` wheel, built here from pylib/ with zipfile
    (pure Python, deterministic, no network, no build backend needed);
  * vendor/   - files of the npm packages listed in VENDOR_NPM (uPlot, for
    the charts); VENDOR_NPM_TESTS (axe-core) is for the tests only and is
    never copied here (see vendor_for_tests());
  * sw.js     - the service worker, with the precache manifest of the
    finished site (every other file and its sha256) written into it last;
  * build-info.json - what the engine worker needs to boot: wheel name and
    URL, the wheel's sha256 (content hash, no build time in it, so the URL
    changes exactly when the code does), Pyodide's version and the ``info``
    block of its lock file (passed to loadPyodide as an inline lock, so
    pyodide-lock.json is not shipped).

Downloads are cached under .cache/ (gitignored): after the first build,
rebuilding needs no network. Only files whose content changed are written;
files in dist/site/ that the build no longer produces are removed.
"""

from __future__ import annotations

import argparse
import base64
import hashlib
import io
import json
import os
import re
import shutil
import subprocess
import sys
import tarfile
import time
import tomllib
import zipfile
from dataclasses import dataclass, field
from pathlib import Path, PurePosixPath
from typing import Callable, Iterable, Union

sys.path.insert(0, str(Path(__file__).resolve().parent))
from common import (  # noqa: E402
    CACHE_DIR,
    CSP_META,
    DIST_SITE,
    PYLIB,
    ROOT,
    SITE_SRC,
    IntegrityError,
    sha256_hex,
    verify_integrity,
)
from precompile import PrecompileError, precompiled_package, precompiled_stdlib  # noqa: E402
from preload import PreloadError, inject_modulepreload  # noqa: E402

# --- pinned inputs -----------------------------------------------------------

PYODIDE_VERSION = "314.0.8"
# npm's published dist.integrity for pyodide@314.0.8. Changing the version
# means changing this string too (`npm view pyodide@VERSION dist.integrity`).
PYODIDE_INTEGRITY = (
    "sha512-74Wq1kXOC+CCEzAfxuRAO701nAcCMLjf8NrwvWpu8S41dVMXwXmLQ05dYB+F4e46AdnGo0oq7YHSVUpHsoarLQ=="
)
# The only files the page needs from the package.
PYODIDE_FILES = ("pyodide.mjs", "pyodide.asm.mjs", "pyodide.asm.wasm", "python_stdlib.zip")
# Read at build time (for its ``info`` block), not shipped.
PYODIDE_LOCK = "pyodide-lock.json"

# npm JavaScript libraries to vendor into dist/site/vendor/<package>/<file>.
# Each entry: (package, exact version, npm dist.integrity, [paths inside the
# package]). Example:
#   ("some-lib", "1.2.3", "sha512-...", ["dist/some-lib.min.js"]),
# The page then loads "./vendor/some-lib/dist/some-lib.min.js".
VENDOR_NPM: list[tuple[str, str, str, list[str]]] = [
    # uPlot (MIT): canvas charts, an ES module; sets element.style via CSSOM
    # only (no <style> tags, no style="" strings, no eval), so it runs under
    # the site's policy. Its stylesheet is a separate file, linked by index.html.
    ("uplot", "1.6.32",
     "sha512-KIMVnG68zvu5XXUbC4LQEPnhwOxBuLyW1AHtpm6IKTXImkbLgkMy+jabjLgSLMasNuGGzQm/ep3tOkyTxpiQIw==",
     ["dist/uPlot.esm.js", "dist/uPlot.min.css", "LICENSE"]),
]

# The same, for the tests only: never copied into dist/site/. vendor_for_tests()
# fetches and verifies them the same way and returns their paths under .cache/.
VENDOR_NPM_TESTS: list[tuple[str, str, str, list[str]]] = [
    # axe-core (MPL-2.0): accessibility rules, injected by tests/e2e/test_accessibility.py.
    ("axe-core", "4.14.1",
     "sha512-FHfa+lmNjQZfJz1q8wKqIDwC6DExcHt/pkjNQb09a3NPjCKg2rhu5qb2S4r76ASyFNNtuFooJpZe37OgudVGtQ==",
     ["axe.min.js", "LICENSE"]),
]

PACK_CACHE = CACHE_DIR / "npm"


class BuildError(Exception):
    """The build cannot go on; the message says why and what to do."""


def log(msg: str) -> None:
    if not QUIET:
        print(f"build: {msg}", flush=True)


QUIET = False

# --- npm tarballs: download once, verify every time --------------------------

PackFn = Callable[[str, Path], Path]


def npm_pack(spec: str, dest_dir: Path) -> Path:
    """Download the tarball of an npm *spec* (``name@version``) into *dest_dir*
    with npm's own client and return its path."""
    npm = shutil.which("npm")
    if npm is None:
        raise BuildError(
            f"npm is needed once to download {spec} (then it is cached under .cache/); "
            "install Node.js and npm"
        )
    proc = subprocess.run(
        [npm, "pack", spec, "--json", "--ignore-scripts", "--pack-destination", str(dest_dir)],
        capture_output=True,
        text=True,
    )
    if proc.returncode != 0:
        raise BuildError(f"`npm pack {spec}` failed:\n{proc.stderr.strip()}")
    out = proc.stdout
    try:
        info = json.loads(out[out.index("[") :])[0]
        return dest_dir / info["filename"]
    except (ValueError, KeyError, IndexError) as exc:
        raise BuildError(f"could not read `npm pack {spec} --json` output: {out[:500]!r}") from exc


def _safe_name(package: str) -> str:
    return package.lstrip("@").replace("/", "-")


def ensure_npm_tarball(
    package: str,
    version: str,
    integrity: str,
    cache_dir: Path = PACK_CACHE,
    pack: PackFn = npm_pack,
) -> Path:
    """Return the path of the cached tarball of package@version, downloading
    it with *pack* if absent. The tarball is checked against *integrity* on
    every call; a mismatch raises IntegrityError and nothing is cached."""
    cache_dir.mkdir(parents=True, exist_ok=True)
    cached = cache_dir / f"{_safe_name(package)}-{version}.tgz"
    if cached.exists():
        try:
            verify_integrity(cached, integrity)
        except IntegrityError as exc:
            raise IntegrityError(
                f"cached {cached} does not match the pinned integrity of {package}@{version}; "
                f"delete it to download again, or fix the pin.\n{exc}"
            ) from None
        log(f"{package}@{version}: cached tarball, integrity ok")
        return cached
    tmp = cache_dir / f".tmp-{os.getpid()}"
    shutil.rmtree(tmp, ignore_errors=True)
    tmp.mkdir()
    try:
        t0 = time.perf_counter()
        got = pack(f"{package}@{version}", tmp)
        verify_integrity(got, integrity)
        os.replace(got, cached)
        log(f"{package}@{version}: downloaded {cached.stat().st_size / 1e6:.1f} MB "
            f"in {time.perf_counter() - t0:.1f} s, integrity ok")
    finally:
        shutil.rmtree(tmp, ignore_errors=True)
    return cached


def _check_member_path(name: str) -> PurePosixPath:
    p = PurePosixPath(name)
    if p.is_absolute() or ".." in p.parts or not p.parts:
        raise BuildError(f"refusing unsafe path {name!r}")
    return p


def extract_npm_files(tarball: Path, files: Iterable[str], dest_dir: Path, integrity: str) -> dict[str, Path]:
    """Extract *files* (paths inside the package) from an npm tarball into
    *dest_dir*, keeping their relative paths. A stamp records which tarball
    (by integrity) and which files were extracted, so a second call with the
    same inputs touches nothing. Returns {file: extracted path}."""
    files = [str(_check_member_path(f)) for f in files]
    stamp = dest_dir / ".extracted.json"
    want = {"integrity": integrity, "files": sorted(files)}
    result = {f: dest_dir / f for f in files}
    if stamp.exists() and all(p.is_file() for p in result.values()):
        try:
            if json.loads(stamp.read_text()) == want:
                return result
        except ValueError:
            pass
    shutil.rmtree(dest_dir, ignore_errors=True)
    dest_dir.mkdir(parents=True)
    with tarfile.open(tarball, "r:gz") as tar:
        members = {m.name: m for m in tar.getmembers()}
        # npm tarballs keep the package under one top folder, usually "package/".
        roots = {PurePosixPath(n).parts[0] for n in members if PurePosixPath(n).parts}
        if len(roots) != 1:
            raise BuildError(f"{tarball.name}: expected one top folder, found {sorted(roots)}")
        root = roots.pop()
        for f in files:
            member = members.get(f"{root}/{f}")
            if member is None or not member.isfile():
                raise BuildError(f"{tarball.name}: has no file {f!r}")
            out = dest_dir / f
            out.parent.mkdir(parents=True, exist_ok=True)
            src = tar.extractfile(member)
            assert src is not None
            with open(out, "wb") as fh:
                shutil.copyfileobj(src, fh)
    stamp.write_text(json.dumps(want))
    return result


def vendor_npm(
    entries: Iterable[tuple[str, str, str, list[str]]],
    cache_dir: Path = PACK_CACHE,
    pack: PackFn = npm_pack,
) -> dict[str, Path]:
    """Fetch, verify and extract each VENDOR_NPM entry. Returns the part of
    the site plan they make: {"vendor/<package>/<file>": extracted path}."""
    plan: dict[str, Path] = {}
    for package, version, integrity, files in entries:
        tarball = ensure_npm_tarball(package, version, integrity, cache_dir, pack)
        out_dir = cache_dir / "extracted" / f"{_safe_name(package)}-{version}"
        for f, path in extract_npm_files(tarball, files, out_dir, integrity).items():
            plan[f"vendor/{package}/{f}"] = path
    return plan


def vendor_for_tests(
    entries: Iterable[tuple[str, str, str, list[str]]] = VENDOR_NPM_TESTS,
    cache_dir: Path = PACK_CACHE,
    pack: PackFn = npm_pack,
) -> dict[str, Path]:
    """Fetch, verify and extract the test-only npm files (VENDOR_NPM_TESTS)
    under .cache/ and return {"<package>/<file>": path}. Nothing of it goes
    into dist/site/."""
    return {k.removeprefix("vendor/"): v for k, v in vendor_npm(entries, cache_dir, pack).items()}


# --- the project's wheel -----------------------------------------------------


def _record_hash(data: bytes) -> str:
    return "sha256=" + base64.urlsafe_b64encode(hashlib.sha256(data).digest()).rstrip(b"=").decode()


def _metadata(project: dict) -> str:
    lines = [
        "Metadata-Version: 2.1",
        f"Name: {project['name']}",
        f"Version: {project['version']}",
    ]
    if "description" in project:
        lines.append(f"Summary: {project['description']}")
    lic = project.get("license")
    if isinstance(lic, dict) and "text" in lic:
        lines.append(f"License: {lic['text']}")
    if "requires-python" in project:
        lines.append(f"Requires-Python: {project['requires-python']}")
    for c in project.get("classifiers", []):
        lines.append(f"Classifier: {c}")
    for dep in project.get("dependencies", []):
        lines.append(f"Requires-Dist: {dep}")
    for extra, deps in project.get("optional-dependencies", {}).items():
        lines.append(f"Provides-Extra: {extra}")
        for dep in deps:
            lines.append(f'Requires-Dist: {dep}; extra == "{extra}"')
    return "\n".join(lines) + "\n"


def package_files(pylib: Path = PYLIB) -> list[tuple[str, bytes]]:
    """Every file of every package under pylib/ (a folder with __init__.py),
    except caches and hidden files: [(path relative to pylib, bytes)], sorted."""
    entries: list[tuple[str, bytes]] = []
    packages = sorted(p.parent for p in pylib.glob("*/__init__.py"))
    if not packages:
        raise BuildError(f"no Python package (folder with __init__.py) under {pylib}")
    for pkg in packages:
        for path in sorted(pkg.rglob("*")):
            rel = path.relative_to(pylib)
            if not path.is_file() or "__pycache__" in rel.parts or path.suffix in {".pyc", ".pyo"}:
                continue
            if any(part.startswith(".") for part in rel.parts):
                continue
            entries.append((rel.as_posix(), path.read_bytes()))
    return entries


def build_wheel(root: Path = ROOT, pylib: Path = PYLIB,
                extra: Iterable[tuple[str, bytes]] = (),
                files: list[tuple[str, bytes]] | None = None) -> tuple[str, bytes]:
    """Build the project's pure-Python wheel in memory: (file name, bytes).

    Same sources give the same bytes (sorted entries, fixed timestamps), so
    its sha256 is a content hash. Every package under pylib/ goes in
    (package_files), then *extra* (the bytecode for Pyodide, see
    precompile.py), then the .dist-info files. *files* is package_files(pylib)
    when the caller has read it already."""
    pyproject = tomllib.loads((root / "pyproject.toml").read_text())
    project = pyproject["project"]
    for key in ("name", "version"):
        if key not in project:
            raise BuildError(f"pyproject.toml [project] has no static {key!r}")
    dist_name = re.sub(r"[-_.]+", "_", project["name"]).lower()
    version = project["version"]
    wheel_name = f"{dist_name}-{version}-py3-none-any.whl"
    dist_info = f"{dist_name}-{version}.dist-info"

    entries = list(files) if files is not None else package_files(pylib)
    packages = sorted({name.split("/", 1)[0] for name, _ in entries})
    entries += sorted(extra)

    entries.append((f"{dist_info}/METADATA", _metadata(project).encode()))
    entries.append((
        f"{dist_info}/WHEEL",
        b"Wheel-Version: 1.0\nGenerator: seqpick-build\nRoot-Is-Purelib: true\nTag: py3-none-any\n",
    ))
    scripts = project.get("scripts", {})
    if scripts:
        text = "[console_scripts]\n" + "".join(f"{k} = {v}\n" for k, v in scripts.items())
        entries.append((f"{dist_info}/entry_points.txt", text.encode()))
    entries.append((f"{dist_info}/top_level.txt", "".join(p + "\n" for p in packages).encode()))
    record = "".join(f"{name},{_record_hash(data)},{len(data)}\n" for name, data in entries)
    record += f"{dist_info}/RECORD,,\n"
    entries.append((f"{dist_info}/RECORD", record.encode()))

    buf = io.BytesIO()
    with zipfile.ZipFile(buf, "w") as zf:
        for name, data in entries:
            info = zipfile.ZipInfo(name, date_time=(1980, 1, 1, 0, 0, 0))
            info.external_attr = 0o644 << 16
            info.compress_type = zipfile.ZIP_DEFLATED
            zf.writestr(info, data)
    return wheel_name, buf.getvalue()


# --- HTML --------------------------------------------------------------------

_CSP_META_RE = re.compile(r"[ \t]*<meta\s[^>]*http-equiv\s*=\s*[\"']?content-security-policy[^>]*>[ \t]*\n?", re.I)
_HEAD_RE = re.compile(r"<head(\s[^>]*)?>", re.I)


def inject_csp_meta(html: str, policy: str = CSP_META) -> str:
    """Put the site's policy into *html* as the first element of <head>
    (a meta policy covers only what comes after it). Any policy meta tag
    already there is replaced, so the policy has one source: common.py."""
    html = _CSP_META_RE.sub("", html)
    m = _HEAD_RE.search(html)
    if m is None:
        raise BuildError("HTML page has no <head> to put the Content-Security-Policy in")
    tag = f'\n<meta http-equiv="Content-Security-Policy" content="{policy}">'
    return html[: m.end()] + tag + html[m.end() :]


DEMO_SCENARIO_FILE = "demo-scenario.json"
PRERENDER_ID = "prerendered-plan"
_PRERENDER_RE = re.compile(
    r"[ \t]*<script\s+type=\"application/json\"\s+id=\"" + PRERENDER_ID + r"\">.*?</script>[ \t]*\n?", re.S
)
_HEAD_END_RE = re.compile(r"</head\s*>", re.I)


def _engine():
    """The seqpick package of this checkout (pylib/), never an installed copy."""
    if str(PYLIB) not in sys.path:
        sys.path.insert(0, str(PYLIB))
    import seqpick
    from seqpick.link import encode_fragment
    from seqpick.scenario import parse_scenario
    from seqpick.solve import solve

    where = Path(seqpick.__file__).resolve()
    if PYLIB.resolve() not in where.parents:
        raise BuildError(f"prerender must use the engine in {PYLIB}, but seqpick was imported from {where}")
    return parse_scenario, solve, encode_fragment


def _same_json(a, b) -> bool:
    """Equal as JSON values (1 == 1.0, but True != 1)."""
    if isinstance(a, bool) or isinstance(b, bool):
        return a is b
    if isinstance(a, (int, float)) and isinstance(b, (int, float)):
        return a == b
    if isinstance(a, dict) and isinstance(b, dict):
        return a.keys() == b.keys() and all(_same_json(a[k], b[k]) for k in a)
    if isinstance(a, list) and isinstance(b, list):
        return len(a) == len(b) and all(_same_json(x, y) for x, y in zip(a, b))
    return type(a) is type(b) and a == b


def script_json(obj) -> str:
    """JSON for the inside of an HTML <script> element: '<', '>' and '&' are
    written as \\u escapes (valid JSON, the same value), so no '</script>' or
    '<!--' can end or confuse the element whatever the strings hold."""
    text = json.dumps(obj, ensure_ascii=False, allow_nan=False, separators=(",", ":"))
    return (text.replace("<", "\\u003c").replace(">", "\\u003e").replace("&", "\\u0026")
            .replace("\u2028", "\\u2028").replace("\u2029", "\\u2029"))


def prerender(site_dir: Path) -> None:
    """Work out the demo plan with CPython and write it into index.html.

    Runs on dist/site/ after every build. Reads the demo scenario from
    site_dir/demo-scenario.json (its one source: the page's state.js takes it
    from the block written here, or fetches the same file when unbuilt),
    solves it with the seqpick engine of this checkout (pylib/) and puts

        <script type="application/json" id="prerendered-plan">
          {"scenario": <the demo scenario>, "fragment": <its share-link fragment>,
           "result": <SolveResult.to_dict()>}
        </script>

    at the end of <head>, so the page shows a real answer before Pyodide has
    booted (site/js/app.js). The scenario must be canonical (what
    parse_scenario(...).to_dict() gives, as the page sends it), or the page's
    request would not match it. Idempotent: an existing block is replaced.
    Cost: one solve of the demo (milliseconds).
    """
    index = site_dir / "index.html"
    demo_path = site_dir / DEMO_SCENARIO_FILE
    if not demo_path.is_file():
        raise BuildError(f"{DEMO_SCENARIO_FILE} is missing from {site_dir}: the page's demo scenario lives there")
    try:
        demo = json.loads(demo_path.read_text(encoding="utf-8"))
    except ValueError as exc:
        raise BuildError(f"{DEMO_SCENARIO_FILE} is not valid JSON: {exc}") from None

    parse_scenario, solve, encode_fragment = _engine()
    try:
        canonical = parse_scenario(demo).to_dict()
        result = solve(demo).to_dict()
        fragment = encode_fragment(demo)
    except Exception as exc:  # ScenarioError names the field
        raise BuildError(f"{DEMO_SCENARIO_FILE} cannot be solved: {exc}") from None
    if not _same_json(canonical, demo):
        raise BuildError(
            f"{DEMO_SCENARIO_FILE} must list every field as the page sends it; the engine's "
            f"canonical form is {json.dumps(canonical)}"
        )

    block = (f'<script type="application/json" id="{PRERENDER_ID}">'
             f"{script_json({'scenario': demo, 'fragment': fragment, 'result': result})}</script>\n")
    html = _PRERENDER_RE.sub("", index.read_text(encoding="utf-8"))
    m = _HEAD_END_RE.search(html)
    if m is None:
        raise BuildError("index.html has no </head> to put the prerendered plan before")
    new = html[: m.start()] + block + html[m.start() :]
    if index.read_bytes() != new.encode("utf-8"):
        tmp = index.with_name(index.name + ".tmp")
        tmp.write_text(new, encoding="utf-8")
        os.replace(tmp, index)
    log(f"prerendered the demo plan into index.html ({len(block) / 1e3:.1f} kB)")


# --- offline: the service worker's precache list -------------------------------

SERVICE_WORKER = "sw.js"
# site/sw.js holds `/*PRECACHE*/ {...} /*END PRECACHE*/`; the build replaces
# what is between the markers with the manifest of the built site.
_PRECACHE_RE = re.compile(r"/\*PRECACHE\*/.*?/\*END PRECACHE\*/", re.S)


def precache_manifest(site_dir: Path, skip: Iterable[str] = (SERVICE_WORKER,)) -> dict:
    """{"version": v, "files": {relative path: sha256 hex}} for every file
    under *site_dir* except *skip*. ``v`` is a hash of the sorted
    (path, hash) list, so it changes exactly when a file is added, removed,
    renamed or changed. O(total bytes)."""
    skipped = set(skip)
    files: dict[str, str] = {}
    for path in sorted(site_dir.rglob("*")):
        rel = path.relative_to(site_dir).as_posix()
        if path.is_file() and rel not in skipped:
            h = hashlib.sha256()
            with open(path, "rb") as fh:
                for block in iter(lambda: fh.read(1 << 20), b""):
                    h.update(block)
            files[rel] = h.hexdigest()
    listing = "".join(f"{rel}\0{sha}\n" for rel, sha in sorted(files.items()))
    return {"version": sha256_hex(listing.encode())[:20], "files": files}


def inject_precache(site_dir: Path) -> dict | None:
    """Write the precache manifest of *site_dir* into its sw.js (after the
    prerender step, so it lists the files as they are served). A new manifest
    makes sw.js differ byte for byte, which is what makes browsers install
    the new service worker. Returns the manifest, or None without sw.js."""
    sw = site_dir / SERVICE_WORKER
    if not sw.is_file():
        return None
    manifest = precache_manifest(site_dir)
    text = sw.read_text(encoding="utf-8")
    if len(_PRECACHE_RE.findall(text)) != 1:
        raise BuildError(f"{SERVICE_WORKER} must hold exactly one /*PRECACHE*/ ... /*END PRECACHE*/ block")
    block = "/*PRECACHE*/ " + json.dumps(manifest, sort_keys=True, separators=(",", ":")) + " /*END PRECACHE*/"
    new = _PRECACHE_RE.sub(lambda _: block, text)
    if new != text:
        tmp = sw.with_name(sw.name + ".tmp")
        tmp.write_text(new, encoding="utf-8")
        os.replace(tmp, sw)
    return manifest


# --- sync the plan to dist/site ------------------------------------------------

Source = Union[Path, bytes]


@dataclass
class SyncReport:
    written: list[str] = field(default_factory=list)
    unchanged: int = 0
    removed: list[str] = field(default_factory=list)
    total_bytes: int = 0


def sync_tree(dest: Path, plan: dict[str, Source]) -> SyncReport:
    """Make *dest* hold exactly *plan* ({relative path: file to copy or bytes}).
    Writes only what differs (copies compare size and mtime, bytes compare
    content) and removes files the plan no longer has."""
    report = SyncReport()
    dest.mkdir(parents=True, exist_ok=True)
    for rel, src in sorted(plan.items()):
        out = dest / rel
        if isinstance(src, bytes):
            report.total_bytes += len(src)
            if out.is_file() and out.stat().st_size == len(src) and out.read_bytes() == src:
                report.unchanged += 1
                continue
            out.parent.mkdir(parents=True, exist_ok=True)
            tmp = out.with_name(out.name + ".tmp")
            tmp.write_bytes(src)
            os.replace(tmp, out)
        else:
            st = src.stat()
            report.total_bytes += st.st_size
            if out.is_file():
                ost = out.stat()
                if ost.st_size == st.st_size and ost.st_mtime_ns == st.st_mtime_ns:
                    report.unchanged += 1
                    continue
            out.parent.mkdir(parents=True, exist_ok=True)
            tmp = out.with_name(out.name + ".tmp")
            shutil.copy2(src, tmp)
            os.replace(tmp, out)
        report.written.append(rel)
    wanted = set(plan)
    for path in sorted(dest.rglob("*"), reverse=True):
        rel = path.relative_to(dest).as_posix()
        if path.is_file() or path.is_symlink():
            if rel not in wanted:
                path.unlink()
                report.removed.append(rel)
        elif path.is_dir() and not any(path.iterdir()):
            path.rmdir()
    return report


# --- the build -------------------------------------------------------------------


def site_plan(site_src: Path = SITE_SRC) -> dict[str, Source]:
    """Files copied from site/; HTML pages get the policy meta tag."""
    plan: dict[str, Source] = {}
    if not site_src.is_dir():
        raise BuildError(f"{site_src} does not exist")
    for path in sorted(site_src.rglob("*")):
        rel = path.relative_to(site_src)
        if not path.is_file() or any(p.startswith(".") for p in rel.parts):
            continue
        if path.suffix.lower() in {".html", ".htm"}:
            plan[rel.as_posix()] = inject_csp_meta(path.read_text(encoding="utf-8")).encode("utf-8")
        else:
            plan[rel.as_posix()] = path
    if "index.html" not in plan:
        raise BuildError("site/index.html is missing")
    return plan


def build(dist: Path = DIST_SITE, clean: bool = False) -> SyncReport:
    t0 = time.perf_counter()
    if clean and dist.exists():
        shutil.rmtree(dist)
        log(f"removed {dist.relative_to(ROOT)}")

    plan = site_plan()
    for rel in ("pyodide", "wheels", "vendor", "build-info.json"):
        clash = [k for k in plan if k == rel or k.startswith(rel + "/")]
        if clash:
            raise BuildError(f"site/ must not contain {clash[0]}: the build generates it")

    tarball = ensure_npm_tarball("pyodide", PYODIDE_VERSION, PYODIDE_INTEGRITY)
    extracted = extract_npm_files(
        tarball,
        PYODIDE_FILES + (PYODIDE_LOCK,),
        PACK_CACHE / "extracted" / f"pyodide-{PYODIDE_VERSION}",
        PYODIDE_INTEGRITY,
    )
    lock_info = json.loads(extracted[PYODIDE_LOCK].read_text())["info"]
    for f in PYODIDE_FILES:
        plan[f"pyodide/{f}"] = extracted[f]
    try:
        stdlib = precompiled_stdlib(extracted[PYODIDE_LOCK].parent, PYODIDE_INTEGRITY, CACHE_DIR, log)
    except PrecompileError as exc:
        raise BuildError(str(exc)) from None
    if stdlib is not None:
        plan["pyodide/python_stdlib.zip"] = stdlib

    plan.update(vendor_npm(VENDOR_NPM))

    files = package_files()
    try:
        pycs = precompiled_package(files, extracted[PYODIDE_LOCK].parent, PYODIDE_INTEGRITY,
                                   CACHE_DIR, log, stdlib) if stdlib is not None else []
    except PrecompileError as exc:
        raise BuildError(str(exc)) from None
    wheel_name, wheel = build_wheel(extra=pycs, files=files)
    wheel_sha = sha256_hex(wheel)
    plan[f"wheels/{wheel_name}"] = wheel
    log(f"wheel {wheel_name} ({len(wheel) / 1e3:.1f} kB, sha256 {wheel_sha[:12]})")

    info = {
        "schema": 1,
        "package": "seqpick",
        "api_module": "seqpick.api",
        "wheel": wheel_name,
        "wheel_sha256": wheel_sha,
        # The hash in the query string busts HTTP caches when the code changes.
        "wheel_url": f"wheels/{wheel_name}?v={wheel_sha[:16]}",
        "pyodide_version": PYODIDE_VERSION,
        "pyodide_lock_info": lock_info,
        # The npm package's stdlib, compiled to bytecode by its own
        # interpreter (build_scripts/precompile.py), or as published.
        "stdlib": "bytecode" if stdlib is not None else "sources",
        "vendor": {pkg: ver for pkg, ver, _, _ in VENDOR_NPM},
    }
    plan["build-info.json"] = (json.dumps(info, indent=2, sort_keys=True) + "\n").encode()

    report = sync_tree(dist, plan)
    try:
        preloaded = inject_modulepreload(dist)
    except PreloadError as exc:
        raise BuildError(str(exc)) from None
    log(f"modulepreload: {len(preloaded)} modules")
    prerender(dist)
    manifest = inject_precache(dist)  # last: it hashes the files as served
    if manifest:
        log(f"precache: {len(manifest['files'])} files, version {manifest['version']}")

    shown = report.written if len(report.written) <= 8 else report.written[:8] + ["..."]
    log(
        f"{dist.relative_to(ROOT) if ROOT in dist.parents else dist}: {len(report.written)} written, "
        f"{report.unchanged} unchanged, {len(report.removed)} removed; "
        f"{len(plan)} files, {report.total_bytes / 1e6:.1f} MB; {time.perf_counter() - t0:.2f} s"
    )
    if report.written:
        log("written: " + ", ".join(shown))
    if report.removed:
        log("removed: " + ", ".join(report.removed[:8]) + (" ..." if len(report.removed) > 8 else ""))
    return report


def main(argv: list[str] | None = None) -> int:
    global QUIET
    parser = argparse.ArgumentParser(description="Build the Seqpick site into dist/site/.")
    parser.add_argument("--clean", action="store_true", help="delete dist/site/ first")
    parser.add_argument("--quiet", action="store_true", help="print nothing unless it fails")
    args = parser.parse_args(argv)
    QUIET = args.quiet
    try:
        build(clean=args.clean)
    except (BuildError, IntegrityError) as exc:
        print(f"build failed: {exc}", file=sys.stderr)
        return 1
    return 0


if __name__ == "__main__":
    sys.exit(main())
