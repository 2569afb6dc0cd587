// Bar chart of the rank of the person hired (result.rank_distribution): the
// chance that the hire is the best, the 2nd best, ... (probabilities), then
// "lower" (the engine's `rest`, plus the ranks past the ones drawn) and
// "no hire" (`none`). The bars sum to 1. With several openings the engine
// gives the rank of the best person hired.
//
// rankFigure(result) -> <figure> (or null when there is no distribution): the
// canvas (role="img" with a summary as its aria-label), a caption, and every
// bar as a row of a table in a <details>.

import { el } from "./dom.js";
import { formatPercent, isNum } from "../format.js";
import { axisStyle, baseOptions, chartFigure, chartKey, niceTicks, percentAxis } from "./chart-theme.js";

const MAX_BARS = 20; // at most this many ranks drawn one by one
const MIN_BARS = 5; // at least this many (when the pool has them)
const SMALL = 0.005; // past MIN_BARS, ranks less likely than this go into "lower"

/** "1st", "2nd", "3rd", "4th", "11th", "21st" */
export function ordinal(n) {
  const tens = n % 100;
  if (tens >= 11 && tens <= 13) return `${n}th`;
  return `${n}${{ 1: "st", 2: "nd", 3: "rd" }[n % 10] ?? "th"}`;
}

/** The bars: [{key, label, long, p}], ranks first, then "lower" and "no hire". */
export function rankBars(result) {
  const rd = result.rank_distribution;
  if (!rd || !Array.isArray(rd.probabilities) || rd.probabilities.length === 0) return null;
  const probs = rd.probabilities.map((p) => (isNum(p) ? Math.max(0, p) : 0));
  let k = Math.min(MIN_BARS, probs.length);
  probs.forEach((p, i) => {
    if (p >= SMALL) k = Math.max(k, i + 1);
  });
  k = Math.min(k, MAX_BARS);
  const shown = probs.slice(0, k);
  const folded = probs.slice(k).reduce((a, b) => a + b, 0);
  const bars = shown.map((p, i) => ({
    key: i === 0 ? "best" : "rank",
    label: String(i + 1),
    long: i === 0 ? "1st (the best)" : ordinal(i + 1),
    p,
  }));
  const lower = (isNum(rd.rest) ? Math.max(0, rd.rest) : 0) + folded;
  // "lower" only when something can be lower than the ranks listed.
  if (lower > 0 || probs.length > shown.length) {
    bars.push({ key: "lower", label: "lower", long: `lower than ${ordinal(shown.length)}`, p: lower });
  }
  bars.push({ key: "none", label: "no\nhire", long: "no hire", p: isNum(rd.none) ? Math.max(0, rd.none) : 0 });
  // Places on the x axis: the ranks side by side, then a gap before each of the others.
  let x = -1;
  for (const b of bars) {
    x += b.key === "lower" || b.key === "none" ? 1.5 : 1;
    b.x = x;
  }
  return bars;
}

function summaryText(bars, several) {
  const ranks = bars.filter((b) => b.key === "best" || b.key === "rank").slice(0, 3);
  const rest = bars.filter((b) => b.key === "lower" || b.key === "none");
  return (
    `Bar chart: chance that the ${several ? "best person hired" : "person hired"} has each rank (1 = the best of the pool). ` +
    [...ranks, ...rest].map((b) => `${b.long}: ${formatPercent(b.p)}`).join("; ") +
    "."
  );
}

function chartSpec(bars, several) {
  const xs = bars.map((b) => b.x);
  const series = (keys) => bars.map((b) => (keys.includes(b.key) ? b.p : null));
  const yTop = Math.max(...bars.map((b) => b.p), 0.01);
  const yTicks = niceTicks(yTop, 4, true);
  const yMax = Math.max(yTicks[yTicks.length - 1], yTop);

  return {
    label: summaryText(bars, several),
    build(theme, width, uPlot) {
      const barsPath = uPlot.paths.bars({ size: [0.7, 48], gap: 1 });
      const narrow = width < 480;
      const plotWidth = Math.max(120, width - 70);
      const perBar = plotWidth / (bars[bars.length - 1].x + 1.2);
      // Rank numbers every `step` bars when they would crowd; the two last always.
      const step = perBar >= 22 ? 1 : perBar >= 11 ? 2 : 5;
      const bar = (fill) => ({
        fill,
        stroke: fill,
        width: 0,
        points: { show: false },
        paths: barsPath,
      });
      return {
        opts: {
          height: narrow ? 230 : 260,
          padding: [14, 14, 0, 0],
          ...baseOptions({ points: false }),
          scales: {
            x: { time: false, range: () => [-0.6, bars[bars.length - 1].x + 0.6] },
            y: { range: () => [0, yMax] },
          },
          axes: [
            axisStyle(theme, {
              label: several ? "Rank of the best person hired (1 = best)" : "Rank of the person hired (1 = best)",
              splits: () => xs,
              values: (u, splits) =>
                splits.map((x) => {
                  const i = xs.indexOf(x);
                  const b = bars[i];
                  if (!b) return "";
                  if (b.key === "lower" || b.key === "none") return b.label;
                  return i % step === 0 ? b.label : "";
                }),
              grid: { show: false },
              ticks: { show: false },
              gap: 4,
              size: 40,
              labelSize: 24,
            }),
            percentAxis(theme, "Chance", yTicks),
          ],
          series: [
            {},
            { label: "The best", ...bar(theme.accent) },
            { label: "Other ranks", ...bar(theme.other) },
            { label: "Lower", ...bar(theme.other) },
            { label: "No hire", ...bar(theme.none) },
          ],
          readoutText(i) {
            const b = bars[i];
            return b ? `${b.long[0].toUpperCase()}${b.long.slice(1)}: ${formatPercent(b.p)}` : "";
          },
        },
        data: [xs, series(["best"]), series(["rank"]), series(["lower"]), series(["none"])],
      };
    },
  };
}

function dataTable(bars, several) {
  return el(
    "table",
    { class: "data-table chart-table" },
    el("caption", { text: several ? "Chance of each rank for the best person hired" : "Chance of each rank for the person hired" }),
    el(
      "thead",
      {},
      el("tr", {}, el("th", { scope: "col", text: "Rank" }), el("th", { scope: "col", class: "num", text: "Chance" }))
    ),
    el(
      "tbody",
      {},
      bars.map((b) => el("tr", {}, el("th", { scope: "row", text: b.long }), el("td", { class: "num", text: formatPercent(b.p) })))
    )
  );
}

/** A <figure> with the bar chart, or null when the result has no rank distribution. */
export function rankFigure(result) {
  const bars = rankBars(result);
  if (!bars) return null;
  const several = (result.scenario?.openings ?? 1) > 1;
  const lower = bars.find((b) => b.key === "lower");
  const caption = el(
    "figcaption",
    {},
    el(
      "span",
      { class: "chart-keys" },
      chartKey("swatch swatch-best", "the best of the pool"),
      chartKey("swatch swatch-rank", lower ? `other ranks (“lower”: ${lower.long})` : "other ranks"),
      chartKey("swatch swatch-none", "no hire")
    ),
    " ",
    several
      ? "With several openings, the rank is that of the best person hired."
      : "Rank 1 is the best of the whole pool, seen or not."
  );
  return chartFigure(chartSpec(bars, several), caption, "The bars' figures as a table", dataTable(bars, several));
}
