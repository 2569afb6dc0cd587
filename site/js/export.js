// Exports of a plan: CSV files (RFC 4180) of the cutoff table and of the
// comparison, and the scenario in plain words for the printed plan.
//
// Everything here is a pure function of a result (SolveResult.to_dict()) or a
// scenario, except downloadText(), which hands a file to the browser.
//
// CSV rules (RFC 4180, Shafranovich 2005, "Common Format and MIME Type for
// Comma-Separated Values (CSV) Files"):
//   * records end with CRLF, the last one too; the first record is a header;
//   * a field holding a comma, a double quote, CR or LF is put in double
//     quotes, and a double quote inside it is doubled;
//   * numbers are written as the result JSON has them, at full precision
//     (String(x): the shortest text that reads back as the same double), with a
//     dot as the decimal separator and no grouping: no locale formatting;
//   * empty field = no value (null in the result).
// Spreadsheet formula injection (OWASP, "CSV Injection"): a *text* field that
// starts with = + - @ TAB or CR gets a leading apostrophe, so no spreadsheet
// runs it as a formula. Numbers are never changed (a negative number stays
// a number).

import { groupRuns } from "./plan/cutoffs.js";
import { thresholdWords } from "./plan/words.js";
import { formatCount, formatNumber, formatPercent, isNum } from "./format.js";

export const CSV_EOL = "\r\n";
/** Byte order mark put before the text of a download, so spreadsheet programs
 *  read the file as UTF-8 (common practice); not part of the CSV text itself. */
export const UTF8_BOM = "\ufeff";

const UNIT_WORDS = { minute: "minute", hour: "hour", day: "day", week: "week", month: "month" };

const FORMULA_START = /^[=+\-@\t\r]/;
const NEEDS_QUOTES = /[",\r\n]/;

/** One CSV field. Numbers: full precision; null/undefined/NaN: empty; text:
 *  guarded against formula injection, quoted when needed. */
export function csvField(value) {
  if (value == null) return "";
  if (typeof value === "number") {
    if (!Number.isFinite(value)) return "";
    return Object.is(value, -0) ? "0" : String(value);
  }
  if (typeof value === "boolean") return value ? "true" : "false";
  let text = String(value);
  if (FORMULA_START.test(text)) text = `'${text}`;
  return NEEDS_QUOTES.test(text) ? `"${text.replace(/"/g, '""')}"` : text;
}

/** CSV text: a header row, then one record per row; every record ends with CRLF. */
export function toCsv(header, rows) {
  return [header, ...rows].map((r) => r.map(csvField).join(",") + CSV_EOL).join("");
}

// --- the cutoff table ------------------------------------------------------------------

export const CUTOFF_HEADER = ["table", "openings_left", "first", "last", "threshold", "action"];

function rankRecords(groups, openingsLeft) {
  return groups.map((g) => [
    "relative rank",
    openingsLeft,
    g.first,
    g.last,
    g.threshold,
    thresholdWords(g.threshold, g.first, g.last),
  ]);
}

function scoreRecords(bars, openingsLeft) {
  return groupRuns(bars).map((r) => [
    "score bar",
    openingsLeft,
    r.first,
    r.last,
    isNum(r.value) ? r.value : null,
    isNum(r.value) ? `Offer if the score is at least ${formatNumber(r.value, 2)}` : "No score bar at this stage",
  ]);
}

function timeText(t, unit) {
  const u = UNIT_WORDS[unit];
  return u ? `${formatNumber(t, 2)} ${u}${t === 1 ? "" : "s"}` : `${formatNumber(t, 2)} units of time`;
}

const byOpeningsLeft = (table) =>
  table && typeof table === "object" && !Array.isArray(table)
    ? Object.keys(table).sort((a, b) => Number(b) - Number(a))
    : [];

/**
 * Rows of the cutoff table, as the engine gives them (no merging):
 *   table "relative rank": stages first..last accept relative ranks up to
 *     `threshold` (0 = pass everyone); one block per openings left when the
 *     engine gives thresholds_by_openings_left, else policy.groups;
 *   table "score bar": stages first..last offer at a score of at least
 *     `threshold` (policy.score_thresholds, or per openings left);
 *   table "earliest time": arrival number first (= last) can get an offer
 *     from time `threshold` on, in the window's units (policy.time_thresholds).
 * O(number of stages).
 */
export function cutoffRecords(result) {
  const p = result?.policy ?? {};
  const openings = result?.scenario?.openings ?? 1;
  const rows = [];
  const rankLeft = byOpeningsLeft(p.thresholds_by_openings_left);
  if (rankLeft.length) {
    for (const k of rankLeft) {
      const groups = groupRuns(p.thresholds_by_openings_left[k]).map((g) => ({
        first: g.first,
        last: g.last,
        threshold: g.value,
      }));
      rows.push(...rankRecords(groups, Number(k)));
    }
  } else if (Array.isArray(p.groups)) {
    rows.push(...rankRecords(p.groups, openings));
  }
  const scoreLeft = byOpeningsLeft(p.score_thresholds_by_openings_left);
  if (scoreLeft.length) {
    for (const k of scoreLeft) rows.push(...scoreRecords(p.score_thresholds_by_openings_left[k], Number(k)));
  } else if (Array.isArray(p.score_thresholds) && p.score_thresholds.length) {
    rows.push(...scoreRecords(p.score_thresholds, openings));
  }
  const times = p.time_thresholds;
  if (times && typeof times === "object") {
    const keys = Object.keys(times)
      .map(Number)
      .filter((k) => Number.isInteger(k) && isNum(times[String(k)]))
      .sort((a, b) => a - b);
    for (const k of keys) {
      const t = times[String(k)];
      rows.push(["earliest time", openings, k, k, t, `Offer possible from ${timeText(t, result.scenario?.pool?.unit)} after the window opens`]);
    }
  }
  return rows;
}

export function cutoffCsv(result) {
  return toCsv(CUTOFF_HEADER, cutoffRecords(result));
}

// --- the comparison --------------------------------------------------------------------

export const COMPARISON_HEADER = [
  "rule",
  "description",
  "success_probability",
  "forced_last",
  "other",
  "none",
  "expected_rank",
  "expected_score",
  "expected_interviews",
  "p_no_hire",
];

/** The best rule (first row) and every compared rule, with their numbers. */
export function comparisonRecords(result) {
  if (!result) return [];
  const row = (name, description, r) => [
    name,
    description,
    r.success_probability,
    r.outcome?.forced_last,
    r.outcome?.other,
    r.outcome?.none,
    r.expected_rank,
    r.expected_score,
    r.expected_interviews,
    r.p_no_hire,
  ];
  return [
    row("Best rule (this plan)", result.policy?.words ?? "", result),
    ...(result.compare ?? []).map((c) => row(c.name, c.description, c)),
  ];
}

export function comparisonCsv(result) {
  return toCsv(COMPARISON_HEADER, comparisonRecords(result));
}

// --- file names and downloads ---------------------------------------------------------------

/** "seqpick-cutoffs-harbour-street-tool-library.csv"; the pool size when untitled. */
export function csvFileName(kind, scenario) {
  const title = String(scenario?.title ?? "")
    .normalize("NFKD")
    .replace(/[\u0300-\u036f]/g, "")
    .toLowerCase()
    .replace(/[^a-z0-9]+/g, "-")
    .replace(/^-+|-+$/g, "")
    .slice(0, 48)
    .replace(/-+$/, "");
  const size = scenario?.pool?.size;
  const tail = title || (Number.isInteger(size) ? `${size}-candidates` : "plan");
  return `seqpick-${kind}-${tail}.csv`;
}

/** Hand `text` to the browser as a file download (a Blob URL, freed afterwards). */
export function downloadText(text, fileName, type = "text/csv;charset=utf-8") {
  const url = URL.createObjectURL(new Blob([UTF8_BOM, text], { type }));
  const link = document.createElement("a");
  link.href = url;
  link.download = fileName;
  link.hidden = true;
  document.body.append(link);
  link.click();
  link.remove();
  setTimeout(() => URL.revokeObjectURL(url), 60_000);
}

// --- the scenario in words (printed plan) -------------------------------------------------------

function poolText(pool) {
  if (isNum(pool.size)) return `${formatCount(pool.size)}, met one at a time in random order`;
  if (isNum(pool.size_min) && isNum(pool.size_max))
    return `between ${formatCount(pool.size_min)} and ${formatCount(pool.size_max)}, every count equally likely`;
  if (isNum(pool.size_mean)) return `about ${formatNumber(pool.size_mean, 2)} on average (the count varies at random)`;
  if (Array.isArray(pool.size_weights)) return `your own weights for 1 to ${formatCount(pool.size_weights.length)} candidates`;
  if (isNum(pool.window) && isNum(pool.arrivals_per_unit)) {
    const unit = UNIT_WORDS[pool.unit];
    const per = unit ? `per ${unit}` : "per unit of time";
    const length = unit ? `${formatNumber(pool.window, 2)} ${unit}${pool.window === 1 ? "" : "s"}` : `${formatNumber(pool.window, 2)} units of time`;
    const start = pool.start ? `, opening ${pool.start}` : "";
    return `arriving over ${length}, about ${formatNumber(pool.arrivals_per_unit, 2)} ${per}${start}`;
  }
  if (Array.isArray(pool.chances)) return `${formatCount(pool.chances.length)} stages, each with its own chance`;
  return "—";
}

function goalText(goal) {
  if (goal?.type === "top") return `hire one of the best ${formatCount(goal.k)}`;
  if (goal?.type === "rank") return "the best place in the ranking, on average";
  if (goal?.type === "score") return "the highest score, on average";
  return "hire the very best";
}

function scoresText(sc) {
  if (!sc) return "not used: only who is better than whom";
  if (sc.distribution === "uniform") return `spread evenly from ${formatNumber(sc.low, 4)} to ${formatNumber(sc.high, 4)}`;
  if (sc.distribution === "normal") return `bell-shaped, average ${formatNumber(sc.mean, 4)}, spread ${formatNumber(sc.sd, 4)}`;
  if (sc.distribution === "sample") return `${formatCount(sc.values?.length ?? 0)} past scores`;
  return "—";
}

function ruleText(rule) {
  if (isNum(rule.skip)) return `pass on the first ${formatCount(rule.skip)}`;
  if (isNum(rule.skip_share)) return `pass on the first ${formatPercent(rule.skip_share)}`;
  if (isNum(rule.start_share)) return `wait ${formatPercent(rule.start_share)} of the window`;
  if (isNum(rule.score_at_least)) return `first with a score of at least ${formatNumber(rule.score_at_least, 4)}`;
  return "—";
}

/** The scenario as [label, text] pairs, for the printed plan. */
export function scenarioFacts(scenario) {
  const s = scenario ?? {};
  const facts = [
    ["Candidates", poolText(s.pool ?? {})],
    ["Goal", goalText(s.goal)],
    ["Scores", scoresText(s.scores)],
    ["Offers accepted", !isNum(s.accept_probability) || s.accept_probability >= 1 ? "always" : formatPercent(s.accept_probability)],
    ["Openings", isNum(s.openings) ? formatCount(s.openings) : "1"],
    ["Cost per candidate", isNum(s.cost_per_candidate) && s.cost_per_candidate > 0 ? formatNumber(s.cost_per_candidate, 6) : "none"],
    ["Must hire someone", s.must_hire ? "yes: take the last candidate if nobody was chosen" : "no"],
  ];
  if (Array.isArray(s.compare) && s.compare.length) facts.push(["Rules compared", s.compare.map(ruleText).join("; ")]);
  return facts;
}

