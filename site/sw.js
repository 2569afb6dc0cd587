// Seqpick service worker: keeps every file of the site so that, after one
// visit, the page (and the solver, Pyodide included) works with no network.
//
// The build writes the manifest between the PRECACHE markers below (see
// inject_precache in build_scripts/build.py): every file of the built site
// and its sha256, plus a version that changes exactly when a file does. A
// new manifest makes this file differ byte for byte, which is what makes the
// browser install the new worker.
//
// install   downloads each listed file (revalidating any HTTP-cached copy),
//           checks its sha256 against the manifest and stores it in the cache
//           "seqpick-<version>"; a file whose hash is unchanged is copied
//           from the previous version's cache instead of downloaded again.
//           A mismatch (a half-finished deploy, a proxy rewriting files)
//           fails the install; the browser tries again on a later visit.
// activate  deletes the caches of older versions and takes control of open
//           pages (they keep the files they already loaded).
// fetch     cache first for the listed files (a query string is ignored:
//           "?v=<hash>" cache busters point at the same file); everything
//           else goes to the network as if there were no worker.

"use strict";

const PRECACHE = /*PRECACHE*/ { "version": "unbuilt", "files": {} } /*END PRECACHE*/;

const PREFIX = "seqpick-";
const CACHE = PREFIX + PRECACHE.version;
const HASH_HEADER = "X-Seqpick-Sha256";
const PARALLEL = 4;
const SCOPE = new URL(self.registration.scope);

/** The manifest's name for a URL ("index.html" for the folder), or null outside the scope. */
function pathOf(url) {
  if (url.origin !== SCOPE.origin || !url.pathname.startsWith(SCOPE.pathname)) return null;
  let rel;
  try {
    rel = decodeURIComponent(url.pathname.slice(SCOPE.pathname.length));
  } catch {
    return null;
  }
  if (rel === "" || rel.endsWith("/")) rel += "index.html";
  return Object.hasOwn(PRECACHE.files, rel) ? rel : null;
}

function urlOf(path) {
  return new URL(path, SCOPE).href;
}

async function sha256Hex(buffer) {
  const digest = new Uint8Array(await crypto.subtle.digest("SHA-256", buffer));
  return Array.from(digest, (b) => b.toString(16).padStart(2, "0")).join("");
}

/** A stored copy of `path` with content `sha` from an older version's cache, or null. */
async function fromOlderCache(path, sha) {
  for (const name of await caches.keys()) {
    if (!name.startsWith(PREFIX) || name === CACHE) continue;
    const hit = await (await caches.open(name)).match(urlOf(path));
    if (hit && hit.headers.get(HASH_HEADER) === sha) return hit;
  }
  return null;
}

async function download(path, sha) {
  const response = await fetch(urlOf(path), { cache: "no-cache" });
  if (!response.ok) throw new Error(`${path}: HTTP ${response.status}`);
  const body = await response.arrayBuffer();
  const got = await sha256Hex(body);
  if (got !== sha) {
    throw new Error(`${path} does not match this build (sha256 ${got.slice(0, 12)}…, expected ${sha.slice(0, 12)}…)`);
  }
  const headers = new Headers(response.headers);
  headers.set(HASH_HEADER, sha);
  return new Response(body, { status: response.status, statusText: response.statusText, headers });
}

async function precache() {
  const cache = await caches.open(CACHE);
  const todo = Object.entries(PRECACHE.files);
  async function lane() {
    for (let item = todo.pop(); item; item = todo.pop()) {
      const [path, sha] = item;
      const have = await cache.match(urlOf(path)); // an install tried before
      if (have && have.headers.get(HASH_HEADER) === sha) continue;
      const response = (await fromOlderCache(path, sha)) ?? (await download(path, sha));
      await cache.put(urlOf(path), response);
    }
  }
  await Promise.all(Array.from({ length: PARALLEL }, lane));
}

self.addEventListener("install", (event) => {
  event.waitUntil(
    precache().then(
      () => self.skipWaiting(),
      (err) => {
        console.warn(`Seqpick offline copy not stored: ${err.message}`);
        throw err;
      }
    )
  );
});

self.addEventListener("activate", (event) => {
  event.waitUntil(
    (async () => {
      for (const name of await caches.keys()) {
        if (name.startsWith(PREFIX) && name !== CACHE) await caches.delete(name);
      }
      await self.clients.claim();
    })()
  );
});

async function cacheFirst(path, request) {
  const hit = await (await caches.open(CACHE)).match(urlOf(path));
  return hit ?? fetch(request);
}

self.addEventListener("fetch", (event) => {
  const request = event.request;
  if (request.method !== "GET") return;
  const path = pathOf(new URL(request.url));
  if (path === null) return; // not part of the site's files: the network, untouched
  event.respondWith(cacheFirst(path, request));
});
