// The answer the build worked out ahead of time (build_scripts/build.py,
// prerender()), and the check that the live engine agrees with it.
//
// The built page carries
//   <script type="application/json" id="prerendered-plan">
//     {"scenario": <the demo scenario, exactly as the page sends it>,
//      "fragment": <its share-link fragment, "#v=1&...">,
//      "result":   <SolveResult.to_dict() from CPython>}
//   </script>
// The demo scenario itself lives in site/demo-scenario.json; the build reads
// that file and inlines it here, so the page needs no extra request to start.

let cached; // undefined: not read yet; null: none on this page

/** {scenario, fragment, result} from the page, or null (no block, or broken). */
export function readPrerendered() {
  if (cached !== undefined) return cached;
  cached = null;
  const node = globalThis.document?.getElementById("prerendered-plan");
  if (!node) return cached;
  try {
    const data = JSON.parse(node.textContent);
    if (data && typeof data === "object" && data.scenario && typeof data.scenario === "object") {
      cached = {
        scenario: data.scenario,
        fragment: typeof data.fragment === "string" ? data.fragment : null,
        result: data.result && typeof data.result === "object" ? data.result : null,
      };
    }
  } catch {
    // A broken block is ignored: the solver answers soon anyway.
  }
  return cached;
}

/**
 * Whether two result objects agree: the same keys and strings, the same
 * shape, and numbers within `tol` (absolute, or relative for numbers above 1
 * in size). Used to check the prerendered answer against the live engine.
 * O(size of the result).
 */
export function resultsAgree(a, b, tol = 1e-12) {
  if (typeof a === "number" && typeof b === "number") {
    if (Number.isNaN(a) || Number.isNaN(b)) return Number.isNaN(a) && Number.isNaN(b);
    return a === b || Math.abs(a - b) <= tol * Math.max(1, Math.abs(a), Math.abs(b));
  }
  if (a === null || b === null || typeof a !== "object" || typeof b !== "object") return a === b;
  if (Array.isArray(a) !== Array.isArray(b)) return false;
  if (Array.isArray(a)) return a.length === b.length && a.every((x, i) => resultsAgree(x, b[i], tol));
  const ka = Object.keys(a);
  if (ka.length !== Object.keys(b).length) return false;
  return ka.every((k) => Object.prototype.hasOwnProperty.call(b, k) && resultsAgree(a[k], b[k], tol));
}
