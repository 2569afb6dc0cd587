"""The build's module preload hints and the bytecode step's wiring (no browser)."""

from __future__ import annotations

import sys
import zipfile
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[2]
sys.path.insert(0, str(ROOT / "build_scripts"))

import preload  # noqa: E402


def write(root: Path, rel: str, text: str) -> None:
    p = root / rel
    p.parent.mkdir(parents=True, exist_ok=True)
    p.write_text(text, encoding="utf-8")


def test_static_imports_reads_every_static_form_and_skips_the_rest():
    src = '''
import { a,
  b } from "./x.js";
import "./side.js";
export { c } from "../up/z.js";
export * from "./star.js";
// import { gone } from "./commented.js";
/* import "./block-commented.js"; */
const later = import("./dynamic.js");
const u = new URL("./worker.js", import.meta.url);
export function f(path = "./default.js") {}
import { lib } from "https://cdn.example/lib.js";
'''
    assert preload.static_imports(src) == ["./x.js", "./side.js", "../up/z.js", "./star.js"]


def test_module_graph_is_breadth_first_without_repeats(tmp_path):
    write(tmp_path, "js/app.js", 'import "./a.js";\nimport { b } from "./sub/b.js";\n')
    write(tmp_path, "js/a.js", 'import { b } from "./sub/b.js";\n')
    write(tmp_path, "js/sub/b.js", 'import { c } from "../c.js";\nimport { a } from "../a.js";\n')
    write(tmp_path, "js/c.js", "export const c = 1;\n")
    assert preload.module_graph(tmp_path, "js/app.js") == ["js/app.js", "js/a.js", "js/sub/b.js", "js/c.js"]


def test_a_missing_module_is_named(tmp_path):
    write(tmp_path, "js/app.js", 'import "./nowhere.js";\n')
    with pytest.raises(preload.PreloadError, match="js/nowhere.js"):
        preload.module_graph(tmp_path, "js/app.js")


def test_inject_is_idempotent_and_lists_all_but_the_entry(tmp_path):
    write(tmp_path, "js/app.js", 'import "./a.js";\n')
    write(tmp_path, "js/a.js", "export {};\n")
    write(tmp_path, "index.html", '<html><head>\n<script type="module" src="js/app.js"></script>\n</head></html>\n')
    assert preload.inject_modulepreload(tmp_path) == ["js/a.js"]
    once = (tmp_path / "index.html").read_text()
    assert preload.inject_modulepreload(tmp_path) == ["js/a.js"]
    assert (tmp_path / "index.html").read_text() == once
    assert once.count('<link rel="modulepreload" href="js/a.js">') == 1
    assert once.index("modulepreload") < once.index('src="js/app.js"')


def test_built_page_preloads_its_whole_static_graph():
    site = ROOT / "dist" / "site"
    if not (site / "index.html").is_file():
        pytest.skip("site not built")
    html = (site / "index.html").read_text()
    for rel in preload.module_graph(site, "js/app.js")[1:]:
        assert f'<link rel="modulepreload" href="{rel}">' in html
    # The live view is loaded on demand, after the first answer: not preloaded.
    assert "js/companion/view.js" not in html


def test_built_wheel_carries_bytecode_for_every_module_when_node_is_there():
    import json
    site = ROOT / "dist" / "site"
    info_path = site / "build-info.json"
    if not info_path.is_file():
        pytest.skip("site not built")
    info = json.loads(info_path.read_text())
    with zipfile.ZipFile(site / "wheels" / info["wheel"]) as z:
        names = set(z.namelist())
    sources = {n for n in names if n.endswith(".py")}
    pycs = {n for n in names if n.endswith(".pyc")}
    if info.get("stdlib") != "bytecode":
        assert not pycs
        pytest.skip("built without Node: no bytecode")
    for src in sources:
        folder, _, name = src.rpartition("/")
        assert f"{folder}/__pycache__/{name[:-3]}.cpython-314.pyc" in pycs, src
    with zipfile.ZipFile(site / "pyodide" / "python_stdlib.zip") as z:
        std = z.namelist()
    assert "json/__init__.pyc" in std and "json/__init__.py" not in std
