// Saving live searches in the browser (localStorage), and export / import.
//
// Every function takes the storage object as an argument (anything with
// getItem / setItem / removeItem / key / length), so tests can pass a fake.
//
// Keys:
//   seqpick.searches.v1       the index: {"version": 1, "order": [id, ...], "selected": id | null}
//   seqpick.search.<id>       one search record (model.js), as JSON
//   seqpick.quarantine.<id>   a record that could not be read, moved aside untouched
//
// Writing order keeps a crash harmless: a new record is written before the
// index names it, and an erased record is removed before the index drops it.
// On load, a record the index does not name is taken back in, and a name in
// the index without a record is dropped. A record that cannot be read is
// moved aside (never deleted) and reported; the others load normally.

import { FORMAT, ID_RE, cleanText, validateRecord } from "./model.js";

export const INDEX_KEY = "seqpick.searches.v1";
export const RECORD_PREFIX = "seqpick.search.";
export const QUARANTINE_PREFIX = "seqpick.quarantine.";
export const INDEX_VERSION = 1;
/** Largest file import accepts (characters). */
export const MAX_IMPORT = 5_000_000;

export const recordKey = (id) => RECORD_PREFIX + id;

/** True for the browser's "storage is full" error (its name differs by engine). */
export function isQuotaError(e) {
  if (!e || typeof e !== "object") return false;
  return e.name === "QuotaExceededError" || e.name === "NS_ERROR_DOM_QUOTA_REACHED" || e.code === 22 || e.code === 1014;
}

function write(storage, key, value) {
  try {
    storage.setItem(key, value);
    return { ok: true };
  } catch (e) {
    return isQuotaError(e)
      ? { ok: false, quota: true, message: "The browser's storage for this page is full." }
      : { ok: false, quota: false, message: `The browser refused to save (${e && e.name ? e.name : e}).` };
  }
}

/** Move the text under `key` to a free quarantine key and remove `key`.
 *  Returns the quarantine key, or null if even that could not be written
 *  (then the original stays where it was: nothing is lost). */
function quarantine(storage, key, baseId, text) {
  const base = QUARANTINE_PREFIX + (ID_RE.test(baseId) ? baseId : "record");
  let target = base;
  for (let n = 2; storage.getItem(target) !== null; n++) target = `${base}.${n}`;
  if (!write(storage, target, text).ok) return null;
  storage.removeItem(key);
  return target;
}

function allKeys(storage) {
  const keys = [];
  for (let i = 0; i < storage.length; i++) {
    const k = storage.key(i);
    if (k !== null) keys.push(k);
  }
  return keys;
}

/** Read every saved search.
 *  Returns {records: [record, ...] in index order, selected: id | null,
 *           setAside: [{id, key, reason}], indexRepaired: boolean}. */
export function loadAll(storage) {
  const setAside = [];
  let order = [];
  let selected = null;
  let indexRepaired = false;

  const indexText = storage.getItem(INDEX_KEY);
  if (indexText !== null) {
    const index = parseIndex(indexText);
    if (index) {
      order = index.order;
      selected = index.selected;
    } else {
      const key = quarantine(storage, INDEX_KEY, "index", indexText);
      setAside.push({ id: "index", key, reason: "the list of saved searches could not be read" });
      indexRepaired = true;
    }
  }

  // Records the index does not name (a crash between two writes, or a
  // repaired index) are taken back in, oldest first.
  const named = new Set(order);
  const orphans = allKeys(storage)
    .filter((k) => k.startsWith(RECORD_PREFIX))
    .map((k) => k.slice(RECORD_PREFIX.length))
    .filter((id) => !named.has(id));
  const ids = [...order, ...orphans.sort()];
  if (orphans.length) indexRepaired = true;

  const records = [];
  const seen = new Set();
  for (const id of ids) {
    if (seen.has(id)) continue;
    seen.add(id);
    const key = recordKey(id);
    const text = storage.getItem(key);
    if (text === null) {
      indexRepaired = true; // named in the index but gone: drop the name
      continue;
    }
    const result = readRecord(text, id);
    if (result.record) {
      records.push(result.record);
    } else {
      const qkey = quarantine(storage, key, id, text);
      setAside.push({ id, key: qkey, reason: result.error });
      indexRepaired = true;
    }
  }
  if (orphans.length) {
    // Orphans are ordered by creation time among themselves.
    const orphanSet = new Set(orphans);
    const kept = records.filter((r) => !orphanSet.has(r.id));
    const back = records.filter((r) => orphanSet.has(r.id)).sort((a, b) => String(a.created).localeCompare(String(b.created)));
    records.length = 0;
    records.push(...kept, ...back);
  }
  if (!records.some((r) => r.id === selected)) selected = records.length ? records[records.length - 1].id : null;
  if (indexRepaired) saveIndex(storage, records.map((r) => r.id), selected);
  return { records, selected, setAside, indexRepaired };
}

function parseIndex(text) {
  let raw;
  try {
    raw = JSON.parse(text);
  } catch {
    return null;
  }
  if (!raw || typeof raw !== "object" || raw.version !== INDEX_VERSION || !Array.isArray(raw.order)) return null;
  if (!raw.order.every((id) => typeof id === "string" && ID_RE.test(id))) return null;
  const selected = typeof raw.selected === "string" && ID_RE.test(raw.selected) ? raw.selected : null;
  return { order: raw.order, selected };
}

/** Parse and check one stored record; its id must match its key. */
export function readRecord(text, id) {
  let raw;
  try {
    raw = JSON.parse(text);
  } catch {
    return { error: "it is not valid JSON" };
  }
  const result = validateRecord(raw);
  if (result.error) return result;
  if (id != null && result.record.id !== id) return { error: "its id does not match where it was saved" };
  return result;
}

/** Save one record. Returns {ok: true} or {ok: false, quota, message};
 *  on failure what was saved before stays as it was. */
export function saveRecord(storage, record) {
  return write(storage, recordKey(record.id), JSON.stringify(record));
}

export function saveIndex(storage, order, selected) {
  return write(storage, INDEX_KEY, JSON.stringify({ version: INDEX_VERSION, order, selected: selected ?? null }));
}

/** Erase a record (record first, then the index, see the top of the file). */
export function eraseRecord(storage, id, order, selected) {
  storage.removeItem(recordKey(id));
  return saveIndex(storage, order.filter((x) => x !== id), selected === id ? null : selected);
}

// --- files ---------------------------------------------------------------------

/** The text of an exported search (the record itself, pretty-printed). */
export function exportText(record) {
  return `${JSON.stringify(record, null, 2)}\n`;
}

/** "seqpick-<name>.json", with the name cut down to letters, digits, '-' and '_'. */
export function exportFileName(name) {
  const base = cleanText(name, 200)
    .normalize("NFKD")
    .replace(/[\u0300-\u036f]/g, "")
    .replace(/[^A-Za-z0-9_-]+/g, "-")
    .replace(/-+/g, "-")
    .replace(/^[-_]+|[-_]+$/g, "")
    .slice(0, 60)
    .replace(/[-_]+$/g, "");
  return `seqpick-${base || "search"}.json`;
}

/** Read an imported file's text. Returns {record} (a checked copy; the
 *  caller gives it a fresh id) or {error: "a sentence for the user"}. */
export function parseImport(text) {
  const fail = (why) => ({ error: `This file cannot be imported: ${why}.` });
  if (typeof text !== "string") return fail("it could not be read");
  if (text.length > MAX_IMPORT) return fail("it is too large to be a Seqpick search");
  let raw;
  try {
    raw = JSON.parse(text.replace(/^\uFEFF/, ""));
  } catch {
    return fail("it is not a JSON file");
  }
  if (!raw || typeof raw !== "object" || raw.format !== FORMAT) return fail("it is not a Seqpick search export");
  const result = validateRecord(raw);
  return result.error ? fail(result.error) : result;
}
