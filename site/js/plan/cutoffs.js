// The rule stage by stage: one row per run of stages that share a cutoff
// (policy.groups), per openings left when the engine gives
// thresholds_by_openings_left, and the score bar per stage when it gives
// score_thresholds. Long tables show ROW_CAP rows and a "Show all" button.

import { el } from "./dom.js";
import { formatCount, formatNumber, formatPercent, isNum } from "../format.js";
import { stagesWords, thresholdWords } from "./words.js";

export const ROW_CAP = 200;

/** Runs of equal values: [{first, last, value}] (stages are 1-based). O(n). */
export function groupRuns(values, same = (a, b) => a === b) {
  const out = [];
  values.forEach((v, i) => {
    const last = out[out.length - 1];
    if (last && same(last.value, v)) last.last = i + 1;
    else out.push({ first: i + 1, last: i + 1, value: v });
  });
  return out;
}

function cappedTable({ key, caption, head, rows, expanded, onExpand }) {
  const limit = expanded[key] ?? ROW_CAP;
  const shown = rows.slice(0, limit);
  const table = el(
    "table",
    { class: "data-table cutoff-table" },
    el("caption", { text: caption }),
    el("thead", {}, el("tr", {}, head.map((h) => el("th", { scope: "col", text: h })))),
    el(
      "tbody",
      {},
      shown.map(([stage, action]) => el("tr", {}, el("th", { scope: "row", text: stage }), el("td", { text: action })))
    )
  );
  const wrap = el("div", { class: "table-wrap", tabindex: "-1", dataset: { table: key } }, table);
  if (rows.length > shown.length) {
    const more = el("button", {
      type: "button",
      class: "button button-secondary",
      text: `Show all ${formatCount(rows.length)} rows`,
    });
    more.addEventListener("click", () => onExpand(key));
    wrap.append(
      el("p", { class: "table-more" }, `Showing the first ${formatCount(shown.length)} of ${formatCount(rows.length)} rows. `, more)
    );
  }
  return wrap;
}

/** Table rows for threshold groups; neighbouring groups that read the same
 *  ("Offer to anyone" when the threshold grows with the stage) are merged. */
function rankRows(groups) {
  const merged = [];
  for (const g of groups) {
    const words = thresholdWords(g.threshold, g.first, g.last);
    const last = merged[merged.length - 1];
    if (last && last.words === words && last.last + 1 === g.first) last.last = g.last;
    else merged.push({ first: g.first, last: g.last, words });
  }
  return merged.map((m) => [stagesWords(m.first, m.last), m.words]);
}

function unitWords(t, unit) {
  if (!unit) return `${formatNumber(t, 2)} (window units)`;
  return `${formatNumber(t, 2)} ${unit}${t === 1 ? "" : "s"}`;
}

/** "3.68 days after it opens, about 6 Mar 2026, 01:17" */
function whenWords(t, pool) {
  const when = cutoffDate(pool.start, t, pool.unit);
  return `${unitWords(t, pool.unit)} after it opens${when ? `, about ${when}` : ""}`;
}

function timeWords(result) {
  const p = result.policy;
  const pool = result.scenario?.pool ?? {};
  if (!isNum(p.start_share)) return null;
  const until = isNum(p.start_time) ? ` (until ${whenWords(p.start_time, pool)})` : "";
  return (
    `Clock-only version: make no offers in the first ${formatPercent(p.start_share)} of the window${until}, ` +
    "then offer to the first candidate better than everyone before."
  );
}

/** Rows for policy.time_thresholds {arrival number: earliest time of an offer}. */
function timeRows(table, pool) {
  const keys = Object.keys(table)
    .map(Number)
    .filter((k) => Number.isInteger(k) && k >= 1 && isNum(table[String(k)]))
    .sort((a, b) => a - b);
  if (!keys.length) return [];
  const rows = [];
  const first = keys[0];
  const last = keys[keys.length - 1];
  if (first > 1) {
    rows.push([first === 2 ? "Arrival 1" : `Arrivals 1–${formatCount(first - 1)}`, `From ${whenWords(table[String(first)], pool)}`]);
  }
  for (const k of keys) rows.push([`Arrival ${formatCount(k)}`, `From ${whenWords(table[String(k)], pool)}`]);
  rows.push([`Arrival ${formatCount(last + 1)} and later`, "At any time"]);
  return rows;
}

// Units as milliseconds; a month is the mean Gregorian month, 30.436875 days
// (common practice), so dates after whole months are "about".
const UNIT_MS = {
  minute: 60e3,
  hour: 3600e3,
  day: 86400e3,
  week: 7 * 86400e3,
  month: 30.436875 * 86400e3,
};

const DATE_FORMAT = new Intl.DateTimeFormat("en-GB", { dateStyle: "medium", timeStyle: "short", timeZone: "UTC" });
// A start given with a time zone is shown in the reader's own zone, named.
const ZONED_FORMAT = new Intl.DateTimeFormat("en-GB", {
  year: "numeric",
  month: "short",
  day: "numeric",
  hour: "2-digit",
  minute: "2-digit",
  timeZoneName: "short",
});

/** The window's start plus `t` units, as date and time text; null if unknown.
 *  A start with no time zone is read as a wall-clock time and shown as one
 *  (computed in UTC, so no daylight-saving shift creeps in). */
export function cutoffDate(start, t, unit) {
  if (!start || !UNIT_MS[unit] || !isNum(t)) return null;
  const text = String(start).trim();
  const zoned = /([zZ]|[+-]\d\d:?\d\d)$/.test(text);
  const t0 = Date.parse(zoned || !/T\d/.test(text) ? text : `${text}Z`);
  if (!Number.isFinite(t0)) return null;
  return (zoned ? ZONED_FORMAT : DATE_FORMAT).format(new Date(t0 + t * UNIT_MS[unit]));
}

/**
 * The cutoff section's content for a result.
 * expanded: {table key: rows to show}; onExpand(key) asks for all rows.
 */
export function cutoffContent(result, { expanded, onExpand }) {
  const p = result.policy;
  const out = [];
  const time = timeWords(result);
  if (time) out.push(el("p", { class: "cutoff-time", text: time }));

  const head = ["Stages", "What to do"];
  const byLeft = p.thresholds_by_openings_left;
  if (byLeft && typeof byLeft === "object" && Object.keys(byLeft).length) {
    const keys = Object.keys(byLeft).sort((a, b) => Number(b) - Number(a));
    for (const k of keys) {
      const groups = groupRuns(byLeft[k]).map((g) => ({ first: g.first, last: g.last, threshold: g.value }));
      const n = Number(k);
      out.push(
        cappedTable({
          key: `left-${k}`,
          caption: n === 1 ? "With 1 opening left" : `With ${formatCount(n)} openings left`,
          head,
          rows: rankRows(groups),
          expanded,
          onExpand,
        })
      );
    }
  } else if (Array.isArray(p.groups) && p.groups.length) {
    out.push(
      cappedTable({
        key: "groups",
        caption: "Relative rank needed at each stage (1 = best so far)",
        head,
        rows: rankRows(p.groups),
        expanded,
        onExpand,
      })
    );
  }

  const times = p.time_thresholds;
  if (times && typeof times === "object" && Object.keys(times).length) {
    out.push(
      cappedTable({
        key: "times",
        caption: "Earliest time each arrival can get an offer (if better than everyone before)",
        head: ["Arrival", "Offer possible"],
        rows: timeRows(times, result.scenario?.pool ?? {}),
        expanded,
        onExpand,
      })
    );
  }

  if (Array.isArray(p.score_thresholds) && p.score_thresholds.length) {
    const runs = groupRuns(p.score_thresholds);
    out.push(
      cappedTable({
        key: "scores",
        caption: "Score needed at each stage",
        head: ["Stages", "Offer if the score is at least"],
        rows: runs.map((r) => [
          stagesWords(r.first, r.last),
          isNum(r.value) ? formatNumber(r.value, 2) : "No score bar at this stage",
        ]),
        expanded,
        onExpand,
      })
    );
  }
  if (p.interval === false) {
    out.push(
      el("p", {
        class: "note",
        text: "This rule does not make one clean switch from passing to offering: it offers at some early stages, passes again for a while, then offers again (see the table).",
      })
    );
  }
  if (!out.length) out.push(el("p", { text: "The engine gave no stage-by-stage table for this plan." }));
  return out;
}
