// Page-side handle on the Seqpick engine worker (site/js/engine-worker.js,
// which documents the message protocol).
//
//   import { createEngine } from "./engine.js";
//   const engine = createEngine();
//   engine.onStatus(({state, detail, elapsed_ms}) => ...);  // "loading" | "ready" | "failed"
//   await engine.ready;                                     // rejects if the engine failed to start
//   const result = await engine.request("solve", payload, {channel: "main"});
//
// request() may be called before the engine is ready: requests wait in the
// worker. It rejects with an Error that has:
//   .field      the input the problem is about (or null), and .message;
//   .superseded true when a newer request on the same channel replaced it
//               (ignore these: the newer request's answer is on its way).
// request() resolves with the result object itself; requestWithTiming()
// resolves with {result, ms}, ms being the time spent in Python.
// Pass {onProgress: share => ...} to receive the reserved progress messages.

export function createEngine({ workerUrl } = {}) {
  const url = workerUrl ?? new URL("./engine-worker.js", import.meta.url);
  const worker = new Worker(url, { type: "module" });

  const listeners = new Set();
  const pending = new Map(); // id -> {resolve, reject, onProgress}
  let nextId = 1;
  let lastStatus = null;
  let failed = null;

  let resolveReady, rejectReady;
  const ready = new Promise((resolve, reject) => {
    resolveReady = resolve;
    rejectReady = reject;
  });
  // A page that never awaits `ready` should not see an unhandled rejection.
  ready.catch(() => {});

  function emitStatus(status) {
    lastStatus = status;
    for (const cb of listeners) {
      try {
        cb(status);
      } catch (err) {
        console.error(err);
      }
    }
    if (status.state === "ready") resolveReady();
    if (status.state === "failed") fail(status.detail);
  }

  function fail(message) {
    if (failed) return;
    failed = new Error(message || "The solver could not start");
    rejectReady(failed);
    for (const { reject } of pending.values()) {
      const err = new Error(`The solver could not start: ${failed.message}`);
      err.field = null;
      reject(err);
    }
    pending.clear();
  }

  worker.onmessage = (event) => {
    const msg = event.data;
    if (msg.type === "status") {
      emitStatus(msg);
    } else if (msg.type === "progress") {
      const entry = pending.get(msg.id);
      if (entry && entry.onProgress) entry.onProgress(msg.share);
    } else if (msg.type === "reply") {
      const entry = pending.get(msg.id);
      if (!entry) return;
      pending.delete(msg.id);
      if (msg.ok) {
        entry.resolve({ result: msg.result, ms: msg.ms });
      } else {
        const err = new Error(
          msg.superseded ? "Superseded by a newer request" : msg.error?.message ?? "Unknown error"
        );
        err.field = msg.superseded ? null : msg.error?.field ?? null;
        if (msg.superseded) err.superseded = true;
        entry.reject(err);
      }
    }
  };

  // The worker script itself failed to load or threw at top level.
  worker.onerror = (event) => {
    event.preventDefault();
    const detail = event.message || "The solver's worker could not be started";
    emitStatus({ type: "status", state: "failed", detail, elapsed_ms: null });
  };

  function requestWithTiming(command, payload, { channel, onProgress } = {}) {
    if (failed) {
      const err = new Error(`The solver could not start: ${failed.message}`);
      err.field = null;
      return Promise.reject(err);
    }
    const id = nextId++;
    return new Promise((resolve, reject) => {
      pending.set(id, { resolve, reject, onProgress });
      const message = { id, command, payload };
      if (channel != null) message.channel = String(channel);
      worker.postMessage(message);
    });
  }

  return {
    ready,
    /** Call cb(status) on every status message (and now, with the latest one). Returns an unsubscribe function. */
    onStatus(cb) {
      listeners.add(cb);
      if (lastStatus) cb(lastStatus);
      return () => listeners.delete(cb);
    },
    /** Resolve with the command's result object. */
    request(command, payload, options) {
      return requestWithTiming(command, payload, options).then((r) => r.result);
    },
    /** Like request(), but resolve with {result, ms} (ms: time spent in Python). */
    requestWithTiming,
    /** Stop the worker; pending requests are rejected. */
    terminate() {
      worker.terminate();
      fail("The solver was stopped");
    },
  };
}
