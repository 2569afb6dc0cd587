// Unit tests of site/js/export.js (CSV per RFC 4180 with the OWASP formula
// guard, file names, the scenario in words). Run: node --test tests/js/
import test from "node:test";
import assert from "node:assert/strict";

import {
  CSV_EOL,
  comparisonCsv,
  comparisonRecords,
  csvField,
  csvFileName,
  cutoffCsv,
  cutoffRecords,
  scenarioFacts,
  toCsv,
} from "../../site/js/export.js";

test("numbers are written at full precision, with a dot and no grouping", () => {
  assert.equal(csvField(0.38116288808613646), "0.38116288808613646");
  assert.equal(csvField(0.1 + 0.2), "0.30000000000000004");
  assert.equal(csvField(1234567.5), "1234567.5");
  assert.equal(csvField(5.551115123125783e-17), "5.551115123125783e-17");
  assert.equal(csvField(24), "24");
  assert.equal(csvField(-0), "0");
  assert.equal(csvField(-1.5), "-1.5", "a negative number is a number, not a formula");
  assert.equal(Number(csvField(2 / 3)), 2 / 3);
});

test("missing values are empty fields", () => {
  for (const v of [null, undefined, NaN, Infinity, -Infinity]) assert.equal(csvField(v), "");
});

test("fields with a comma, quote, CR or LF are quoted, quotes doubled (RFC 4180)", () => {
  assert.equal(csvField("plain words"), "plain words");
  assert.equal(csvField("a, b"), '"a, b"');
  assert.equal(csvField('say "yes"'), '"say ""yes"""');
  assert.equal(csvField("two\nlines"), '"two\nlines"');
  assert.equal(csvField("cr\rhere"), '"cr\rhere"');
});

test("text that a spreadsheet would run as a formula gets a leading apostrophe (OWASP)", () => {
  assert.equal(csvField("=1+2"), "'=1+2");
  assert.equal(csvField("+44 20"), "'+44 20");
  assert.equal(csvField("-x"), "'-x");
  assert.equal(csvField("@SUM(A1)"), "'@SUM(A1)");
  assert.equal(csvField("\tlead"), "'\tlead");
  assert.equal(csvField("\rlead"), "\"'\rlead\"");
  assert.equal(csvField('=HYPERLINK("x")'), `"'=HYPERLINK(""x"")"`);
  assert.equal(csvField("a=b"), "a=b", "only the first character counts");
});

test("every record ends with CRLF, the header first", () => {
  const text = toCsv(["a", "b"], [[1, "x"], [null, "y,z"]]);
  assert.equal(text, 'a,b\r\n1,x\r\n,"y,z"\r\n');
  assert.equal(CSV_EOL, "\r\n");
});

const RESULT = {
  scenario: { version: 1, pool: { size: 24 }, openings: 1, title: "Ünïcode & co: night desk" },
  policy: {
    groups: [
      { first: 1, last: 9, threshold: 0 },
      { first: 10, last: 24, threshold: 1 },
    ],
    words: "Pass on the first 9, then make an offer to the first candidate better than everyone before.",
  },
  success_probability: 0.38116288808613646,
  expected_rank: 1.7,
  expected_score: null,
  expected_interviews: 18.147909314067277,
  p_no_hire: 0.375,
  outcome: { best: 0.38116288808613646, other: 0.2438371119138636, none: 0.375, forced_last: 0 },
  compare: [
    {
      name: "skip 5",
      description: "Skip the first 5, then take the first candidate better than everyone before.",
      success_probability: 0.34394962036531396,
      expected_rank: 2.5,
      expected_score: null,
      expected_interviews: 13.3,
      p_no_hire: 0.20833333333333334,
      outcome: { best: 0.34394962036531396, other: 0.4477170462680127, none: 0.20833333333333334, forced_last: 0 },
    },
  ],
};

test("the cutoff table keeps the engine's groups, with the action in words", () => {
  assert.deepEqual(cutoffRecords(RESULT), [
    ["relative rank", 1, 1, 9, 0, "Pass everyone"],
    ["relative rank", 1, 10, 24, 1, "Offer to a best-so-far"],
  ]);
  assert.ok(cutoffCsv(RESULT).startsWith("table,openings_left,first,last,threshold,action\r\n"));
});

test("per-openings and score-bar tables become their own blocks", () => {
  const r = {
    scenario: { openings: 2, pool: { size: 4 } },
    policy: {
      groups: [{ first: 1, last: 4, threshold: 4 }],
      thresholds_by_openings_left: { 1: [0, 1, 1, 4], 2: [1, 1, 2, 4] },
      score_thresholds_by_openings_left: { 1: [7.5, 7.5, 6, null], 2: [6, 5, 5, null] },
    },
  };
  const rows = cutoffRecords(r);
  assert.deepEqual(
    rows.filter((x) => x[0] === "relative rank").map((x) => x.slice(1, 5)),
    [
      [2, 1, 2, 1],
      [2, 3, 3, 2],
      [2, 4, 4, 4],
      [1, 1, 1, 0],
      [1, 2, 3, 1],
      [1, 4, 4, 4],
    ]
  );
  const bars = rows.filter((x) => x[0] === "score bar");
  assert.deepEqual(bars.map((x) => x.slice(1, 5)), [
    [2, 1, 1, 6],
    [2, 2, 3, 5],
    [2, 4, 4, null],
    [1, 1, 2, 7.5],
    [1, 3, 3, 6],
    [1, 4, 4, null],
  ]);
  assert.equal(bars[0][5], "Offer if the score is at least 6");
  assert.equal(bars[2][5], "No score bar at this stage");
});

test("the comparison has the best rule first and one row per compared rule", () => {
  const rows = comparisonRecords(RESULT);
  assert.equal(rows.length, 2);
  assert.deepEqual(rows[0], [
    "Best rule (this plan)",
    RESULT.policy.words,
    0.38116288808613646,
    0,
    0.2438371119138636,
    0.375,
    1.7,
    null,
    18.147909314067277,
    0.375,
  ]);
  const text = comparisonCsv(RESULT);
  const lines = text.split("\r\n");
  assert.equal(lines[0], "rule,description,success_probability,forced_last,other,none,expected_rank,expected_score,expected_interviews,p_no_hire");
  assert.equal(lines[1], `Best rule (this plan),"${RESULT.policy.words.replace(/"/g, '""')}",0.38116288808613646,0,0.2438371119138636,0.375,1.7,,18.147909314067277,0.375`);
  assert.equal(lines.at(-1), "");
});

test("file names are plain ASCII slugs of the title, else of the pool", () => {
  assert.equal(csvFileName("cutoffs", RESULT.scenario), "seqpick-cutoffs-unicode-co-night-desk.csv");
  assert.equal(csvFileName("comparison", { pool: { size: 100 } }), "seqpick-comparison-100-candidates.csv");
  assert.equal(csvFileName("comparison", { title: "   ", pool: { size_mean: 3 } }), "seqpick-comparison-plan.csv");
  assert.match(csvFileName("cutoffs", { title: "x".repeat(300) }), /^seqpick-cutoffs-x{48}\.csv$/);
});

test("the scenario in words for the printed plan", () => {
  const facts = Object.fromEntries(
    scenarioFacts({
      pool: { size: 24 },
      goal: { type: "top", k: 3 },
      scores: null,
      accept_probability: 0.8,
      openings: 1,
      cost_per_candidate: 0,
      must_hire: true,
      compare: [{ skip: 5 }, { skip_share: 0.5 }],
    })
  );
  assert.equal(facts.Candidates, "24, met one at a time in random order");
  assert.equal(facts.Goal, "hire one of the best 3");
  assert.equal(facts["Offers accepted"], "80.0%");
  assert.equal(facts["Cost per candidate"], "none");
  assert.match(facts["Must hire someone"], /^yes/);
  assert.equal(facts["Rules compared"], "pass on the first 5; pass on the first 50.0%");
});
