// Plain-word labels for engine values, shared by the result sections.

import { formatCount } from "../format.js";

/** What "success" means for this result, e.g. "hiring the best". */
export function successPhrase(result) {
  const goal = result.scenario?.goal ?? { type: result.goal };
  if (goal.type === "top") return `hiring one of the best ${formatCount(goal.k)}`;
  return "hiring the best";
}

/** Labels of the four outcome shares, in display order. */
export function outcomeLabels(result) {
  const goal = result.scenario?.goal ?? { type: result.goal };
  return [
    ["best", goal.type === "top" ? `Hired one of the best ${formatCount(goal.k)}` : "Hired the best"],
    ["other", "Hired someone else"],
    ["none", "No hire"],
    ["forced_last", "Had to take the last"],
  ];
}

/** Rows of the top table: [key of result.top, label]. */
export const TOP_ROWS = [
  ["1", "The very best"],
  ["2", "The best 2"],
  ["3", "The best 3"],
  ["5", "The best 5"],
  ["10", "The best 10"],
  ["10%", "The best 10% of the pool"],
  ["25%", "The best 25% of the pool"],
  ["50%", "The best half of the pool"],
];

/** Names for the quantities of result.limits. */
export const LIMIT_NAMES = {
  success_probability: "Chance of success",
  skip_share: "Share of the pool to pass on",
  start_share: "Share of the window to wait",
  expected_rank: "Average rank of the hire",
  expected_score: "Average score of the hire",
  expected_interviews: "Candidates met, on average",
  p_no_hire: "Chance of no hire",
};

/** Quantities that are chances or shares, shown as percentages too. */
export const LIMIT_PERCENT = new Set(["success_probability", "skip_share", "start_share", "p_no_hire"]);

export function limitName(quantity) {
  if (LIMIT_NAMES[quantity]) return LIMIT_NAMES[quantity];
  const text = String(quantity).replace(/_/g, " ");
  return text.charAt(0).toUpperCase() + text.slice(1);
}

/** A cutoff in plain words: what to do in stages first..last with this threshold. */
export function thresholdWords(threshold, first, last) {
  if (threshold <= 0) return "Pass everyone";
  if (threshold >= last) return "Offer to anyone";
  if (threshold === 1) return "Offer to a best-so-far";
  return `Offer to anyone ranked 1–${formatCount(threshold)} so far`;
}

export function stagesWords(first, last) {
  return first === last ? `Stage ${formatCount(first)}` : `Stages ${formatCount(first)}–${formatCount(last)}`;
}
