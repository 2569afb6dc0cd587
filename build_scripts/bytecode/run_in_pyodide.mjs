// Run one Python script inside Pyodide under Node, at build time.
//
//   node run_in_pyodide.mjs <pyodide dir> <script.py> <json args> [stdlib zip]
//
// <pyodide dir> holds pyodide.mjs, pyodide.asm.mjs, pyodide.asm.wasm and
// python_stdlib.zip (the npm package's files); [stdlib zip] replaces the
// latter (the bytecode one starts three times faster). The host's root is mounted at
// /host inside Pyodide, so the script reads and writes host files as
// "/host" + <absolute path>. The script gets its arguments as the global
// ARGS (parsed JSON). Exit status 0 on success; a Python error is printed
// and exits 1.
import { readFileSync } from "node:fs";
import { pathToFileURL } from "node:url";
import path from "node:path";

const [dir, script, argsJson, stdlib] = process.argv.slice(2);
if (!dir || !script) {
  console.error("usage: node run_in_pyodide.mjs <pyodide dir> <script.py> [json args]");
  process.exit(2);
}
const indexURL = path.resolve(dir) + path.sep;
const { loadPyodide } = await import(pathToFileURL(path.join(indexURL, "pyodide.mjs")).href);
const lock = JSON.parse(readFileSync(path.join(indexURL, "pyodide-lock.json"), "utf8"));
const options = { indexURL, lockFileContents: { info: lock.info, packages: {} } };
if (stdlib) options.stdLibURL = path.resolve(stdlib);
const py = await loadPyodide(options);
py.mountNodeFS("/host", "/");
py.globals.set("ARGS", py.toPy(JSON.parse(argsJson || "null")));
try {
  py.runPython(readFileSync(script, "utf8"), { filename: script });
} catch (err) {
  console.error(String(err.message || err));
  process.exit(1);
}
