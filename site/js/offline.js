// Offline use: registers the service worker (sw.js, at the site's root) that
// keeps every file of the site, so after one visit the page and its solver
// work with no network. Imported once by app.js; it changes nothing on the
// page (the worker is a transparent cache; see sw.js).
//
// Registration waits until the page has loaded and the solver has started (or
// failed to): by then the browser's HTTP cache holds Pyodide's files, so the
// worker's download only revalidates them instead of fetching ~14 MB twice
// while the solver is booting.

const SW_URL = new URL("../sw.js", import.meta.url);

/** Register the worker; resolves with the registration, or null where there is none. */
export async function registerOffline(container = globalThis.navigator?.serviceWorker) {
  // Service workers need a secure context (https or 127.0.0.1/localhost).
  if (!container || !globalThis.isSecureContext) return null;
  try {
    return await container.register(SW_URL, { scope: new URL("./", SW_URL).href });
  } catch (err) {
    // The page works as before; only the offline copy is missing.
    console.warn(`Seqpick cannot be kept for offline use here: ${err.message}`);
    return null;
  }
}

function pageLoaded() {
  if (document.readyState === "complete") return Promise.resolve();
  return new Promise((resolve) => window.addEventListener("load", resolve, { once: true }));
}

async function whenSolverSettled() {
  // Imported lazily: app.js imports this module.
  const { engine } = await import("./app.js");
  await engine.ready.catch(() => {});
}

pageLoaded()
  .then(whenSolverSettled)
  .catch(() => {})
  .then(() => registerOffline());
