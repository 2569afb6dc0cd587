// Words for the live view: the plan in one line, the engine's values with
// their captions, outcomes, and time-window clock arithmetic. Pure.

import { formatCount, formatNumber, formatPercent } from "../format.js";

const isObj = (x) => x !== null && typeof x === "object" && !Array.isArray(x);
const isNum = (x) => typeof x === "number" && Number.isFinite(x);

/** Milliseconds per window unit. A month is the mean Gregorian month,
 *  365.2425 / 12 days (common practice). */
export const UNIT_MS = {
  minute: 60_000,
  hour: 3_600_000,
  day: 86_400_000,
  week: 604_800_000,
  month: (365.2425 / 12) * 86_400_000,
};

function unitWord(unit, n) {
  const u = unit || "time unit";
  return n === 1 ? u : `${u}s`;
}

/** The plan in one line: "24 candidates · goal: hire the best · 1 opening". */
export function describeScenario(scenario) {
  if (!isObj(scenario)) return "No plan.";
  const s = scenario;
  const parts = [];
  const pool = isObj(s.pool) ? s.pool : {};
  if (isNum(pool.size)) parts.push(`${formatCount(pool.size)} ${pool.size === 1 ? "candidate" : "candidates"}`);
  else if (isNum(pool.size_min) && isNum(pool.size_max)) parts.push(`${formatCount(pool.size_min)} to ${formatCount(pool.size_max)} candidates, each number equally likely`);
  else if (isNum(pool.size_mean)) parts.push(`about ${formatNumber(pool.size_mean, 2)} candidates (Poisson)`);
  else if (Array.isArray(pool.size_weights)) parts.push(`up to ${formatCount(pool.size_weights.length)} candidates, with your weights for each number`);
  else if (isNum(pool.window)) {
    parts.push(`candidates arrive over ${formatNumber(pool.window, 3)} ${unitWord(pool.unit, pool.window)}, about ${formatNumber(pool.arrivals_per_unit, 3)} per ${pool.unit || "time unit"}`);
  } else if (Array.isArray(pool.chances)) parts.push(`${formatCount(pool.chances.length)} candidates, each with its own chance of being the one`);
  const goal = isObj(s.goal) ? s.goal : { type: "best" };
  const goalText = {
    best: "goal: hire the best",
    top: `goal: hire one of the best ${goal.k}`,
    rank: "goal: the best expected rank",
    score: "goal: the highest expected score",
  }[goal.type];
  if (goalText) parts.push(goalText);
  const sc = s.scores;
  if (isObj(sc)) {
    if (sc.distribution === "uniform") parts.push(`scores spread evenly from ${formatNumber(sc.low, 3)} to ${formatNumber(sc.high, 3)}`);
    else if (sc.distribution === "normal") parts.push(`scores normal, mean ${formatNumber(sc.mean, 3)}, spread (sd) ${formatNumber(sc.sd, 3)}`);
    else if (sc.distribution === "sample" && Array.isArray(sc.values)) parts.push(`scores like ${formatCount(sc.values.length)} past ones`);
  }
  const openings = isNum(s.openings) ? s.openings : 1;
  parts.push(`${formatCount(openings)} ${openings === 1 ? "opening" : "openings"}`);
  if (isNum(s.accept_probability) && s.accept_probability < 1) parts.push(`${formatPercent(s.accept_probability)} of offers accepted`);
  if (isNum(s.cost_per_candidate) && s.cost_per_candidate > 0) parts.push(`cost ${formatNumber(s.cost_per_candidate, 3)} per candidate`);
  if (s.must_hire === true) parts.push("must end with a hire");
  return parts.join(" · ");
}

/** How a value of the engine's `value_kind` is shown. */
export function formatValue(kind, x) {
  if (kind === "success_probability") return formatPercent(x);
  return formatNumber(x, 2);
}

/** Captions of the two values: [offer now, pass and go on]. */
export function valueCaptions(kind) {
  switch (kind) {
    case "expected_rank":
      return ["Expected rank of the hire if you offer now (1 = best)", "Expected rank if you pass and go on"];
    case "expected_score":
      return ["Expected score if you offer now", "Expected score if you pass and go on"];
    default:
      return ["Chance of success if you offer now", "Chance of success if you pass and go on"];
  }
}

/** Which of the two values is better: "offer", "pass" or null (a tie or missing). */
export function betterSide(kind, offer, pass) {
  if (!isNum(offer) || !isNum(pass) || offer === pass) return null;
  const lowerIsBetter = kind === "expected_rank";
  return (offer < pass) === lowerIsBetter ? "offer" : "pass";
}

export const DECISION_TEXT = { offer: "Make an offer", pass: "Pass", done: "The search is over" };

export const OUTCOME_TEXT = {
  pending: "Waiting for your decision",
  passed: "Passed",
  accepted: "Offer accepted",
  declined: "Offer declined",
};

/** Time since the window opened, in window units, or null if the start or
 *  unit is not known or not a date. */
export function elapsedUnits(start, unit, nowMs) {
  if (typeof start !== "string" || !UNIT_MS[unit]) return null;
  const t0 = Date.parse(start);
  if (!Number.isFinite(t0)) return null;
  return (nowMs - t0) / UNIT_MS[unit];
}

/** A number as short editable text (at most 3 decimals). */
export function numberText(x) {
  if (!isNum(x)) return "";
  return String(Math.round(x * 1000) / 1000);
}
