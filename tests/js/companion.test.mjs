// Unit tests of the live view's pure modules (site/js/companion/model.js and
// store.js), run by `node --test` (tests/unit/test_companion_js.py runs them
// from pytest). Storage is a fake with a size limit, so quota errors,
// corrupted records and crashes between two writes can be staged.

import test from "node:test";
import assert from "node:assert/strict";
import { webcrypto } from "node:crypto";

import * as model from "../../site/js/companion/model.js";
import * as store from "../../site/js/companion/store.js";

const NOW = "2026-01-05T10:00:00.000Z";
const TEN = { version: 1, pool: { size: 10 }, goal: { type: "best" } };

class FakeStorage {
  constructor(limit = Infinity) {
    this.map = new Map();
    this.limit = limit;
  }
  get length() {
    return this.map.size;
  }
  key(i) {
    return [...this.map.keys()][i] ?? null;
  }
  getItem(k) {
    return this.map.has(k) ? this.map.get(k) : null;
  }
  setItem(k, v) {
    const used = [...this.map].reduce((n, [key, val]) => n + (key === k ? 0 : key.length + val.length), 0);
    if (used + k.length + String(v).length > this.limit) {
      const e = new Error("quota");
      e.name = "QuotaExceededError";
      throw e;
    }
    this.map.set(k, String(v));
  }
  removeItem(k) {
    this.map.delete(k);
  }
}

function search(scenario = TEN, id = "s1") {
  return model.createSearch({ id, name: "Test", scenario, now: NOW });
}

/** Apply [[rank, outcome], ...] through the model, as the page does. */
function play(rec, steps) {
  for (const [rank, outcome] of steps) {
    const a = model.addCandidate(rec, { relative_rank: rank }, NOW);
    assert.ok(a.record, JSON.stringify(a.error));
    rec = a.record;
    if (outcome) {
      const b = model.recordOutcome(rec, outcome, NOW);
      assert.ok(b.record, JSON.stringify(b.error));
      rec = b.record;
    }
  }
  return rec;
}

// --- model ----------------------------------------------------------------------------

test("newId gives 16 hex digits that are valid ids", () => {
  const id = model.newId(webcrypto);
  assert.match(id, /^[0-9a-f]{16}$/);
  assert.ok(model.ID_RE.test(id));
});

test("addCandidate checks the rank against the number seen", () => {
  let rec = search();
  assert.equal(model.addCandidate(rec, { relative_rank: 2 }, NOW).error.field, "relative_rank");
  assert.equal(model.addCandidate(rec, { relative_rank: 0 }, NOW).error.field, "relative_rank");
  assert.equal(model.addCandidate(rec, { relative_rank: 1.5 }, NOW).error.field, "relative_rank");
  rec = play(rec, [[1, "passed"]]);
  assert.ok(model.addCandidate(rec, { relative_rank: 2 }, NOW).record);
  assert.equal(model.addCandidate(rec, { relative_rank: 3 }, NOW).error.field, "relative_rank");
  // A second candidate cannot be added while one waits for a decision.
  rec = play(rec, [[2, null]]);
  assert.ok(model.addCandidate(rec, { relative_rank: 1 }, NOW).error);
});

test("scores and arrival times are checked for scenarios that use them", () => {
  const scored = { version: 1, pool: { window: 10, arrivals_per_unit: 2 }, goal: { type: "score" },
    scores: { distribution: "uniform", low: 0, high: 100 } };
  let rec = search(scored);
  assert.equal(model.addCandidate(rec, { score: null, time: 1 }, NOW).error.field, "score");
  assert.equal(model.addCandidate(rec, { score: 50, time: 11 }, NOW).error.field, "time");
  rec = model.addCandidate(rec, { score: 50, time: 2, relative_rank: 1 }, NOW).record;
  assert.deepEqual(model.toSeen(rec), [{ score: 50, time: 2 }]);
  rec = model.recordOutcome(rec, "passed", NOW).record;
  assert.equal(model.addCandidate(rec, { score: 60, time: 1.5 }, NOW).error.field, "time");
  assert.ok(model.addCandidate(rec, { score: 60, time: 2 }, NOW).record);
});

test("labels are plain text, trimmed and cut to the engine's limit", () => {
  const label = `  <b>x</b>\n\t${"y".repeat(300)}`;
  const rec = model.addCandidate(search(), { relative_rank: 1, label }, NOW).record;
  const got = rec.entries[0].label;
  assert.equal(got.length, model.MAX_LABEL);
  assert.ok(got.startsWith("<b>x</b> yyy"));
});

test("toSeen writes the engine's contract: offer flags, no flags while waiting, no labels", () => {
  let rec = play(search(), [[1, "passed"], [1, "declined"], [2, "passed"], [1, null]]);
  rec = model.addCandidate(rec, {}, NOW).record ?? rec;
  assert.deepEqual(model.toSeen(rec), [
    { relative_rank: 1 },
    { relative_rank: 1, offered: true, declined: true },
    { relative_rank: 2 },
    { relative_rank: 1 },
  ]);
  const hired = model.recordOutcome(rec, "accepted", NOW).record;
  assert.deepEqual(model.toSeen(hired)[3], { relative_rank: 1, offered: true });
});

test("status: filled, exhausted, ended", () => {
  const filled = play(search(), [[1, "passed"], [1, "accepted"]]);
  assert.equal(model.status(filled).overReason, "filled");
  assert.ok(model.addCandidate(filled, { relative_rank: 1 }, NOW).error);

  const two = { ...TEN, pool: { size: 3 }, openings: 2 };
  let rec = play(search(two), [[1, "accepted"], [1, "declined"]]);
  assert.equal(model.status(rec).openingsLeft, 1);
  assert.equal(model.status(rec).over, false);
  rec = play(rec, [[3, "passed"]]);
  assert.equal(model.status(rec).overReason, "exhausted");

  const poisson = play(search({ version: 1, pool: { size_mean: 5 } }), [[1, "passed"]]);
  assert.equal(model.status(poisson).maxCandidates, null);
  const ended = model.endSearch(poisson, NOW).record;
  assert.equal(model.status(ended).overReason, "ended");
  assert.ok(model.endSearch(ended, NOW).error);
});

test("undo goes back one step at a time: end, then outcome, then candidate", () => {
  let rec = play(search({ version: 1, pool: { size_mean: 5 } }), [[1, "passed"], [2, "declined"]]);
  rec = model.endSearch(rec, NOW).record;
  const steps = [];
  for (;;) {
    const u = model.undo(rec, NOW);
    if (!u.undone) break;
    steps.push(u.undone);
    rec = u.record;
  }
  assert.deepEqual(steps, ["end", "outcome", "candidate", "outcome", "candidate"]);
  assert.equal(rec.entries.length, 0);
  assert.equal(rec.ended, false);
});

test("functions never change the record they are given", () => {
  const rec = play(search(), [[1, "passed"]]);
  const frozen = JSON.stringify(rec);
  model.addCandidate(rec, { relative_rank: 2 }, NOW);
  model.undo(rec, NOW);
  model.endSearch(rec, NOW);
  model.setAdvice(rec, 0, { decision: "pass" }, NOW);
  model.rename(rec, "Other", NOW);
  assert.equal(JSON.stringify(rec), frozen);
});

function* permutations(items) {
  if (items.length <= 1) {
    yield items.slice();
    return;
  }
  for (let i = 0; i < items.length; i++) {
    const rest = [...items.slice(0, i), ...items.slice(i + 1)];
    for (const p of permutations(rest)) yield [items[i], ...p];
  }
}

test("ranksAmongSeen recovers the true ranks from relative ranks (every order, n <= 7)", () => {
  for (let n = 1; n <= 7; n++) {
    for (const quality of permutations([...Array(n).keys()])) {
      // quality[i]: true rank of the i-th arrival (0 = best); relative rank = 1 + number of earlier better ones.
      const entries = quality.map((q, i) => ({ relative_rank: 1 + quality.slice(0, i).filter((x) => x < q).length }));
      const ranks = model.ranksAmongSeen(entries);
      assert.deepEqual(ranks, quality.map((q) => q + 1));
    }
  }
});

test("summarize counts advice followed, deviations, the plan's first offer and the hire", () => {
  let rec = play(search(), [[1, null]]);
  const advise = (decision, plan) => ({ decision, plan_decision: plan, reason: "r", value_kind: "success_probability", offer_value: 0.1, pass_value: 0.2 });
  const steps = [
    [1, "passed", advise("pass", "pass")],
    [2, "declined", advise("pass", "pass")], // not followed
    [1, "passed", advise("offer", "offer")], // not followed; the plan's first offer
    [1, "accepted", advise("offer", "offer")],
  ];
  rec = search();
  steps.forEach(([rank, outcome, advice], i) => {
    rec = model.addCandidate(rec, { relative_rank: rank, label: `L${i + 1}` }, NOW).record;
    rec = model.setAdvice(rec, i, advice, NOW);
    rec = model.recordOutcome(rec, outcome, NOW).record;
  });
  const s = model.summarize(rec);
  assert.equal(s.decisions, 4);
  assert.equal(s.followed, 2);
  assert.deepEqual(s.deviations.map((d) => d.stage), [2, 3]);
  assert.deepEqual(s.planFirstOffer, { stage: 3, label: "L3" });
  assert.equal(s.hires.length, 1);
  assert.equal(s.hires[0].stage, 4);
  assert.equal(s.hires[0].rankAmongSeen, 1);
  assert.equal(s.offers, 2);
  assert.equal(s.declines, 1);
});

test("validateRecord keeps known fields only and refuses bad shapes", () => {
  const good = play(search(), [[1, "passed"], [2, null]]);
  const withJunk = { ...good, extra: 1, entries: good.entries.map((e) => ({ ...e, junk: "x" })) };
  const { record } = model.validateRecord(JSON.parse(JSON.stringify(withJunk)));
  assert.deepEqual(record, good);
  const bad = [
    null, [], { ...good, format: "x" }, { ...good, version: 2 }, { ...good, id: "a b" },
    { ...good, name: "   " }, { ...good, scenario: [] }, { ...good, entries: {} },
    { ...good, entries: [{ relative_rank: 2, outcome: "passed" }] },
    { ...good, entries: [{ relative_rank: 1, outcome: "pending" }, { relative_rank: 1, outcome: "passed" }] },
    { ...good, entries: [{ relative_rank: 1, outcome: "maybe" }] },
    { ...good, entries: [{ relative_rank: 1, outcome: "passed", label: 5 }] },
    { ...good, entries: [{ relative_rank: 1, outcome: "accepted" }, { relative_rank: 1, outcome: "accepted" }] },
    { ...good, entries: [{ score: 3, outcome: "passed" }] },
  ];
  for (const b of bad) assert.ok(model.validateRecord(b).error, JSON.stringify(b));
  assert.match(model.validateRecord({ ...good, version: 2 }).error, /newer version/);
});

// --- store ----------------------------------------------------------------------------

function saveAll(db, records, selected) {
  for (const r of records) assert.ok(store.saveRecord(db, r).ok);
  assert.ok(store.saveIndex(db, records.map((r) => r.id), selected).ok);
}

test("save and load round trip, selection kept", () => {
  const db = new FakeStorage();
  const a = play(search(TEN, "aaa"), [[1, "passed"]]);
  const b = play(search(TEN, "bbb"), [[1, null]]);
  saveAll(db, [a, b], "aaa");
  const out = store.loadAll(db);
  assert.deepEqual(out.records, [a, b]);
  assert.equal(out.selected, "aaa");
  assert.deepEqual(out.setAside, []);
});

test("a corrupted or foreign record is moved aside; the others load", () => {
  const db = new FakeStorage();
  const a = play(search(TEN, "aaa"), [[1, "passed"]]);
  saveAll(db, [a], "aaa");
  db.setItem(store.recordKey("bad"), "{broken");
  db.setItem(store.recordKey("alien"), JSON.stringify({ format: "other" }));
  db.setItem(store.recordKey("moved"), JSON.stringify({ ...a, id: "elsewhere" }));
  db.setItem(store.QUARANTINE_PREFIX + "bad", "an older one");
  store.saveIndex(db, ["aaa", "bad", "alien", "moved"], "bad");
  const out = store.loadAll(db);
  assert.deepEqual(out.records.map((r) => r.id), ["aaa"]);
  assert.equal(out.selected, "aaa");
  assert.deepEqual(out.setAside.map((x) => x.id), ["bad", "alien", "moved"]);
  // Never deleted: kept under a free quarantine key (the first one was taken).
  assert.equal(db.getItem(store.QUARANTINE_PREFIX + "bad.2"), "{broken");
  assert.equal(db.getItem(store.QUARANTINE_PREFIX + "bad"), "an older one");
  assert.equal(db.getItem(store.recordKey("bad")), null);
  assert.deepEqual(JSON.parse(db.getItem(store.INDEX_KEY)).order, ["aaa"]);
  // The next load is clean.
  assert.deepEqual(store.loadAll(db).setAside, []);
});

test("a crash between two writes loses nothing; a broken index is rebuilt", () => {
  const db = new FakeStorage();
  const a = play(search(TEN, "aaa"), [[1, "passed"]]);
  const b = { ...search(TEN, "bbb"), created: "2026-01-06T00:00:00.000Z" };
  saveAll(db, [a], "aaa");
  // The record was written, the index not yet: the record is taken back in.
  store.saveRecord(db, b);
  assert.deepEqual(store.loadAll(db).records.map((r) => r.id), ["aaa", "bbb"]);
  // Erasing removed the record but not the index entry: the name is dropped.
  db.removeItem(store.recordKey("aaa"));
  assert.deepEqual(store.loadAll(db).records.map((r) => r.id), ["bbb"]);
  // A broken index is set aside and rebuilt from the records.
  db.setItem(store.INDEX_KEY, "nope");
  const out = store.loadAll(db);
  assert.deepEqual(out.records.map((r) => r.id), ["bbb"]);
  assert.equal(out.setAside[0].id, "index");
  assert.equal(db.getItem(store.QUARANTINE_PREFIX + "index"), "nope");
  assert.deepEqual(JSON.parse(db.getItem(store.INDEX_KEY)).order, ["bbb"]);
});

test("a full quota is reported and what was saved stays", () => {
  const a = play(search(TEN, "aaa"), [[1, "passed"]]);
  const db = new FakeStorage(JSON.stringify(a).length + 200);
  assert.ok(store.saveRecord(db, a).ok);
  const saved = db.getItem(store.recordKey("aaa"));
  const bigger = play(a, Array.from({ length: 5 }, (_, i) => [i + 2, "passed"]));
  const r = store.saveRecord(db, bigger);
  assert.equal(r.ok, false);
  assert.equal(r.quota, true);
  assert.equal(db.getItem(store.recordKey("aaa")), saved);
  assert.ok(store.isQuotaError({ name: "NS_ERROR_DOM_QUOTA_REACHED" }));
  assert.ok(!store.isQuotaError(new TypeError("x")));
});

test("export text imports back to the same record", () => {
  const a = play(search(TEN, "aaa"), [[1, "passed"], [1, "declined"], [3, null]]);
  const back = store.parseImport(store.exportText(a));
  assert.deepEqual(back.record, a);
  assert.deepEqual(store.parseImport(`\uFEFF${store.exportText(a)}`).record, a);
});

test("bad import files give a sentence and no record", () => {
  for (const text of ["", "{", "[]", "null", JSON.stringify({ format: "x" }), "x".repeat(store.MAX_IMPORT + 1)]) {
    const out = store.parseImport(text);
    assert.ok(out.error && !out.record, text.slice(0, 20));
    assert.match(out.error, /^This file cannot be imported: .+\.$/);
  }
});

test("export file names keep letters, digits, '-' and '_' only", () => {
  assert.equal(store.exportFileName("Workshop lead, spring"), "seqpick-Workshop-lead-spring.json");
  assert.equal(store.exportFileName("Café über straße"), "seqpick-Cafe-uber-stra-e.json");
  assert.equal(store.exportFileName("../../etc/passwd"), "seqpick-etc-passwd.json");
  assert.equal(store.exportFileName("<>:*?"), "seqpick-search.json");
  assert.ok(store.exportFileName("x".repeat(500)).length <= "seqpick-.json".length + 60);
});
