"""Compile every module of a zip of Python sources to bytecode (runs inside Pyodide).

ARGS = {"src": <host path of the source zip>, "dest": <host path to write>,
        "prefix": <the folder the files are imported from at run time, e.g.
                   "/lib/python314.zip">,
        "layout": "sourceless" | "pycache"}

"sourceless": each ``name.py`` becomes ``name.pyc`` in a copy of the zip
(zipimport loads it directly). "pycache": *dest* holds only the bytecode,
as ``dir/__pycache__/name.<tag>.pyc`` (importlib.util.cache_from_source), to
be installed beside the sources. Compiled by the very interpreter that will
import it, so the bytecode's magic number always matches. The .pyc files are *unchecked*
hash-based pycs (PEP 552, "Deterministic pycs"): no timestamps, so the
output depends only on the sources. Files that are not Python, or do not
compile, are copied as they are. Entries keep their order and dates.

Why: Pyodide's npm package ships its standard library as sources only, so
every start of the interpreter compiles the ~190 modules it imports, in
WebAssembly; precompiled, the start takes about a third of the time.

References: PEP 552 -- Deterministic pycs (Benjamin Peterson, 2017).
"""

import importlib._bootstrap_external as bootstrap
import importlib.util
import io
import json
import zipfile

src = "/host" + ARGS["src"]  # noqa: F821 - set by run_in_pyodide.mjs
dest = "/host" + ARGS["dest"]  # noqa: F821
prefix = ARGS["prefix"].rstrip("/")  # noqa: F821
pycache = ARGS.get("layout", "sourceless") == "pycache"  # noqa: F821

compiled = copied = 0
failed = []
buf = io.BytesIO()
with zipfile.ZipFile(src) as zin, zipfile.ZipFile(buf, "w", zipfile.ZIP_DEFLATED, compresslevel=9) as zout:
    for info in zin.infolist():
        data = zin.read(info)
        if info.filename.endswith(".py"):
            try:
                code = compile(data, f"{prefix}/{info.filename}", "exec", dont_inherit=True)
            except SyntaxError:
                failed.append(info.filename)
            else:
                pyc = bootstrap._code_to_hash_pyc(code, importlib.util.source_hash(data), checked=False)
                name = importlib.util.cache_from_source(info.filename) if pycache else info.filename + "c"
                out = zipfile.ZipInfo(name, date_time=info.date_time)
                out.compress_type = zipfile.ZIP_DEFLATED
                out.external_attr = info.external_attr
                zout.writestr(out, pyc, compresslevel=9)
                compiled += 1
                continue
        if not pycache:
            zout.writestr(info, data, compress_type=zipfile.ZIP_DEFLATED, compresslevel=9)
            copied += 1
with open(dest, "wb") as f:
    f.write(buf.getvalue())
print(json.dumps({"compiled": compiled, "copied": copied, "failed": failed, "bytes": len(buf.getvalue())}))
