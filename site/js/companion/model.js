// The live search record and the pure functions that change it.
//
// A record is plain, versioned JSON (it is what localStorage and an exported
// file hold):
//
//   {
//     format: "seqpick-search", version: 1,
//     id: "k3f9...",                 // [A-Za-z0-9_-], made by newId()
//     name: "Lending-desk coordinator",   // the user's own text (plain text)
//     created: ISO date-time, updated: ISO date-time,
//     scenario: {...},               // snapshot of the plan when the search began
//     rule: "Pass on the first 8, ..." | null,   // the plan's rule in words
//     ended: false,                  // true once the user said "no more candidates"
//     entries: [                     // oldest first
//       { relative_rank: 2,          // rank-only scenarios: 1 = best so far
//         score: 71.5,               // scenarios with scores (instead of relative_rank)
//         time: 3.25,                // time windows: arrival time in window units
//         label: "A. N.",            // optional, the user's own text
//         outcome: "pending" | "passed" | "accepted" | "declined",
//         advice: null | {decision, reason, value_kind, offer_value, pass_value,
//                          plan_decision, threshold, score_threshold, notes},
//         added: ISO date-time }
//     ]
//   }
//
// Only the last entry may be "pending" (waiting for the user's decision).
// Every function here returns a new record and never touches the one given;
// none of them reads the clock (callers pass `now`), so all are testable.
// The engine's request contract is pylib/seqpick/advise.py; toSeen() writes it.

export const FORMAT = "seqpick-search";
export const VERSION = 1;
export const MAX_NAME = 100;
export const MAX_LABEL = 200; // = seqpick.advise.MAX_LABEL
export const MAX_ENTRIES = 100_000; // = seqpick.scenario.MAX_SIZE
export const OUTCOMES = ["pending", "passed", "accepted", "declined"];
export const ID_RE = /^[A-Za-z0-9_-]{1,64}$/;

const DECISIONS = ["offer", "pass", "done"];
const VALUE_KINDS = ["success_probability", "expected_rank", "expected_score"];

/** A fresh random id for a search (16 hex digits). */
export function newId(random = globalThis.crypto) {
  const bytes = new Uint8Array(8);
  random.getRandomValues(bytes);
  return Array.from(bytes, (b) => b.toString(16).padStart(2, "0")).join("");
}

/** Names and labels: text, trimmed, inner runs of white space (incl. line
 *  breaks) made one space, cut to `max` characters. */
export function cleanText(text, max) {
  const t = String(text ?? "").replace(/\s+/g, " ").trim();
  return Array.from(t).slice(0, max).join("");
}

// --- what the scenario asks for ---------------------------------------------

const isObj = (x) => x !== null && typeof x === "object" && !Array.isArray(x);
const isNum = (x) => typeof x === "number" && Number.isFinite(x);

/** What a scenario needs per candidate, and its limits. */
export function scenarioNeeds(scenario) {
  const s = isObj(scenario) ? scenario : {};
  const pool = isObj(s.pool) ? s.pool : {};
  const hasScores = s.scores != null;
  const isWindow = "window" in pool;
  let maxCandidates = null; // null: no fixed end (Poisson pool, time window)
  if (isNum(pool.size)) maxCandidates = pool.size;
  else if (isNum(pool.size_max)) maxCandidates = pool.size_max;
  else if (Array.isArray(pool.chances)) maxCandidates = pool.chances.length;
  else if (Array.isArray(pool.size_weights)) {
    let last = 0;
    pool.size_weights.forEach((w, i) => {
      if (isNum(w) && w > 0) last = i + 1;
    });
    maxCandidates = last;
  }
  const openings = Number.isInteger(s.openings) && s.openings >= 1 ? s.openings : 1;
  return {
    hasScores,
    isWindow,
    window: isWindow && isNum(pool.window) ? pool.window : null,
    unit: isWindow && typeof pool.unit === "string" ? pool.unit : null,
    start: isWindow && typeof pool.start === "string" ? pool.start : null,
    maxCandidates,
    openings,
  };
}

// --- creating and changing a record ------------------------------------------------

export function createSearch({ id, name, scenario, rule = null, now }) {
  return {
    format: FORMAT,
    version: VERSION,
    id,
    name: cleanText(name, MAX_NAME) || "Search",
    created: now,
    updated: now,
    scenario,
    rule: typeof rule === "string" ? rule : null,
    ended: false,
    entries: [],
  };
}

function touch(record, changes, now) {
  return { ...record, ...changes, updated: now };
}

export function rename(record, name, now) {
  const n = cleanText(name, MAX_NAME);
  if (!n) return { error: { field: "name", message: "Give the search a name." } };
  return { record: touch(record, { name: n }, now) };
}

export function setRule(record, rule, now) {
  return touch(record, { rule: typeof rule === "string" ? rule : null }, now);
}

/** Where the search stands. */
export function status(record) {
  const needs = scenarioNeeds(record.scenario);
  const entries = record.entries;
  const last = entries[entries.length - 1];
  const pending = last && last.outcome === "pending" ? last : null;
  const hires = entries.filter((e) => e.outcome === "accepted").length;
  const openingsLeft = Math.max(0, needs.openings - hires);
  let overReason = null;
  if (!pending) {
    if (openingsLeft === 0) overReason = "filled";
    else if (needs.maxCandidates != null && entries.length >= needs.maxCandidates) overReason = "exhausted";
    else if (record.ended) overReason = "ended";
  }
  return {
    seenCount: entries.length,
    nextStage: entries.length + 1,
    hires,
    openings: needs.openings,
    openingsLeft,
    maxCandidates: needs.maxCandidates,
    pending,
    pendingIndex: pending ? entries.length - 1 : null,
    over: overReason !== null,
    overReason,
    lastTime: lastTime(entries),
    needs,
  };
}

function lastTime(entries) {
  for (let i = entries.length - 1; i >= 0; i--) if (isNum(entries[i].time)) return entries[i].time;
  return 0;
}

const err = (field, message) => ({ error: { field, message } });

/** Add the next candidate. `input` = {relative_rank | score, time?, label?}
 *  with numbers already parsed (text that is not a number is refused here). */
export function addCandidate(record, input, now) {
  const st = status(record);
  if (st.pending) return err("", "Record what happened with the current candidate first.");
  if (st.over) return err("", "This search is over; start a new one from the plan.");
  if (st.seenCount >= MAX_ENTRIES) return err("", `A search holds at most ${MAX_ENTRIES} candidates.`);
  const i = st.nextStage;
  const entry = {};
  if (st.needs.hasScores) {
    if (!isNum(input.score)) return err("score", "Enter the candidate's score as a number.");
    entry.score = input.score;
  } else {
    const j = input.relative_rank;
    if (!Number.isInteger(j) || j < 1 || j > i) {
      return err("relative_rank", i === 1 ? "Choose 1st (the first candidate is the best so far)."
        : `Choose where this candidate ranks among the ${i} seen so far (1st to ${ordinal(i)}).`);
    }
    entry.relative_rank = j;
  }
  if (st.needs.isWindow) {
    const t = input.time;
    const hi = st.needs.window;
    if (!isNum(t)) return err("time", "Enter the arrival time as a number.");
    if (t < st.lastTime || (hi != null && t > hi)) {
      return err("time", `Enter an arrival time from ${fmt(st.lastTime)} (the previous candidate's)` +
        (hi != null ? ` to ${fmt(hi)} (the end of the window).` : "."));
    }
    entry.time = t;
  }
  const label = cleanText(input.label, MAX_LABEL);
  if (label) entry.label = label;
  entry.outcome = "pending";
  entry.advice = null;
  entry.added = now;
  return { record: touch(record, { entries: [...record.entries, entry] }, now) };
}

function fmt(x) {
  return String(Math.round(x * 1000) / 1000);
}

/** "passed", "accepted" (offer made and accepted) or "declined". */
export function recordOutcome(record, outcome, now) {
  const st = status(record);
  if (!st.pending) return err("", "There is no candidate waiting for a decision.");
  if (!["passed", "accepted", "declined"].includes(outcome)) return err("outcome", `Unknown outcome ${outcome}.`);
  return { record: replaceEntry(record, st.pendingIndex, { outcome }, now) };
}

/** Keep the engine's advice on entry `index` (only the fields the page uses). */
export function setAdvice(record, index, advice, now) {
  if (!record.entries[index]) return record;
  return replaceEntry(record, index, { advice: pickAdvice(advice) }, now);
}

function replaceEntry(record, index, changes, now) {
  const entries = record.entries.slice();
  entries[index] = { ...entries[index], ...changes };
  return touch(record, { entries }, now);
}

export function pickAdvice(a) {
  if (!isObj(a)) return null;
  const num = (x) => (isNum(x) ? x : null);
  return {
    decision: DECISIONS.includes(a.decision) ? a.decision : null,
    reason: typeof a.reason === "string" ? a.reason.slice(0, 2000) : "",
    value_kind: VALUE_KINDS.includes(a.value_kind) ? a.value_kind : null,
    offer_value: num(a.offer_value),
    pass_value: num(a.pass_value),
    plan_decision: DECISIONS.includes(a.plan_decision) ? a.plan_decision : null,
    threshold: Number.isInteger(a.threshold) ? a.threshold : null,
    score_threshold: num(a.score_threshold),
    notes: Array.isArray(a.notes) ? a.notes.filter((n) => typeof n === "string").slice(0, 20).map((n) => n.slice(0, 1000)) : [],
  };
}

/** "No more candidates": close a search before its pool runs out. */
export function endSearch(record, now) {
  const st = status(record);
  if (st.pending) return err("", "Record what happened with the current candidate first.");
  if (st.over) return err("", "This search is already over.");
  return { record: touch(record, { ended: true }, now) };
}

/** Undo the last thing entered: "no more candidates", else the last outcome
 *  (the candidate waits for a decision again, advice kept), else the last
 *  candidate. Returns {record, undone: "end" | "outcome" | "candidate" | null}. */
export function undo(record, now) {
  if (record.ended) return { record: touch(record, { ended: false }, now), undone: "end" };
  const n = record.entries.length;
  if (n === 0) return { record, undone: null };
  const last = record.entries[n - 1];
  if (last.outcome !== "pending") {
    return { record: replaceEntry(record, n - 1, { outcome: "pending" }, now), undone: "outcome" };
  }
  return { record: touch(record, { entries: record.entries.slice(0, -1) }, now), undone: "candidate" };
}

// --- the engine's view of the search -------------------------------------------------

/** The `seen` list of an advise request (pylib/seqpick/advise.py): every
 *  entry, oldest first; a pending entry carries no offer flags. Labels stay
 *  in the page (they do not change the advice). */
export function toSeen(record) {
  return record.entries.map((e) => {
    const item = {};
    if (e.relative_rank != null) item.relative_rank = e.relative_rank;
    if (e.score != null) item.score = e.score;
    if (e.time != null) item.time = e.time;
    if (e.outcome === "accepted" || e.outcome === "declined") item.offered = true;
    if (e.outcome === "declined") item.declined = true;
    return item;
  });
}

export function adviceRequest(record) {
  return { scenario: record.scenario, seen: toSeen(record) };
}

// --- after the search ------------------------------------------------------------------

/** Ranks among everyone seen (1 = best), from the relative ranks: candidate
 *  i with relative rank j is placed j-th among the first i. O(n^2), n = seen. */
export function ranksAmongSeen(entries) {
  const order = []; // entry indices, best first
  entries.forEach((e, i) => {
    const j = Number.isInteger(e.relative_rank) ? e.relative_rank : order.length + 1;
    order.splice(Math.min(j - 1, order.length), 0, i);
  });
  const ranks = new Array(entries.length);
  order.forEach((idx, pos) => {
    ranks[idx] = pos + 1;
  });
  return ranks;
}

export function followedAdvice(entry) {
  const d = entry.advice && entry.advice.decision;
  if (d !== "offer" && d !== "pass") return null; // no advice to compare with
  if (entry.outcome === "pending") return null;
  const offered = entry.outcome === "accepted" || entry.outcome === "declined";
  return d === "offer" ? offered : !offered;
}

/** What the summary of a finished (or running) search shows. */
export function summarize(record) {
  const entries = record.entries;
  const needs = scenarioNeeds(record.scenario);
  const ranks = needs.hasScores ? null : ranksAmongSeen(entries);
  const scores = entries.map((e) => e.score).filter(isNum);
  const bestScore = scores.length ? Math.max(...scores) : null;
  const hires = [];
  const deviations = [];
  let decisions = 0;
  let followed = 0;
  let planFirstOffer = null;
  entries.forEach((e, i) => {
    const f = followedAdvice(e);
    if (f !== null) {
      decisions += 1;
      if (f) followed += 1;
      else deviations.push({ stage: i + 1, label: e.label ?? null, advised: e.advice.decision, outcome: e.outcome });
    }
    if (planFirstOffer === null && e.advice && e.advice.plan_decision === "offer") {
      planFirstOffer = { stage: i + 1, label: e.label ?? null };
    }
    if (e.outcome === "accepted") {
      hires.push({
        stage: i + 1,
        label: e.label ?? null,
        rankAmongSeen: ranks ? ranks[i] : null,
        score: isNum(e.score) ? e.score : null,
        advised: e.advice ? e.advice.decision : null,
        planDecision: e.advice ? e.advice.plan_decision : null,
      });
    }
  });
  return {
    seenCount: entries.length,
    hires,
    offers: entries.filter((e) => e.outcome === "accepted" || e.outcome === "declined").length,
    declines: entries.filter((e) => e.outcome === "declined").length,
    decisions,
    followed,
    deviations,
    planFirstOffer,
    bestScore,
  };
}

export function ordinal(n) {
  const m100 = n % 100;
  const m10 = n % 10;
  const suffix = m100 >= 11 && m100 <= 13 ? "th" : m10 === 1 ? "st" : m10 === 2 ? "nd" : m10 === 3 ? "rd" : "th";
  return `${n}${suffix}`;
}

// --- checking a record read back from storage or a file ----------------------------------

/** Check the shape of a record and return a clean copy holding only the
 *  known fields ({record}), or {error: "why"}. The scenario itself and the
 *  engine-level rules of the seen list are checked again by the engine on
 *  the next advice. */
export function validateRecord(raw) {
  const bad = (why) => ({ error: why });
  if (!isObj(raw)) return bad("it is not a Seqpick search");
  if (raw.format !== FORMAT) return bad("it is not a Seqpick search");
  if (raw.version !== VERSION) {
    return bad(Number.isInteger(raw.version) && raw.version > VERSION
      ? `it was saved by a newer version of Seqpick (format version ${raw.version})`
      : "its format version is unknown");
  }
  if (typeof raw.id !== "string" || !ID_RE.test(raw.id)) return bad("its id is missing or invalid");
  if (typeof raw.name !== "string" || !cleanText(raw.name, MAX_NAME)) return bad("its name is missing");
  if (raw.name.length > MAX_NAME * 4) return bad("its name is too long");
  if (!isObj(raw.scenario)) return bad("it has no plan (scenario)");
  if (raw.rule != null && typeof raw.rule !== "string") return bad("its rule is not text");
  if (raw.ended != null && typeof raw.ended !== "boolean") return bad("its 'ended' flag is not true/false");
  if (!Array.isArray(raw.entries)) return bad("it has no list of candidates");
  if (raw.entries.length > MAX_ENTRIES) return bad("it has too many candidates");
  const needs = scenarioNeeds(raw.scenario);
  const entries = [];
  let prevTime = 0;
  let hires = 0;
  for (let k = 0; k < raw.entries.length; k++) {
    const e = raw.entries[k];
    const where = `candidate ${k + 1}`;
    if (!isObj(e)) return bad(`${where} is not readable`);
    const out = {};
    if (needs.hasScores) {
      if (!isNum(e.score)) return bad(`${where} has no score`);
      out.score = e.score;
    } else {
      if (!Number.isInteger(e.relative_rank) || e.relative_rank < 1 || e.relative_rank > k + 1) {
        return bad(`${where} has no valid rank so far (1 to ${k + 1})`);
      }
      out.relative_rank = e.relative_rank;
    }
    if (needs.isWindow) {
      if (!isNum(e.time) || e.time < prevTime) return bad(`${where} has no valid arrival time`);
      out.time = prevTime = e.time;
    }
    if (e.label != null) {
      if (typeof e.label !== "string" || e.label.length > MAX_LABEL) return bad(`${where} has an invalid label`);
      const label = cleanText(e.label, MAX_LABEL);
      if (label) out.label = label;
    }
    if (!OUTCOMES.includes(e.outcome)) return bad(`${where} has an unknown outcome`);
    if (e.outcome === "pending" && k !== raw.entries.length - 1) return bad(`${where} is waiting for a decision but is not the last`);
    if (e.outcome === "accepted") hires += 1;
    out.outcome = e.outcome;
    if (e.advice != null && !isObj(e.advice)) return bad(`${where} has unreadable advice`);
    out.advice = pickAdvice(e.advice);
    out.added = typeof e.added === "string" ? e.added.slice(0, 40) : null;
    entries.push(out);
  }
  if (hires > needs.openings) return bad("it has more hires than openings");
  const str = (x) => (typeof x === "string" ? x.slice(0, 40) : null);
  return {
    record: {
      format: FORMAT,
      version: VERSION,
      id: raw.id,
      name: cleanText(raw.name, MAX_NAME),
      created: str(raw.created),
      updated: str(raw.updated),
      scenario: raw.scenario,
      rule: typeof raw.rule === "string" ? raw.rule.slice(0, 2000) : null,
      ended: raw.ended === true,
      entries,
    },
  };
}
