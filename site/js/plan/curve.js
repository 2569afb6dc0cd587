// Chart of the exact chance of success of the simple rule "pass on r, then
// offer to the first best-so-far" against r (result.curve), with:
//   * the large-pool limit beside it (dashed; only where the engine gives one),
//   * the best cutoff of that rule marked (an open dot),
//   * every compared rule that has a place on this axis marked (filled dots,
//     at its own exact chance), and
//   * when the plan's best rule is not a simple cutoff (it beats every point
//     of the curve), its chance as a dotted level line.
// For a time window the engine's skips[i] = i stands for the share i/1000 of
// the window (its notes say so), not a number of candidates.
//
// curveFigure(result) -> <figure> (or null when there is no curve): the canvas
// (role="img" with a summary as its aria-label), a caption with the key, and
// the marked and sampled points as a table in a <details>.

import { el } from "./dom.js";
import { formatCount, formatPercent, isNum } from "../format.js";
import { axisStyle, baseOptions, chartFigure, chartKey, niceTicks, percentAxis, tickPercent } from "./chart-theme.js";

const SAMPLE_ROWS = 10; // evenly spaced curve points in the table, besides the marked ones
// Tick steps on the x axis: whole numbers of candidates; round shares of the window.
const COUNT_STEPS = [1, 2, 5].flatMap((m) => [1, 10, 100, 1e3, 1e4, 1e5, 1e6].map((p) => m * p)).sort((a, b) => a - b);
const SHARE_STEPS = [0.05, 0.1, 0.2, 0.25, 0.5];

/** Fixed pool size N when there is one (skip_share x means floor(x·N) there). */
function fixedSize(scenario) {
  const pool = scenario?.pool ?? {};
  if (isNum(pool.size)) return pool.size;
  if (Array.isArray(pool.chances)) return pool.chances.length;
  return null;
}

/** Expected pool size of an uncertain pool (skip_share x means floor(x·mean) there). */
function meanSize(scenario) {
  const pool = scenario?.pool ?? {};
  if (isNum(pool.size_min) && isNum(pool.size_max)) return (pool.size_min + pool.size_max) / 2;
  if (isNum(pool.size_mean)) return pool.size_mean;
  if (Array.isArray(pool.size_weights)) {
    let total = 0;
    let sum = 0;
    pool.size_weights.forEach((w, i) => {
      if (isNum(w)) {
        total += w;
        sum += w * (i + 1);
      }
    });
    return total > 0 ? sum / total : null;
  }
  return null;
}

/**
 * Where a compared rule sits on the chart's x axis, or null when it has no
 * place there (a score bar; a count of arrivals on a time axis; off the curve).
 */
export function ruleX(rule, result, byTime) {
  const scenario = result.scenario;
  if (byTime) return isNum(rule?.start_share) ? rule.start_share : null;
  if (isNum(rule?.skip)) return rule.skip;
  if (isNum(rule?.skip_share)) {
    const n = fixedSize(scenario);
    if (n != null) return Math.min(n - 1, Math.floor(rule.skip_share * n));
    const mean = meanSize(scenario);
    return mean != null ? Math.floor(rule.skip_share * mean) : null;
  }
  return null;
}

/**
 * The chart's series as plain arrays: {byTime, xs, success, limit, marks, best, plan}.
 * marks: [{name, x, y}] for compared rules; best: {x, y} on the curve;
 * plan: the plan's own chance when its best rule is not a cutoff, else null.
 */
export function curveModel(result) {
  const c = result.curve;
  if (!c || !Array.isArray(c.skips) || c.skips.length < 2) return null;
  const byTime = isNum(result.scenario?.pool?.window);
  const xs = byTime ? c.skips.map((v) => v / 1000) : c.skips.slice();
  const success = c.success.map((v) => (isNum(v) ? v : null));
  const limit = Array.isArray(c.limit) ? c.limit.map((v) => (isNum(v) ? v : null)) : xs.map(() => null);
  const at = new Map(xs.map((x, i) => [x, i]));

  let bi = -1;
  success.forEach((s, i) => {
    if (s != null && (bi < 0 || s > success[bi])) bi = i;
  });
  const best = bi >= 0 ? { x: xs[bi], y: success[bi] } : null;
  const xMax = xs[xs.length - 1];

  const marks = [];
  const unplaced = []; // compared rules with no place on this axis
  for (const rule of result.compare ?? []) {
    let x = ruleX(rule.rule, result, byTime);
    const y = rule.success_probability;
    if (!isNum(y)) continue;
    if (x == null || x < xs[0] || x > xMax) {
      unplaced.push(rule.name);
      continue;
    }
    // A share of an uncertain pool: the engine rounds x·mean down as we do, but
    // its mean is summed in another order; snap to the neighbour it agrees with.
    if (!byTime && !isNum(rule.rule?.skip) && fixedSize(result.scenario) == null && c.complete) {
      const near = [x, x - 1, x + 1].filter((k) => at.has(k));
      const fit = near.find((k) => Math.abs(success[at.get(k)] - y) < 1e-9);
      if (fit != null) x = fit;
    }
    marks.push({ name: rule.name, x, y });
  }

  const p = result.success_probability;
  const plan = isNum(p) && best && p > best.y + 1e-9 ? p : null;
  return { byTime, xs, success, limit, marks, unplaced, best, plan, complete: Boolean(c.complete) };
}

function xWords(m, x) {
  return m.byTime ? `waiting ${formatPercent(x)} of the window` : `passing on ${formatCount(x)}`;
}

function summaryText(m) {
  const bits = [];
  bits.push(
    m.byTime
      ? "Line chart: chance of success against the share of the window waited before the first offer"
      : `Line chart: chance of success against how many are passed over first, from ${formatCount(m.xs[0])} to ${formatCount(m.xs[m.xs.length - 1])}`
  );
  if (m.best) bits.push(`Highest: ${formatPercent(m.best.y)} when ${xWords(m, m.best.x)}`);
  if (m.plan != null) bits.push(`The best rule of this plan, which is not a simple cutoff: ${formatPercent(m.plan)}`);
  if (m.marks.length) bits.push(`Compared: ${m.marks.map((k) => `${k.name}, ${formatPercent(k.y)}`).join("; ")}`);
  if (m.limit.some((v) => v != null)) bits.push("A dashed line shows the large-pool limit");
  if (m.unplaced.length) bits.push(`Not on this axis: ${m.unplaced.join(", ")}`);
  return `${bits.join(". ")}.`;
}

/** The data of every series on one sorted x axis (marks may add x values). */
function seriesData(m) {
  const xsAll = [...new Set([...m.xs, ...m.marks.map((k) => k.x)])].sort((a, b) => a - b);
  const pos = new Map(m.xs.map((x, i) => [x, i]));
  const pick = (arr) => xsAll.map((x) => (pos.has(x) ? arr[pos.get(x)] : null));
  const data = [xsAll, pick(m.success), pick(m.limit)];
  data.push(xsAll.map((x) => (m.best && x === m.best.x ? m.best.y : null)));
  data.push(xsAll.map((x) => m.marks.find((k) => k.x === x)?.y ?? null));
  data.push(m.plan != null ? xsAll.map(() => m.plan) : xsAll.map(() => null));
  return data;
}

function chartSpec(m) {
  const data = seriesData(m);
  const hasLimit = m.limit.some((v) => v != null);
  const yTop = Math.max(...m.success.filter((v) => v != null), ...m.limit.filter((v) => v != null), m.plan ?? 0, 0.01);
  const yTicks = niceTicks(yTop, 4, true);
  const yMax = Math.max(yTicks[yTicks.length - 1], yTop);
  const xMax = m.byTime ? 1 : Math.max(m.xs[m.xs.length - 1], 1);
  const xText = m.byTime ? tickPercent : (v) => formatCount(v);
  const none = () => null;

  function labels(u, theme) {
    // Names beside the marked points, drawn on the canvas after the series.
    const ctx = u.ctx;
    const px = devicePixelRatio || 1;
    ctx.save();
    ctx.font = theme.fontAt(12 * px, "600");
    ctx.textBaseline = "bottom";
    ctx.textAlign = "left";
    const placed = [];
    const items = [];
    if (m.best) items.push({ x: m.best.x, y: m.best.y, text: `best cutoff: ${m.byTime ? formatPercent(m.best.x) : formatCount(m.best.x)}`, color: theme.accent });
    for (const k of m.marks) items.push({ x: k.x, y: k.y, text: k.name, color: theme.ink });
    for (const it of items) {
      const cx = u.valToPos(it.x, "x", true);
      const cy = u.valToPos(it.y, "y", true);
      const w = ctx.measureText(it.text).width;
      const h = 14 * px;
      let left = Math.min(Math.max(cx - w / 2, u.bbox.left), u.bbox.left + u.bbox.width - w);
      let bottom = cy - 9 * px;
      const clash = (l, b) => placed.some((r) => l < r.l + r.w + 4 * px && r.l < l + w + 4 * px && b > r.b - h && r.b > b - h);
      if (clash(left, bottom)) bottom = cy + 9 * px + h;
      if (clash(left, bottom)) bottom = cy - 9 * px - h;
      placed.push({ l: left, b: bottom, w });
      ctx.lineWidth = 3 * px;
      ctx.strokeStyle = theme.surface;
      ctx.strokeText(it.text, left, bottom);
      ctx.fillStyle = it.color;
      ctx.fillText(it.text, left, bottom);
    }
    ctx.restore();
  }

  return {
    label: summaryText(m),
    build(theme, width) {
      const narrow = width < 480;
      return {
        opts: {
          height: narrow ? 270 : 300,
          padding: [22, 24, 0, 0],
          ...baseOptions(),
          scales: {
            x: { time: false, range: () => [0, xMax] },
            y: { range: () => [0, yMax] },
          },
          axes: [
            axisStyle(theme, {
              label: m.byTime ? "Share of the window waited" : "Candidates passed over first",
              values: (u, splits) => splits.map(xText),
              incrs: m.byTime ? SHARE_STEPS : COUNT_STEPS,
              space: narrow ? 50 : 70,
              size: 30,
              labelSize: 24,
            }),
            percentAxis(theme, "Chance of success", yTicks),
          ],
          series: [
            {},
            { label: "Exact chance", stroke: theme.accent, width: 3, points: { show: false }, spanGaps: true },
            { label: "Large-pool limit", stroke: theme.other, width: 2, dash: [6, 5], points: { show: false }, spanGaps: true, show: hasLimit },
            { label: "Best cutoff", stroke: theme.accent, width: 0, paths: none, points: { show: true, size: 12, width: 3, stroke: theme.accent, fill: theme.surface } },
            { label: "Compared rules", stroke: theme.ink, width: 0, paths: none, points: { show: true, size: 12, width: 2, stroke: theme.surface, fill: theme.ink } },
            { label: "Best rule of this plan", stroke: theme.warm, width: 2, dash: [2, 4], points: { show: false }, show: m.plan != null },
          ],
          hooks: { draw: [(u) => labels(u, theme)] },
          readoutText(i, u) {
            const x = u.data[0][i];
            const s = u.data[1][i];
            const lim = u.data[2][i];
            if (s == null) return "";
            return `${m.byTime ? `Waiting ${formatPercent(x)} of the window` : `Passing on ${formatCount(x)}`}: ${formatPercent(s)}${lim != null && hasLimit ? ` (large-pool limit ${formatPercent(lim)})` : ""}`;
          },
        },
        data,
      };
    },
  };
}

function tableRows(m) {
  const rows = new Map(); // x -> {x, what[]}
  const add = (x, what) => {
    if (!rows.has(x)) rows.set(x, { x, what: [] });
    if (what) rows.get(x).what.push(what);
  };
  const n = m.xs.length;
  for (let k = 0; k <= SAMPLE_ROWS; k++) add(m.xs[Math.round((k * (n - 1)) / SAMPLE_ROWS)], null);
  if (m.best) add(m.best.x, "best cutoff");
  for (const k of m.marks) add(k.x, k.name);
  const pos = new Map(m.xs.map((x, i) => [x, i]));
  return [...rows.values()]
    .sort((a, b) => a.x - b.x)
    .map((r) => {
      const i = pos.get(r.x);
      const mark = m.marks.find((k) => k.x === r.x);
      const s = i != null && m.success[i] != null ? m.success[i] : mark?.y;
      return { ...r, success: s, limit: i != null ? m.limit[i] : null };
    });
}

function dataTable(m) {
  const hasLimit = m.limit.some((v) => v != null);
  return el(
    "table",
    { class: "data-table chart-table" },
    el("caption", { text: m.complete ? "Points of the curve, the marked ones among them" : "Points of the curve (drawn through a sample of cutoffs), the marked ones among them" }),
    el(
      "thead",
      {},
      el(
        "tr",
        {},
        el("th", { scope: "col", class: "num", text: m.byTime ? "Share of the window waited" : "Candidates passed over" }),
        el("th", { scope: "col", class: "num", text: "Chance of success" }),
        hasLimit ? el("th", { scope: "col", class: "num", text: "Large-pool limit" }) : null,
        el("th", { scope: "col", text: "Marked" })
      )
    ),
    el(
      "tbody",
      {},
      tableRows(m).map((r) =>
        el(
          "tr",
          {},
          el("th", { scope: "row", class: "num", text: m.byTime ? formatPercent(r.x) : formatCount(r.x) }),
          el("td", { class: "num", text: formatPercent(r.success) }),
          hasLimit ? el("td", { class: "num", text: formatPercent(r.limit) }) : null,
          el("td", { text: r.what.join(", ") })
        )
      )
    )
  );
}

/** A <figure> with the chart, or null when there is no curve. */
export function curveFigure(result) {
  const m = curveModel(result);
  if (!m) return null;
  const hasLimit = m.limit.some((v) => v != null);
  const rule = m.byTime
    ? "wait a share of the window, then offer to the first candidate better than everyone before"
    : Array.isArray(result.scenario?.pool?.chances)
      ? "pass on a set number of stages, then make an offer at the first event"
      : "pass on a set number, then offer to the first candidate better than everyone before";
  const peak = m.best ? `Highest: ${formatPercent(m.best.y)} when ${xWords(m, m.best.x)}.` : "";

  const caption = el(
    "figcaption",
    {},
    el("span", { class: "chart-rule", text: `The simple rule “${rule}”. ` }),
    el(
      "span",
      { class: "chart-keys" },
      chartKey("key key-line", "exact chance for each cutoff"),
      hasLimit ? chartKey("key key-limit", "large-pool limit") : null,
      m.best ? chartKey("key key-best", "best cutoff") : null,
      m.marks.length ? chartKey("key key-mark", "compared rules") : null,
      m.plan != null ? chartKey("key key-plan", `best rule of this plan (${formatPercent(m.plan)})`) : null
    ),
    " ",
    peak,
    m.complete ? "" : " (Drawn through a sample of cutoffs.)",
    m.unplaced.length ? ` Not on this axis: ${m.unplaced.join(", ")}.` : ""
  );
  return chartFigure(chartSpec(m), caption, "The curve's figures as a table", dataTable(m));
}
