// The page's one state object, and the pure functions that turn the form's
// values into a scenario (the engine's JSON contract, pylib/seqpick/scenario.py)
// and back.
//
// state = {
//   form:    what the user typed, as text (plus a few choices); every pool
//            form, score form and compare rule keeps its values even while
//            hidden, so switching back loses nothing;
//   nextRowId: counter for compare-rule row ids ("r1", "r2", ...);
//   view:    "plan" | "live";
//   engine:  {state: "loading" | "ready" | "failed", detail};
//   errors:  {<control key>: message} from the engine (one at a time: the
//            engine names the first offending field);
//   generalError: a message that belongs to no single control, or null;
//   result:  the last good answer {data, key, compareIds, scenario, source} or null:
//            data = SolveResult.to_dict(), key = scenarioKey() of the
//            scenario it answers, compareIds = the compare rows sent, in order,
//            source = "prerendered" (worked out by the build) | "live";
//   share:   share link, downloads and print (see share.js);
//   pending: true while a solve for the current inputs is on its way;
//   ui:      {expanded: {<table key>: rows shown}} for long tables.
// }
//
// scenarioFromState(stateFromScenario(s)) deep-equals s for every canonical
// scenario s (as produced by the engine's Scenario.to_dict(): all fields
// present, "title" only when given) whose compare rules apply to it.
// Numbers go through their shortest decimal text (String(x)), and percent
// boxes shift the decimal point in the text rather than multiplying, so no
// binary rounding creeps in: 0.07 -> "7" -> 0.07.

import { readPrerendered } from "./prerendered.js";

export const POOL_FORMS = ["size", "range", "mean", "weights", "window", "chances"];
export const GOAL_TYPES = ["best", "top", "rank", "score"];
export const SCORE_FORMS = ["none", "uniform", "normal", "sample"];
export const COMPARE_KINDS = ["skip", "skip_share", "start_share", "score_at_least"];
export const WINDOW_UNITS = ["minute", "hour", "day", "week", "month"];
/** Compare-rule kinds whose value box is in percent (the JSON holds a share). */
export const PERCENT_KINDS = new Set(["skip_share", "start_share"]);
export const MAX_COMPARE = 20;

/** Used only when site/demo-scenario.json cannot be had at all. */
const FALLBACK_DEMO = { version: 1, pool: { size: 30 } };

function deepFreeze(value) {
  if (value && typeof value === "object") {
    for (const v of Object.values(value)) deepFreeze(v);
    Object.freeze(value);
  }
  return value;
}

/** The demo scenario's one source is site/demo-scenario.json (the build reads
 *  it too). The built page carries it inline (#prerendered-plan, see
 *  prerendered.js), so no request is made; an unbuilt page fetches the file. */
async function loadDemoScenario() {
  const inline = readPrerendered();
  if (inline) return structuredClone(inline.scenario);
  try {
    const response = await fetch(new URL("../demo-scenario.json", import.meta.url));
    if (response.ok) return await response.json();
  } catch {
    // Fall through to the built-in minimum.
  }
  console.warn("Seqpick: demo-scenario.json could not be loaded; starting from a plain scenario.");
  return FALLBACK_DEMO;
}

/** Our own demo: a small lending library choosing one coordinator. */
export const DEMO_SCENARIO = deepFreeze(await loadDemoScenario());

/** Values of every control before anything is typed. */
export function defaultForm() {
  return {
    title: "",
    poolForm: "size",
    size: "30",
    sizeMin: "20",
    sizeMax: "40",
    sizeMean: "30",
    sizeWeights: "",
    window: "14",
    unit: "day",
    arrivalsPerUnit: "2",
    start: "",
    chances: "",
    goalType: "best",
    topK: "3",
    scoresForm: "none",
    low: "0",
    high: "100",
    mean: "50",
    sd: "15",
    values: "",
    acceptPercent: "100",
    openings: "1",
    cost: "0",
    mustHire: false,
    // true once must_hire was chosen (by the user or a loaded scenario); until
    // then switching the goal to rank/score turns it on, as the engine would.
    mustHireSet: false,
    // [{id, kind, values: {skip, skip_share, start_share, score_at_least}}]
    compare: [],
  };
}

export function emptyRuleValues() {
  return { skip: "", skip_share: "", start_share: "", score_at_least: "" };
}

/** A fresh state around a form. */
export function createState(form = defaultForm(), nextRowId = 1) {
  return {
    form,
    nextRowId,
    view: "plan",
    engine: { state: "loading", detail: "" },
    errors: {},
    generalError: null,
    result: null,
    pending: false,
    ui: { expanded: {} },
  };
}

// --- text <-> numbers ---------------------------------------------------------

const NUM_RE = /^[+-]?(\d+\.?\d*|\.\d+)(e[+-]?\d+)?$/i;

/** Trivial parsing only: a number if the text is one, null if empty, else
 *  the text itself (the engine then says what is wrong with it). */
export function parseNumberText(text) {
  const t = String(text ?? "").trim().replace(/\u2212/g, "-");
  if (t === "") return null;
  return NUM_RE.test(t) ? Number(t) : t;
}

/** Shift the decimal point of a decimal numeral by k places (k > 0: right),
 *  returning a plain numeral ("0.371", 2 -> "37.1"; "1e-7", 2 -> "0.00001"). */
export function shiftDecimal(text, k) {
  const m = /^([+-]?)(\d*)(?:\.(\d*))?(?:e([+-]?\d+))?$/i.exec(text);
  if (!m) return null;
  const [, sign, intPart = "", frac = "", exp = "0"] = m;
  let digits = intPart + frac;
  if (digits === "") return null;
  let point = intPart.length + Number(exp) + k;
  if (point <= 0) {
    digits = "0".repeat(1 - point) + digits;
    point = 1;
  }
  if (point > digits.length) digits += "0".repeat(point - digits.length);
  const whole = digits.slice(0, point).replace(/^0+(?=\d)/, "");
  const part = digits.slice(point).replace(/0+$/, "");
  return sign + whole + (part ? `.${part}` : "");
}

/** "37.1" (percent) -> 0.371; empty -> null; not a number -> the text. */
export function percentTextToShare(text) {
  const t = String(text ?? "").trim().replace(/%$/, "").trim().replace(/\u2212/g, "-");
  if (t === "") return null;
  if (!NUM_RE.test(t)) return String(text).trim();
  return Number(shiftDecimal(t, -2));
}

/** 0.371 -> "37.1"; anything that is not a number is shown as typed. */
export function shareToPercentText(p) {
  if (typeof p !== "number" || !Number.isFinite(p)) return p == null ? "" : String(p);
  return shiftDecimal(String(p), 2) ?? String(p);
}

function numText(v) {
  return v == null ? "" : String(v);
}

/** A pasted list: numbers separated by commas, semicolons, spaces or lines. */
export function parseListText(text) {
  return String(text ?? "")
    .split(/[\s,;]+/)
    .filter((t) => t !== "")
    .map(parseNumberText);
}

export function listText(values) {
  return Array.isArray(values) ? values.map((v) => String(v)).join(", ") : numText(values);
}

// --- which controls apply -------------------------------------------------------

/** Whether a compare rule of this kind can be used with the form as it is. */
export function compareApplies(kind, form) {
  if (kind === "score_at_least") return form.scoresForm !== "none";
  if (kind === "start_share") return form.poolForm === "window";
  return true;
}

// --- form -> scenario -------------------------------------------------------------

function poolFromForm(f) {
  switch (f.poolForm) {
    case "range":
      return { size_min: parseNumberText(f.sizeMin), size_max: parseNumberText(f.sizeMax) };
    case "mean":
      return { size_mean: parseNumberText(f.sizeMean) };
    case "weights":
      return { size_weights: parseListText(f.sizeWeights) };
    case "window": {
      const pool = {
        window: parseNumberText(f.window),
        arrivals_per_unit: parseNumberText(f.arrivalsPerUnit),
      };
      if (String(f.start).trim() !== "") pool.start = String(f.start).trim();
      if (f.unit) pool.unit = f.unit;
      return pool;
    }
    case "chances":
      return { chances: parseListText(f.chances) };
    default:
      return { size: parseNumberText(f.size) };
  }
}

function scoresFromForm(f) {
  switch (f.scoresForm) {
    case "uniform":
      return { distribution: "uniform", low: parseNumberText(f.low), high: parseNumberText(f.high) };
    case "normal":
      return { distribution: "normal", mean: parseNumberText(f.mean), sd: parseNumberText(f.sd) };
    case "sample":
      return { distribution: "sample", values: parseListText(f.values) };
    default:
      return null;
  }
}

function ruleFromRow(row) {
  const text = row.values[row.kind];
  const value = PERCENT_KINDS.has(row.kind) ? percentTextToShare(text) : parseNumberText(text);
  return { [row.kind]: value };
}

/** The scenario and the ids of the compare rows it carries (in order), so an
 *  engine error "compare.1.skip" can be put beside the right row. */
export function buildRequest(state) {
  const f = state.form;
  const scenario = { version: 1 };
  if (f.title !== "") scenario.title = f.title;
  scenario.pool = poolFromForm(f);
  scenario.goal = f.goalType === "top" ? { type: "top", k: parseNumberText(f.topK) } : { type: f.goalType };
  scenario.scores = scoresFromForm(f);
  scenario.accept_probability = percentTextToShare(f.acceptPercent);
  scenario.openings = parseNumberText(f.openings);
  scenario.cost_per_candidate = parseNumberText(f.cost);
  scenario.must_hire = Boolean(f.mustHire);
  const rows = f.compare.filter((row) => compareApplies(row.kind, f));
  scenario.compare = rows.map(ruleFromRow);
  return { scenario, compareIds: rows.map((row) => row.id) };
}

/** The scenario JSON object the form describes. */
export function scenarioFromState(state) {
  return buildRequest(state).scenario;
}

/** What identifies an answer: the scenario without its title. */
export function scenarioKey(scenario) {
  const { title, ...rest } = scenario;
  return JSON.stringify(rest);
}

// --- scenario -> form ------------------------------------------------------------------

const has = (obj, key) => obj != null && Object.prototype.hasOwnProperty.call(obj, key);

/** A fresh state whose form shows `scenario` (anything missing gets its
 *  default; values of the wrong type are kept as text for the engine to judge). */
export function stateFromScenario(scenario) {
  const s = scenario && typeof scenario === "object" ? scenario : {};
  const f = defaultForm();
  if (typeof s.title === "string") f.title = s.title;

  const pool = s.pool && typeof s.pool === "object" ? s.pool : {};
  if (has(pool, "size")) {
    f.poolForm = "size";
    f.size = numText(pool.size);
  } else if (has(pool, "size_min") || has(pool, "size_max")) {
    f.poolForm = "range";
    f.sizeMin = numText(pool.size_min);
    f.sizeMax = numText(pool.size_max);
  } else if (has(pool, "size_mean")) {
    f.poolForm = "mean";
    f.sizeMean = numText(pool.size_mean);
  } else if (has(pool, "size_weights")) {
    f.poolForm = "weights";
    f.sizeWeights = listText(pool.size_weights);
  } else if (has(pool, "window") || has(pool, "arrivals_per_unit")) {
    f.poolForm = "window";
    f.window = numText(pool.window);
    f.arrivalsPerUnit = numText(pool.arrivals_per_unit);
    f.start = numText(pool.start);
    f.unit = WINDOW_UNITS.includes(pool.unit) ? pool.unit : "";
  } else if (has(pool, "chances")) {
    f.poolForm = "chances";
    f.chances = listText(pool.chances);
  }

  const goal = s.goal && typeof s.goal === "object" ? s.goal : { type: "best" };
  f.goalType = GOAL_TYPES.includes(goal.type) ? goal.type : "best";
  if (f.goalType === "top") f.topK = numText(goal.k);

  const sc = s.scores;
  if (sc && typeof sc === "object") {
    if (sc.distribution === "uniform") {
      f.scoresForm = "uniform";
      f.low = numText(sc.low);
      f.high = numText(sc.high);
    } else if (sc.distribution === "normal") {
      f.scoresForm = "normal";
      f.mean = numText(sc.mean);
      f.sd = numText(sc.sd);
    } else if (sc.distribution === "sample") {
      f.scoresForm = "sample";
      f.values = listText(sc.values);
    }
  }

  if (has(s, "accept_probability")) f.acceptPercent = shareToPercentText(s.accept_probability);
  if (has(s, "openings")) f.openings = numText(s.openings);
  if (has(s, "cost_per_candidate")) f.cost = numText(s.cost_per_candidate);
  if (has(s, "must_hire") && s.must_hire != null) {
    f.mustHire = s.must_hire === true;
    f.mustHireSet = true;
  } else {
    f.mustHire = f.goalType === "rank" || f.goalType === "score";
  }

  let next = 1;
  for (const item of Array.isArray(s.compare) ? s.compare : []) {
    if (!item || typeof item !== "object") continue;
    const kind = COMPARE_KINDS.find((k) => has(item, k));
    if (!kind) continue;
    const values = emptyRuleValues();
    values[kind] = PERCENT_KINDS.has(kind) ? shareToPercentText(item[kind]) : numText(item[kind]);
    f.compare.push({ id: `r${next++}`, kind, values });
  }
  return createState(f, next);
}

// --- engine field -> control ---------------------------------------------------------

const FIELD_CONTROLS = {
  title: "title",
  pool: "poolForm",
  "pool.size": "size",
  "pool.size_min": "sizeMin",
  "pool.size_max": "sizeMax",
  "pool.size_mean": "sizeMean",
  "pool.size_weights": "sizeWeights",
  "pool.window": "window",
  "pool.arrivals_per_unit": "arrivalsPerUnit",
  "pool.start": "start",
  "pool.unit": "unit",
  "pool.chances": "chances",
  goal: "goalType",
  "goal.type": "goalType",
  "goal.k": "topK",
  scores: "scoresForm",
  "scores.distribution": "scoresForm",
  "scores.low": "low",
  "scores.high": "high",
  "scores.mean": "mean",
  "scores.sd": "sd",
  "scores.values": "values",
  accept_probability: "acceptPercent",
  openings: "openings",
  cost_per_candidate: "cost",
  must_hire: "mustHire",
  compare: "compare",
};

/** The control a dotted engine field belongs to: a form key ("size"),
 *  "compare:<row id>" for a compare rule, or null (show it above the form).
 *  "pool.size_weights.3" -> "sizeWeights"; "compare.1.skip" -> the second row sent. */
export function controlForField(field, compareIds = []) {
  if (!field) return null;
  const parts = String(field).split(".");
  if (parts[0] === "compare" && parts.length > 1) {
    const id = compareIds[Number(parts[1])];
    return id ? `compare:${id}` : "compare";
  }
  for (let n = parts.length; n > 0; n--) {
    const key = FIELD_CONTROLS[parts.slice(0, n).join(".")];
    if (key) return key;
  }
  return null;
}
