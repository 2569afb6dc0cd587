// Unit tests of the charts' data preparation (site/js/plan/curve.js and
// rankchart.js): where compared rules sit on the curve's axis, the marks,
// and the rank bars. Pure functions; no DOM, no uPlot.
//   node --test tests/js/charts.test.mjs

import test from "node:test";
import assert from "node:assert/strict";

import { curveModel, ruleX } from "../../site/js/plan/curve.js";
import { ordinal, rankBars } from "../../site/js/plan/rankchart.js";

/** A result with a complete curve over 0..n-1 whose success at r is f(r). */
function fixedResult(n, f, compare = [], extra = {}) {
  const skips = Array.from({ length: n }, (_, r) => r);
  return {
    scenario: { pool: { size: n } },
    curve: { skips, success: skips.map(f), limit: skips.map(() => null), complete: true },
    compare,
    success_probability: Math.max(...skips.map(f)),
    ...extra,
  };
}

test("skip_share on a fixed pool is floor(x * N), at most N - 1", () => {
  const r = fixedResult(24, () => 0.1);
  assert.equal(ruleX({ skip_share: 0.5 }, r, false), 12);
  assert.equal(ruleX({ skip_share: 0.37 }, r, false), 8); // 8.88 -> 8
  assert.equal(ruleX({ skip_share: 1 }, r, false), 23);
  assert.equal(ruleX({ skip: 5 }, r, false), 5);
  assert.equal(ruleX({ score_at_least: 0.8 }, r, false), null);
});

test("chances pools count stages; uncertain pools use the expected size", () => {
  const odds = { scenario: { pool: { chances: [0.1, 0.2, 0.3, 0.5, 0.1] } } };
  assert.equal(ruleX({ skip_share: 0.5 }, odds, false), 2);
  const range = { scenario: { pool: { size_min: 10, size_max: 40 } } };
  assert.equal(ruleX({ skip_share: 0.3 }, range, false), 7); // floor(0.3 * 25)
  const weights = { scenario: { pool: { size_weights: [0, 0, 1, 1] } } }; // mean 3.5
  assert.equal(ruleX({ skip_share: 0.6 }, weights, false), 2);
  const poisson = { scenario: { pool: { size_mean: 25 } } };
  assert.equal(ruleX({ skip_share: 0.4 }, poisson, false), 10);
});

test("on a time axis only start_share has a place", () => {
  const win = { scenario: { pool: { window: 14, arrivals_per_unit: 2 } } };
  assert.equal(ruleX({ start_share: 0.25 }, win, true), 0.25);
  assert.equal(ruleX({ skip_share: 0.3 }, win, true), null);
  assert.equal(ruleX({ skip: 3 }, win, true), null);
});

test("marks: the best cutoff, each compared rule at its own chance, unplaced ones listed", () => {
  const f = (r) => (r === 9 ? 0.381 : 0.3 - Math.abs(r - 9) / 100);
  const r = fixedResult(24, f, [
    { name: "skip 5", rule: { skip: 5 }, success_probability: 0.344 },
    { name: "skip 50%", rule: { skip_share: 0.5 }, success_probability: 0.357 },
    { name: "score 0.8", rule: { score_at_least: 0.8 }, success_probability: 0.2 },
    { name: "no chance", rule: { skip: 3 }, success_probability: null },
  ]);
  const m = curveModel(r);
  assert.deepEqual(m.best, { x: 9, y: 0.381 });
  assert.deepEqual(m.marks, [
    { name: "skip 5", x: 5, y: 0.344 },
    { name: "skip 50%", x: 12, y: 0.357 },
  ]);
  assert.deepEqual(m.unplaced, ["score 0.8"]);
  assert.equal(m.plan, null); // the best rule is the best cutoff here
});

test("a plan better than every cutoff gets its level line", () => {
  const r = fixedResult(30, (k) => 0.6 - Math.abs(k - 7) / 100);
  r.success_probability = 0.735;
  assert.equal(curveModel(r).plan, 0.735);
});

test("a share of an uncertain pool snaps to the neighbour the engine's chance agrees with", () => {
  const f = (k) => 0.2 + k / 1000;
  const r = fixedResult(40, f, [{ name: "skip 30%", rule: { skip_share: 0.3 }, success_probability: f(8) }]);
  r.scenario = { pool: { size_min: 10, size_max: 40 } }; // floor(0.3 * 25) = 7 ...
  assert.deepEqual(curveModel(r).marks, [{ name: "skip 30%", x: 8, y: f(8) }]); // ... but the engine's is 8
});

test("time windows: x is the share i/1000", () => {
  const skips = Array.from({ length: 1000 }, (_, i) => i);
  const r = {
    scenario: { pool: { window: 14, arrivals_per_unit: 2 } },
    curve: { skips, success: skips.map((i) => (i === 368 ? 0.368 : 0.3)), limit: skips.map(() => 0.1), complete: false },
    compare: [{ name: "start at 0.25", rule: { start_share: 0.25 }, success_probability: 0.3466 }],
    success_probability: 0.3753,
  };
  const m = curveModel(r);
  assert.equal(m.byTime, true);
  assert.deepEqual(m.best, { x: 0.368, y: 0.368 });
  assert.deepEqual(m.marks, [{ name: "start at 0.25", x: 0.25, y: 0.3466 }]);
  assert.equal(m.plan, 0.3753);
});

test("no curve, no chart", () => {
  assert.equal(curveModel({ curve: null }), null);
  assert.equal(curveModel({ curve: { skips: [0], success: [1], limit: [null], complete: true } }), null);
});

test("rank bars: ranks, then lower and no hire, summing to 1", () => {
  const probabilities = [0.38, 0.14, 0.06, 0.03, 0.012, 0.006, 0.003, 0.002, 0.001, 0.001];
  const none = 1 - probabilities.reduce((a, b) => a + b, 0) - 0.005;
  const bars = rankBars({ rank_distribution: { probabilities, rest: 0.005, none } });
  assert.deepEqual(bars.map((b) => b.label), ["1", "2", "3", "4", "5", "6", "lower", "no\nhire"]);
  const lower = bars.find((b) => b.key === "lower");
  assert.ok(Math.abs(lower.p - (0.003 + 0.002 + 0.001 + 0.001 + 0.005)) < 1e-12);
  assert.equal(lower.long, "lower than 6th");
  assert.ok(Math.abs(bars.reduce((a, b) => a + b.p, 0) - 1) < 1e-12);
  // A gap before "lower" and before "no hire" on the x axis.
  assert.deepEqual(bars.map((b) => b.x), [0, 1, 2, 3, 4, 5, 6.5, 8]);
});

test("rank bars: a short pool shows every rank and no 'lower'", () => {
  const bars = rankBars({ rank_distribution: { probabilities: [0.5, 0.25, 0.25], rest: 0, none: 0 } });
  assert.deepEqual(bars.map((b) => b.key), ["best", "rank", "rank", "none"]);
  assert.equal(rankBars({ rank_distribution: null }), null);
});

test("at most 20 ranks one by one", () => {
  const probabilities = Array.from({ length: 30 }, () => 1 / 30);
  const bars = rankBars({ rank_distribution: { probabilities, rest: 0, none: 0 } });
  assert.equal(bars.filter((b) => b.key === "best" || b.key === "rank").length, 20);
  assert.ok(Math.abs(bars.find((b) => b.key === "lower").p - 10 / 30) < 1e-12);
});

test("ordinals", () => {
  assert.deepEqual([1, 2, 3, 4, 11, 12, 13, 21, 22, 101, 111].map(ordinal),
    ["1st", "2nd", "3rd", "4th", "11th", "12th", "13th", "21st", "22nd", "101st", "111th"]);
});
