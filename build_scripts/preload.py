"""Module preload hints for the built page.

The page is plain ES modules: ``js/app.js`` imports a dozen files, which
import others, four levels deep. A browser only discovers a module once its
parent has arrived, so without hints the page waits for four round trips in a
row before it can draw the prerendered answer. ``inject_modulepreload`` walks
the static import graph from the page's entry module and writes one
``<link rel="modulepreload">`` per module into ``<head>``, so every module is
fetched at once (HTML Living Standard, "modulepreload" link type).

Cost: one pass over the site's JavaScript, O(total size of the modules).
"""

from __future__ import annotations

import os
import re
from pathlib import Path, PurePosixPath

BEGIN = "<!-- modulepreload: written by the build -->"
END = "<!-- /modulepreload -->"
_BLOCK_RE = re.compile(re.escape(BEGIN) + r".*?" + re.escape(END) + r"[ \t]*\n?", re.S)
_ENTRY_RE = re.compile(r'<script\s+type="module"\s+src="([^"]+)"\s*>\s*</script>', re.I)
# Static imports and re-exports: `import x from "./a.js"`, `import "./a.js"`,
# `export { y } from "./a.js"` (possibly spread over several lines).
_IMPORT_RE = re.compile(
    r"""^\s*(?:(?:import|export)\s[^;'"()]*?\bfrom\s*|import\s*)["'](\.{1,2}/[^"']+)["']""", re.M | re.S
)
_COMMENT_RE = re.compile(r"/\*.*?\*/|//[^\n]*", re.S)


class PreloadError(ValueError):
    """The page's module graph cannot be read (a missing module, no entry)."""


def static_imports(source: str) -> list[str]:
    """Relative specifiers of the static imports in a module's source."""
    return _IMPORT_RE.findall(_COMMENT_RE.sub("", source))


def module_graph(site_dir: Path, entry: str) -> list[str]:
    """Every module reachable from ``entry`` by static imports, as site-relative
    POSIX paths, entry first, then in breadth-first order. Dynamic imports
    (``import(...)``) are left out on purpose: they load on demand."""
    order: list[str] = []
    seen: set[str] = set()
    queue = [PurePosixPath(entry)]
    while queue:
        rel = queue.pop(0)
        key = str(rel)
        if key in seen:
            continue
        seen.add(key)
        path = site_dir / key
        if not path.is_file():
            raise PreloadError(f"module {key} is imported but missing from the site")
        order.append(key)
        for spec in static_imports(path.read_text(encoding="utf-8")):
            target = PurePosixPath(os.path.normpath(str(rel.parent / spec)))
            queue.append(target)
    return order


def inject_modulepreload(site_dir: Path) -> list[str]:
    """Write the preload block into site_dir/index.html just before its entry
    ``<script type="module">``; idempotent. Returns the modules listed (the
    entry itself is not, as its own script tag already fetches it)."""
    index = site_dir / "index.html"
    html = _BLOCK_RE.sub("", index.read_text(encoding="utf-8"))
    m = _ENTRY_RE.search(html)
    if m is None:
        raise PreloadError("index.html has no <script type=\"module\" src=...> entry")
    modules = module_graph(site_dir, m.group(1))[1:]
    links = "".join(f'<link rel="modulepreload" href="{rel}">\n' for rel in modules)
    new = html[: m.start()] + BEGIN + "\n" + links + END + "\n" + html[m.start():]
    if index.read_text(encoding="utf-8") != new:
        tmp = index.with_name(index.name + ".tmp")
        tmp.write_text(new, encoding="utf-8")
        os.replace(tmp, index)
    return modules
