"""Bytecode for Pyodide's standard library, made at build time.

The npm package of Pyodide ships ``python_stdlib.zip`` as Python sources,
so every start of the interpreter in the browser compiles the ~190 modules
it imports, in WebAssembly (measured on a 2-core machine: 4.2-4.9 s to
start, against 1.4 s with bytecode). The same goes for the engine's own modules (``precompiled_package``, put in
the wheel as __pycache__ files). ``precompiled_stdlib`` runs Pyodide's
own interpreter once under Node (``bytecode/run_in_pyodide.mjs``) to compile
the zip (``bytecode/compile_zip.py``), so the magic number always matches,
and caches the result by the package's integrity and the two scripts' hash:
later builds reuse it at no cost.

Without Node the build goes on with the zip as published (the site works,
it only starts slower) and says so. Set SEQPICK_NO_BYTECODE=1 to skip the
step on purpose.
"""

from __future__ import annotations

import hashlib
import json
import os
import shutil
import subprocess
import zipfile
from pathlib import Path

HERE = Path(__file__).resolve().parent / "bytecode"
RUNNER = HERE / "run_in_pyodide.mjs"
SCRIPT = HERE / "compile_zip.py"
#: Where the zip is imported from inside Pyodide (sys.path[1] there), and
#: where the engine worker unpacks the wheel (sysconfig's purelib there).
STDLIB_PREFIX = "/lib/python314.zip"
SITE_PACKAGES = "/lib/python3.14/site-packages"
#: Node gets this long (cold start plus ~560 modules) before the build gives up.
TIMEOUT_S = 300


class PrecompileError(RuntimeError):
    """Node ran but the compile failed: the message has its output."""


def _key(integrity: str) -> str:
    h = hashlib.sha256(integrity.encode())
    for p in (RUNNER, SCRIPT):
        h.update(p.read_bytes())
    return h.hexdigest()[:20]


def precompiled_stdlib(pyodide_dir: Path, integrity: str, cache_dir: Path,
                       log=print) -> Path | None:
    """Path of the bytecode zip for the Pyodide files in *pyodide_dir* (which
    must hold pyodide.mjs, pyodide.asm.mjs, pyodide.asm.wasm,
    python_stdlib.zip and pyodide-lock.json), or None when Node is missing or
    the step is switched off. Cached under cache_dir; O(size of the stdlib)
    the first time (about 10-20 s), free afterwards."""
    if os.environ.get("SEQPICK_NO_BYTECODE"):
        log("bytecode: skipped (SEQPICK_NO_BYTECODE is set); the stdlib ships as sources")
        return None
    if shutil.which("node") is None:
        log("bytecode: node not found; the stdlib ships as sources (the engine starts slower)")
        return None
    out_dir = cache_dir / "stdlib-bytecode" / _key(integrity)
    out = out_dir / "python_stdlib.zip"
    if not (out.is_file() and (out_dir / "result.json").is_file()):
        result = _compile(pyodide_dir, pyodide_dir / "python_stdlib.zip", out, STDLIB_PREFIX, "sourceless")
        log(f"bytecode: compiled {result.get('compiled')} stdlib modules ({out.stat().st_size / 1e6:.1f} MB)")
    return out


def precompiled_package(files: list[tuple[str, bytes]], pyodide_dir: Path, integrity: str,
                        cache_dir: Path, log=print, stdlib: Path | None = None) -> list[tuple[str, bytes]]:
    """Bytecode for the project's own modules, to put in the wheel beside
    them: [("seqpick/__pycache__/x.cpython-314.pyc", bytes), ...] for every
    .py in *files* (package_files() of the build). Unchecked hash-based pycs,
    so the import in the browser skips the compile. Cached by the sources'
    hash: a build whose Python did not change costs nothing; one that did
    costs one Pyodide start under Node (about 2-4 s with *stdlib*, the
    bytecode zip of precompiled_stdlib)."""
    sources = sorted((name, data) for name, data in files if name.endswith(".py"))
    h = hashlib.sha256(_key(integrity).encode())
    for name, data in sources:
        h.update(name.encode() + b"\0" + hashlib.sha256(data).digest())
    out_dir = cache_dir / "package-bytecode" / h.hexdigest()[:20]
    out = out_dir / "pycache.zip"
    if not (out.is_file() and (out_dir / "result.json").is_file()):
        # Keep the cache small: one entry per source version is plenty.
        shutil.rmtree(out_dir.parent, ignore_errors=True)
        out_dir.mkdir(parents=True)
        src = out_dir / "sources.zip"
        with zipfile.ZipFile(src, "w") as z:
            for name, data in sources:
                z.writestr(zipfile.ZipInfo(name, date_time=(1980, 1, 1, 0, 0, 0)), data)
        result = _compile(pyodide_dir, src, out, SITE_PACKAGES, "pycache", stdlib)
        src.unlink()
        log(f"bytecode: compiled {result.get('compiled')} modules of the engine")
    with zipfile.ZipFile(out) as z:
        return [(n, z.read(n)) for n in sorted(z.namelist())]


def _compile(pyodide_dir: Path, src: Path, out: Path, prefix: str, layout: str,
             stdlib: Path | None = None) -> dict:
    """Run bytecode/compile_zip.py in Pyodide under Node; write *out* and
    result.json beside it atomically. Returns the script's counts."""
    out.parent.mkdir(parents=True, exist_ok=True)
    tmp = out.with_name(out.name + ".tmp")
    args = {"src": str(src.resolve()), "dest": str(tmp.resolve()), "prefix": prefix, "layout": layout}
    try:
        proc = subprocess.run([shutil.which("node") or "node", str(RUNNER), str(pyodide_dir), str(SCRIPT),
                               json.dumps(args)] + ([str(stdlib)] if stdlib else []), capture_output=True, text=True, timeout=TIMEOUT_S)
    except subprocess.TimeoutExpired:
        raise PrecompileError(f"compiling to bytecode under Node took over {TIMEOUT_S} s") from None
    if proc.returncode != 0 or not tmp.is_file():
        raise PrecompileError(f"compiling to bytecode under Node failed (exit {proc.returncode}):\n"
                              + (proc.stderr or proc.stdout)[-2000:])
    lines = [ln for ln in proc.stdout.splitlines() if ln.startswith("{")]
    result = json.loads(lines[-1]) if lines else {}
    if result.get("failed"):
        raise PrecompileError("these files do not compile in Pyodide: " + ", ".join(result["failed"][:5]))
    os.replace(tmp, out)
    (out.parent / "result.json").write_text(json.dumps(result, indent=1) + "\n")
    return result
