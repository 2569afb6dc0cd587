// Shared plumbing for the plan's charts (curve.js, rankchart.js), drawn with
// uPlot (canvas; vendored from the npm registry by the build into vendor/uplot/,
// with its stylesheet linked by index.html).
//
//   mountChart(box, spec)  draws a chart into `box` (an empty element) as soon
//                          as it is laid out, and keeps it right: redrawn at the
//                          new width when the box is resized, rebuilt with the
//                          page's colours when the colour scheme changes,
//                          destroyed once the box has left the document.
//   spec = {
//     label: "text for screen readers",      // aria-label of the canvas (role="img")
//     build(theme, width, uPlot) -> {opts, data},  // uPlot options (without width) and data;
//                                            // opts.readoutText(i, u) words the hovered point
//     readout?: element                      // gets those words
//   }
//   chartFigure(spec, caption, tableSummary, table)  the <figure> around it: box,
//                          readout, caption, and the table in a <details>
//   chartTheme(), axisStyle(), percentAxis(), baseOptions(), chartKey(): the shared look.
//
// Colours are never written into the code: chartTheme() reads the CSS custom
// properties of the page (base.css defines them for light and dark) at draw
// time. uPlot styles its own elements through CSSOM (element.style), which
// the page's Content-Security-Policy allows; it never adds <style> or style="".

import { el } from "./dom.js";

const LIB_URL = new URL("../../vendor/uplot/dist/uPlot.esm.js", import.meta.url).href;
const DARK = globalThis.matchMedia?.("(prefers-color-scheme: dark)");

let libPromise = null;

/** uPlot's constructor (loaded once, on first use). */
export function loadChartLibrary() {
  libPromise ??= import(LIB_URL).then((m) => m.default);
  return libPromise;
}

/** The page's colours and font, read from its CSS custom properties now. */
export function chartTheme(root = document.documentElement) {
  const css = getComputedStyle(root);
  const v = (name, fallback) => css.getPropertyValue(name).trim() || fallback;
  const font = v("--font", "system-ui, sans-serif");
  return {
    ink: v("--ink", "#1d2226"),
    muted: v("--muted", "#535d66"),
    line: v("--line", "#d6d0c3"),
    lineStrong: v("--line-strong", "#a69f90"),
    surface: v("--surface", "#ffffff"),
    accent: v("--accent", "#0b675f"),
    other: v("--seg-other", "#6a7da3"),
    none: v("--seg-none", "#bdb6a6"),
    warm: v("--seg-forced_last", "#c17a1c"),
    font,
    /** A canvas font string; size in CSS pixels. */
    fontAt: (px, weight = "") => `${weight ? `${weight} ` : ""}${px}px ${font}`,
    dark: Boolean(DARK?.matches),
  };
}

/** Axis settings in the page's colours (uPlot axis options). */
export function axisStyle(theme, extra = {}) {
  return {
    stroke: theme.muted,
    font: theme.fontAt(13),
    labelFont: theme.fontAt(14),
    grid: { stroke: theme.line, width: 1 },
    ticks: { stroke: theme.lineStrong, width: 1, size: 5 },
    ...extra,
  };
}

/** The y axis of chances: the given ticks, as percentages. */
export function percentAxis(theme, label, ticks) {
  return axisStyle(theme, { label, splits: () => ticks, values: (u, splits) => splits.map(tickPercent), size: 56 });
}

/** Options every chart shares: no uPlot legend (the caption is the key), no drag to zoom. */
export function baseOptions({ points = true } = {}) {
  return {
    legend: { show: false },
    cursor: { drag: { x: false, y: false, setScale: false }, points: points ? { size: 8 } : { show: false }, y: false },
  };
}

/** One entry of a caption's key: a sample element, then its words. */
export function chartKey(sampleClass, words) {
  return el("span", { class: "chart-key" }, el("span", { class: sampleClass }), ` ${words}`);
}

/**
 * The <figure> of a chart: its box (drawn by mountChart(box, spec)), the
 * hover readout, the caption, and the chart's figures as a table in a <details>.
 */
export function chartFigure(spec, caption, tableSummary, table) {
  const box = el("div", { class: "chart-box" });
  const readout = el("p", { class: "chart-readout", "aria-hidden": "true" });
  mountChart(box, { ...spec, readout });
  return el(
    "figure",
    { class: "chart-figure" },
    box,
    readout,
    caption,
    el("details", { class: "chart-data" }, el("summary", { text: tableSummary }), el("div", { class: "table-wrap" }, table))
  );
}

/** "40%", "2.5%": axis ticks without needless decimals. */
export function tickPercent(v) {
  return `${Number((v * 100).toFixed(1))}%`;
}

/** Round tick values from 0 up to (cover: at or above) max. */
export function niceTicks(max, count = 5, cover = false) {
  if (!(max > 0)) return [0];
  const raw = max / count;
  const mag = 10 ** Math.floor(Math.log10(raw));
  const step = [1, 2, 2.5, 5, 10].map((m) => m * mag).find((s) => s >= raw) ?? raw;
  const top = cover ? Math.ceil(max / step - 1e-9) : Math.floor(max / step + 1e-9);
  const ticks = [];
  for (let i = 0; i <= top; i++) ticks.push(Number((i * step).toPrecision(12)));
  return ticks;
}

// --- the life of a chart ------------------------------------------------------------------

const live = new Set(); // {box, spec, chart, width}

function dispose(entry) {
  entry.observer?.disconnect();
  entry.chart?.destroy();
  entry.chart = null;
  live.delete(entry);
}

/** Forget the charts whose box has left the document. */
function prune() {
  for (const entry of live) if (!entry.box.isConnected) dispose(entry);
}

function label(entry) {
  for (const canvas of entry.box.querySelectorAll("canvas")) {
    canvas.setAttribute("role", "img");
    canvas.setAttribute("aria-label", entry.spec.label);
  }
}

function draw(entry, uPlot, rebuild = false) {
  if (!entry.box.isConnected) {
    dispose(entry);
    return;
  }
  const width = Math.floor(entry.box.clientWidth);
  if (width <= 0) return; // hidden (another view, a closed section): drawn when shown
  if (entry.chart && !rebuild) {
    if (width !== entry.width) {
      const { opts } = entry.spec.build(chartTheme(), width, uPlot);
      entry.chart.setSize({ width, height: opts.height });
      entry.width = width;
    }
    return;
  }
  entry.chart?.destroy();
  const { opts, data } = entry.spec.build(chartTheme(), width, uPlot);
  const readout = entry.spec.readout;
  const hooks = { ...(opts.hooks ?? {}) };
  if (readout && opts.readoutText) {
    hooks.setCursor = [
      ...(hooks.setCursor ?? []),
      (u) => {
        const i = u.cursor.idx;
        const text = i == null ? "" : opts.readoutText(i, u);
        if (readout.textContent !== text) readout.textContent = text;
      },
    ];
  }
  entry.chart = new uPlot({ ...opts, width, hooks }, data, entry.box);
  entry.width = width;
  label(entry);
}

function failed(entry, err) {
  console.warn(`Chart not drawn: ${err.message}`);
  entry.box.classList.add("chart-failed");
  entry.box.textContent = "The chart could not be drawn here; its figures are in the table below.";
  entry.box.closest("figure")?.querySelector("details")?.setAttribute("open", "");
  dispose(entry);
}

/** Draw `spec` into `box` once it is in the document and laid out (see the top). */
export function mountChart(box, spec) {
  // After the caller has put the new figures in the page (it does so in the
  // same task), charts whose box was replaced are let go.
  queueMicrotask(prune);
  const entry = { box, spec, chart: null, width: 0, observer: null };
  live.add(entry);
  loadChartLibrary().then(
    (uPlot) => {
      if (!live.has(entry)) return;
      entry.uPlot = uPlot;
      entry.observer = new ResizeObserver(() => {
        try {
          draw(entry, uPlot);
        } catch (err) {
          failed(entry, err);
        }
      });
      entry.observer.observe(box);
    },
    (err) => failed(entry, err)
  );
}

/** Redraw every chart in the page's colours (the scheme changed). */
function redrawAll() {
  prune();
  for (const entry of live) {
    if (!entry.uPlot) continue;
    try {
      draw(entry, entry.uPlot, true);
    } catch (err) {
      failed(entry, err);
    }
  }
}

DARK?.addEventListener("change", redrawAll);
