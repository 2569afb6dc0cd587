// Chart of the exact success chance of "pass on r, then take the first
// best-so-far" against r (result.curve), with the large-pool limit dashed.
// Plain SVG with geometry attributes and classes only (no style attributes).

import { el, svg } from "./dom.js";
import { formatCount, formatPercent, isNum } from "../format.js";

const W = 480;
const H = 260;
const M = { left: 68, right: 18, top: 18, bottom: 58 };

/** Axis labels: "40%", "2.5%" (no needless decimals). */
const tickPercent = (v) => `${Number((v * 100).toFixed(1))}%`;

function path(xs, ys, x, y) {
  const pts = [];
  for (let i = 0; i < xs.length; i++) {
    if (isNum(xs[i]) && isNum(ys[i])) pts.push(`${x(xs[i]).toFixed(1)},${y(ys[i]).toFixed(1)}`);
  }
  return pts.join(" ");
}

/** Round tick values from 0; with cover, the last tick is at or above max. */
function niceTicks(max, count = 5, cover = false) {
  if (max <= 0) return [0];
  const raw = max / count;
  const mag = 10 ** Math.floor(Math.log10(raw));
  const step = [1, 2, 2.5, 5, 10].map((m) => m * mag).find((s) => s >= raw) ?? raw;
  const top = cover ? Math.ceil(max / step - 1e-9) : Math.floor(max / step + 1e-9);
  const ticks = [];
  for (let i = 0; i <= top; i++) ticks.push(i * step);
  return ticks;
}

/** A <figure> with the chart, or null when there is no curve. */
export function curveFigure(result) {
  const c = result.curve;
  if (!c || !Array.isArray(c.skips) || c.skips.length < 2) return null;
  // For time windows the engine's skips[i] = i stands for the share i/1000 of
  // the window (see its notes), not a number of candidates.
  const byTime = isNum(result.scenario?.pool?.window);
  const xs = byTime ? c.skips.map((v) => v / 1000) : c.skips;
  const xText = byTime ? tickPercent : (v) => formatCount(v);
  const xMax = Math.max(...xs, 1);
  const yTop = Math.max(...c.success.filter(isNum), ...(c.limit || []).filter(isNum), 0.01);
  const yTicks = niceTicks(yTop, 4, true);
  const yMax = Math.max(yTicks[yTicks.length - 1], yTop);
  const x = (v) => M.left + (v / xMax) * (W - M.left - M.right);
  const y = (v) => H - M.bottom - (v / yMax) * (H - M.top - M.bottom);

  // Best point on the curve.
  let best = 0;
  c.success.forEach((s, i) => {
    if (isNum(s) && s > c.success[best]) best = i;
  });

  const grid = yTicks.map((t) =>
    svg(
      "g",
      {},
      svg("line", { class: "chart-grid", x1: M.left, x2: W - M.right, y1: y(t), y2: y(t) }),
      svg("text", { class: "chart-tick", x: M.left - 8, y: y(t) + 4, "text-anchor": "end", text: tickPercent(t) })
    )
  );
  const xTicks = niceTicks(xMax, 5).filter((t) => t <= xMax * (1 + 1e-9));
  const xAxis = xTicks.map((t) =>
    svg("text", { class: "chart-tick", x: x(t), y: H - M.bottom + 24, "text-anchor": "middle", text: xText(t) })
  );

  const children = [
    ...grid,
    svg("line", { class: "chart-axis", x1: M.left, x2: W - M.right, y1: y(0), y2: y(0) }),
    ...xAxis,
    svg("text", {
      class: "chart-label",
      x: (M.left + W - M.right) / 2,
      y: H - 10,
      "text-anchor": "middle",
      text: byTime ? "Share of the window waited" : "Candidates passed over first",
    }),
  ];
  const hasLimit = Array.isArray(c.limit) && c.limit.some(isNum);
  if (hasLimit) {
    children.push(svg("polyline", { class: "chart-limit", points: path(xs, c.limit, x, y) }));
  }
  children.push(svg("polyline", { class: "chart-line", points: path(xs, c.success, x, y) }));
  children.push(svg("circle", { class: "chart-dot", cx: x(xs[best]), cy: y(c.success[best]), r: 5 }));

  const rule = byTime
    ? "wait a share of the window, then offer to the first candidate better than everyone before"
    : "pass on a set number, then offer to the first candidate better than everyone before";
  const peak = byTime
    ? `Highest: ${formatPercent(c.success[best])} when waiting ${formatPercent(xs[best])} of the window.`
    : `Highest: ${formatPercent(c.success[best])} when passing on ${formatCount(xs[best])}.`;
  const label = `Chance of success of the simple rule “${rule}”, for each cutoff. ${peak}`;
  const chart = svg(
    "svg",
    { class: "chart", viewBox: `0 0 ${W} ${H}`, role: "img", "aria-label": label, focusable: "false" },
    children
  );
  const caption = el(
    "figcaption",
    {},
    `The simple rule “${rule}”: `,
    el("span", { class: "key key-line" }),
    " exact chance for each cutoff",
    hasLimit ? [", ", el("span", { class: "key key-limit" }), " large-pool limit"] : null,
    ". ",
    peak,
    c.complete ? "" : " (Drawn through a sample of cutoffs.)"
  );
  return el("figure", { class: "chart-figure" }, chart, caption);
}
