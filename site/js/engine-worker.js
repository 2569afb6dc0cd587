// Seqpick engine worker: runs the Python solver (package `seqpick`) in
// Pyodide, off the page's main thread. Start it as a *module* worker:
//     new Worker(new URL("./engine-worker.js", import.meta.url), {type: "module"})
// (site/js/engine.js does this; pages should use that rather than talk to the
// worker directly.)
//
// Everything it loads comes from its own origin. Paths are resolved against
// this file's URL (import.meta.url, i.e. <site>/js/engine-worker.js), never
// against a page URL: inside a worker, relative fetches resolve against the
// worker script, and the site may be served under any sub-path.
//
// Message protocol
// ----------------
// worker -> page, while booting:
//   {type: "status", state: "loading" | "ready" | "failed", detail, elapsed_ms}
//     detail is plain words ("Starting Python", "Loading solver", "Ready", or
//     the failure's message); elapsed_ms counts from the worker's start.
// page -> worker:
//   {id: <int>, command: <string>, payload: <JSON-able>, channel?: <string>}
//     command is passed through to Python: seqpick.api.call(command, json).
// worker -> page:
//   {type: "reply", id, ok: true, result, ms}   ms = time spent in Python
//   {type: "reply", id, ok: false, error: {field, message}}
//   {type: "reply", id, ok: false, superseded: true}
//   {type: "progress", id, share}   reserved: share in [0, 1]. Python code may
//     report it during a long call with
//         import seqpick_host; seqpick_host.progress(share)
//     which is passed straight through for the request being run.
//
// Supersede rule: requests wait in a queue while Python is busy (or still
// booting). When the next one is taken, any queued request that has a newer
// request on the same channel behind it is answered {superseded: true}
// without running. Requests without a channel are never superseded.

const T0 = performance.now();
const INFO_URL = new URL("../build-info.json", import.meta.url);
const PYODIDE_DIR = new URL("../pyodide/", import.meta.url);

let api = null; // seqpick.api once booted
let bootError = null; // Error once boot failed
let busy = false;
let currentId = null; // id of the request Python is running
const queue = [];

// Milliseconds from the worker's start to the end of each boot phase, sent
// with the "ready" status (the benchmark reads them): python = Pyodide
// running, solver = the engine imported.
const phases = {};
const markPhase = (name) => {
  phases[name] = Math.round(performance.now() - T0);
};

function status(state, detail) {
  self.postMessage({
    type: "status",
    state,
    detail,
    elapsed_ms: Math.round(performance.now() - T0),
    ...(state === "ready" ? { phases } : {}),
  });
}

// Python's exception messages are whole tracebacks; the last line says what happened.
function lastLine(err) {
  const text = String((err && err.message) || err).trim();
  const lines = text.split("\n").filter((l) => l.trim() !== "");
  return lines.length ? lines[lines.length - 1] : text;
}

async function fetchOk(url, what, cache = "default") {
  let response;
  try {
    response = await fetch(url, { cache });
  } catch (err) {
    throw new Error(`Could not load ${what} (${url.pathname}): ${err.message}`);
  }
  if (!response.ok) {
    throw new Error(`Could not load ${what} (${url.pathname}): HTTP ${response.status}`);
  }
  return response;
}

// Pyodide never settles loadPyodide() when WebAssembly is refused (by a
// Content-Security-Policy without 'wasm-unsafe-eval', or by a browser setting):
// it only logs a warning. Compiling an empty module first turns that into an
// immediate, clear failure.
async function checkWebAssembly() {
  if (typeof WebAssembly !== "object") {
    throw new Error("This browser cannot run WebAssembly, which the solver needs");
  }
  const empty = new Uint8Array([0, 97, 115, 109, 1, 0, 0, 0]);
  try {
    await WebAssembly.compile(empty);
  } catch (err) {
    throw new Error(
      `WebAssembly is blocked here (${err.message}); ` +
        "the site's Content-Security-Policy must allow 'wasm-unsafe-eval'"
    );
  }
}

// Any policy violation while booting fails the boot with its own words,
// instead of leaving it waiting for a file that will never load.
const violation = new Promise((_, reject) => {
  self.addEventListener("securitypolicyviolation", (e) => {
    reject(
      new Error(
        `Blocked by the Content-Security-Policy (${e.effectiveDirective}): ${e.blockedURI || "inline code"}`
      )
    );
  });
});
violation.catch(() => {});

// Mark a promise as handled (its failure is reported where it is awaited), so
// an early failure is not also logged as an unhandled rejection.
function handled(promise) {
  promise.catch(() => {});
  return promise;
}

async function boot() {
  status("loading", "Starting Python");
  await checkWebAssembly();
  // build-info.json is always revalidated; the wheel's URL changes with its
  // content, so ordinary caching is right for it.
  const infoPromise = handled(
    fetchOk(INFO_URL, "build-info.json", "no-cache").then((r) => r.json())
  );
  // Start the wheel download while Pyodide compiles.
  const wheelPromise = handled(
    infoPromise.then((info) =>
      fetchOk(new URL(`../${info.wheel_url}`, import.meta.url), "the solver wheel").then((r) =>
        r.arrayBuffer()
      )
    )
  );

  const { loadPyodide } = await import(new URL("pyodide.mjs", PYODIDE_DIR).href);
  const pyodidePromise = handled(loadPyodide({
    indexURL: PYODIDE_DIR.href,
    // Package files (none are loaded) would resolve here, never against a CDN.
    packageBaseUrl: PYODIDE_DIR.href,
    // Inline lock: only the `info` block of the pinned release (copied at build
    // time into build-info.json), so pyodide-lock.json is not shipped.
    lockFileContents: handled(
      infoPromise.then((info) => ({ info: info.pyodide_lock_info, packages: {} }))
    ),
    stdout: (line) => console.log("[python]", line),
    stderr: (line) => console.warn("[python]", line),
  }));
  // Fail as soon as any of the three fails, not after Python has started.
  const [pyodide, info, wheel] = await Promise.all([pyodidePromise, infoPromise, wheelPromise]);
  markPhase("python");

  status("loading", "Loading solver");
  const sitePackages = pyodide.runPython(
    "import sysconfig; sysconfig.get_paths()['purelib']"
  );
  pyodide.unpackArchive(wheel, "wheel", { extractDir: sitePackages });
  pyodide.registerJsModule("seqpick_host", {
    progress(share) {
      if (currentId !== null) {
        self.postMessage({ type: "progress", id: currentId, share: Number(share) });
      }
    },
  });
  pyodide.runPython("import importlib; importlib.invalidate_caches()");
  api = pyodide.pyimport(info.api_module || "seqpick.api");
  markPhase("solver");
  if (typeof api.call !== "function") {
    throw new Error(`${info.api_module} has no function call(command, json)`);
  }
}

function reply(message) {
  self.postMessage({ type: "reply", ...message });
}

// Take the next request to run, answering superseded ones on the way.
function takeNext() {
  while (queue.length) {
    const msg = queue.shift();
    const channel = msg.channel;
    if (channel != null && queue.some((later) => later.channel === channel)) {
      reply({ id: msg.id, ok: false, superseded: true });
      continue;
    }
    return msg;
  }
  return null;
}

function run(msg) {
  if (bootError) {
    return {
      ok: false,
      error: { field: null, message: `The solver could not start: ${bootError.message}` },
    };
  }
  let payloadJson;
  try {
    payloadJson = JSON.stringify(msg.payload ?? null);
  } catch (err) {
    return { ok: false, error: { field: null, message: `Request cannot be sent: ${err.message}` } };
  }
  const t = performance.now();
  let out;
  currentId = msg.id;
  try {
    out = JSON.parse(api.call(String(msg.command), payloadJson));
  } catch (err) {
    return { ok: false, error: { field: null, message: `Internal error: ${lastLine(err)}` } };
  } finally {
    currentId = null;
  }
  const ms = Math.round((performance.now() - t) * 10) / 10;
  if (out && out.ok === true) {
    return { ok: true, result: out.result, ms };
  }
  const error = (out && out.error) || {};
  return {
    ok: false,
    error: { field: error.field ?? null, message: String(error.message ?? "Unknown error") },
  };
}

// Yield to the event loop between requests so messages that arrived while
// Python was busy are queued (and can supersede) before the next one runs.
const yieldToEvents = () => new Promise((resolve) => setTimeout(resolve, 0));

async function drain() {
  if (busy || (!api && !bootError)) return;
  busy = true;
  try {
    for (;;) {
      await yieldToEvents();
      const msg = takeNext();
      if (!msg) break;
      reply({ id: msg.id, ...run(msg) });
    }
  } finally {
    busy = false;
  }
}

self.onmessage = (event) => {
  const msg = event.data;
  if (!msg || typeof msg !== "object" || msg.id === undefined) return;
  queue.push(msg);
  drain();
};

Promise.race([boot(), violation]).then(
  () => {
    status("ready", "Ready");
    drain();
  },
  (err) => {
    bootError = err instanceof Error ? err : new Error(String(err));
    bootError.message = lastLine(bootError);
    status("failed", bootError.message);
    drain();
  }
);
