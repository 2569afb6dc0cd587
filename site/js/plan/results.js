// The plan's results: the summary region and the detail sections.
//
// renderResults(state, parts, handlers) is called on every render. The detail
// DOM is rebuilt only when the answer (or a table's "show all") changes; the
// flags for "updating" and "stale" are set every time.

import { el, replaceChildren, setAttr, setText, svg } from "./dom.js";
import { formatCount, formatNumber, formatPercent, isNum, plural } from "../format.js";
import { cutoffContent } from "./cutoffs.js";
import { curveFigure } from "./curve.js";
import { rankFigure } from "./rankchart.js";
import { LIMIT_PERCENT, TOP_ROWS, limitName, outcomeLabels, successPhrase } from "./words.js";

let built = { result: null, uiVersion: -1 };

// --- summary --------------------------------------------------------------------

function poolWords(scenario) {
  const pool = scenario?.pool ?? {};
  if (isNum(pool.size)) return `of ${plural(pool.size, "candidate", "candidates")}`;
  if (isNum(pool.size_min) && isNum(pool.size_max))
    return `with ${formatCount(pool.size_min)}–${formatCount(pool.size_max)} candidates`;
  if (isNum(pool.size_mean)) return `with about ${formatNumber(pool.size_mean, 1)} candidates on average`;
  if (isNum(pool.window) && isNum(pool.arrivals_per_unit))
    return `with about ${formatNumber(pool.window * pool.arrivals_per_unit, 1)} candidates expected`;
  return "";
}

/** "30,000 candidates", "10–40 candidates", "about 30 candidates expected" */
function poolShort(scenario) {
  return poolWords(scenario).replace(/^(of|with) /, "");
}

function headline(data) {
  const goal = data.scenario?.goal?.type ?? data.goal;
  const extra = [];
  let value;
  let label;
  if (goal === "rank") {
    value = formatNumber(data.expected_rank, 2);
    label = `average rank of the person hired (1 = best; ${poolShort(data.scenario)})`;
    if (isNum(data.success_probability)) extra.push(`Chance of hiring the best: ${formatPercent(data.success_probability)}`);
  } else if (goal === "score") {
    value = formatNumber(data.expected_score, 2);
    label = `average score of the person hired (${poolShort(data.scenario)})`;
    if (isNum(data.success_probability)) extra.push(`Chance of hiring the best: ${formatPercent(data.success_probability)}`);
  } else {
    value = formatPercent(data.success_probability);
    label = `chance of ${successPhrase(data)} ${poolWords(data.scenario)}`.trim();
  }
  return { value, label, extra };
}

function summaryFacts(data) {
  const facts = [];
  const p = data.policy;
  if (isNum(p.skip)) facts.push(["Cutoff", `pass on the first ${formatCount(p.skip)}`]);
  const { extra } = headline(data);
  for (const e of extra) {
    const [k, v] = e.split(": ");
    facts.push([k, v]);
  }
  facts.push(["Candidates met, on average", formatNumber(data.expected_interviews, 1)]);
  facts.push(["Chance of no hire", formatPercent(data.p_no_hire)]);
  const openings = data.scenario?.openings ?? 1;
  if (openings > 1 && isNum(data.expected_hires)) {
    facts.push(["People hired, on average", `${formatNumber(data.expected_hires, 2)} of ${formatCount(openings)}`]);
  }
  if ((data.scenario?.cost_per_candidate ?? 0) > 0 && isNum(data.expected_cost)) {
    facts.push(["Cost of meeting candidates, on average", formatNumber(data.expected_cost, 2)]);
  }
  return facts;
}

function buildSummary(summary, state) {
  const data = state.result?.data;
  const body = summary.querySelector(".summary-body");
  if (!data) {
    // Its text is set by renderResults (emptyText), which runs on every render.
    replaceChildren(body, el("p", { class: "summary-empty" }));
    return;
  }
  const { value, label } = headline(data);
  replaceChildren(
    body,
    // Its text follows the title box (renderResults): a title change needs no new solve.
    el("p", { class: "summary-title" }),
    el(
      "p",
      { class: "summary-figure" },
      el("span", { class: "figure-value", text: value }),
      " ",
      el("span", { class: "figure-label", text: label })
    ),
    el("p", { class: "summary-words", text: data.policy.words }),
    el(
      "dl",
      { class: "facts" },
      summaryFacts(data).map(([k, v]) => el("div", { class: "fact" }, el("dt", { text: k }), el("dd", { text: v })))
    ),
    data.warnings?.length
      ? el(
          "div",
          { class: "warnings" },
          el("p", { class: "warnings-title", text: data.warnings.length === 1 ? "Warning" : "Warnings" }),
          el("ul", {}, data.warnings.map((w) => el("li", { text: w })))
        )
      : null
  );
}

function emptyText(state) {
  if (state.engine.state === "failed") {
    return "The solver could not start, so there is no plan to show. Your entries are kept; reload the page to try again.";
  }
  if (state.share?.opening) return "Opening the shared plan…";
  if (state.engine.state !== "ready") return "The plan appears here as soon as the solver has started.";
  if (Object.keys(state.errors).length || state.generalError) return "Fix the marked entry to see the plan.";
  return "Working out the plan…";
}

// --- detail sections -------------------------------------------------------------

function section(id, title, ...content) {
  return el(
    "section",
    { class: "card", "aria-labelledby": `${id}-title`, id },
    el("h2", { class: "card-title", id: `${id}-title`, text: title }),
    content
  );
}

function outcomeSection(data) {
  const labels = outcomeLabels(data);
  const o = data.outcome;
  let x = 0;
  const rects = [];
  for (const [key] of labels) {
    const w = Math.max(0, (o[key] ?? 0) * 1000);
    if (w > 0) rects.push(svg("rect", { class: `seg seg-${key}`, x: x.toFixed(2), y: 0, width: w.toFixed(2), height: 24 }));
    x += w;
  }
  const bar = svg(
    "svg",
    { class: "outcome-bar", viewBox: "0 0 1000 24", preserveAspectRatio: "none", "aria-hidden": "true", focusable: "false" },
    rects
  );
  const legend = el(
    "ul",
    { class: "outcome-legend", "aria-label": "How the search ends" },
    labels.map(([key, text]) =>
      el(
        "li",
        {},
        el("span", { class: `swatch seg-${key}`, "aria-hidden": "true" }),
        el("span", { class: "legend-label", text: `${text}: ` }),
        el("strong", { text: formatPercent(o[key]) })
      )
    )
  );
  return section("sec-outcome", "How the search ends", bar, legend);
}

function topSection(data) {
  if (!data.top) return null;
  const rows = TOP_ROWS.filter(([k]) => isNum(data.top[k]));
  const table = el(
    "table",
    { class: "data-table top-table" },
    el("caption", { text: "Chance that the person hired is among…" }),
    el(
      "thead",
      {},
      el("tr", {}, el("th", { scope: "col", text: "Among" }), el("th", { scope: "col", class: "num", text: "Chance" }))
    ),
    el(
      "tbody",
      {},
      rows.map(([k, label]) =>
        el("tr", {}, el("th", { scope: "row", text: label }), el("td", { class: "num", text: formatPercent(data.top[k]) }))
      )
    )
  );
  const rank = isNum(data.expected_rank)
    ? el("p", {}, "Average rank of the person hired (1 = best): ", el("strong", { text: formatNumber(data.expected_rank, 2) }))
    : null;
  const score = isNum(data.expected_score)
    ? el("p", {}, "Average score of the person hired: ", el("strong", { text: formatNumber(data.expected_score, 2) }))
    : null;
  return section("sec-top", "How good the hire is", el("div", { class: "table-wrap" }, table), rank, score);
}

function compareSection(data) {
  if (!data.compare?.length) return null;
  const rows = [
    {
      name: "Best rule (this plan)",
      description: "The rule in the summary above.",
      r: data,
      optimal: true,
    },
    ...data.compare.map((c) => ({ name: c.name, description: c.description, r: c, optimal: false })),
  ];
  const anyScore = rows.some((x) => isNum(x.r.expected_score));
  const anyRank = rows.some((x) => isNum(x.r.expected_rank));
  const anySuccess = rows.some((x) => isNum(x.r.success_probability));
  const cols = [
    anySuccess && ["Success chance", (r) => formatPercent(r.success_probability)],
    anyScore && ["Average score", (r) => formatNumber(r.expected_score, 2)],
    ["Ended with the last candidate", (r) => formatPercent(r.outcome?.forced_last)],
    ["Someone else", (r) => formatPercent(r.outcome?.other)],
    anyRank && ["Average rank", (r) => formatNumber(r.expected_rank, 2)],
    ["Candidates met", (r) => formatNumber(r.expected_interviews, 1)],
    ["No hire", (r) => formatPercent(r.p_no_hire)],
  ].filter(Boolean);
  const table = el(
    "table",
    { class: "data-table compare-table" },
    el("caption", {
      text: anySuccess ? `Each rule on the same odds; success means ${successPhrase(data)}.` : "Each rule on the same odds.",
    }),
    el(
      "thead",
      {},
      el(
        "tr",
        {},
        el("th", { scope: "col", text: "Rule" }),
        cols.map(([h]) => el("th", { scope: "col", class: "num", text: h }))
      )
    ),
    el(
      "tbody",
      {},
      rows.map((row) =>
        el(
          "tr",
          { class: row.optimal ? "row-optimal" : null },
          el(
            "th",
            { scope: "row" },
            el("span", { class: "rule-title", text: row.name }),
            el("span", { class: "rule-desc", text: row.description })
          ),
          cols.map(([h, f]) => el("td", { class: "num", "data-label": h, text: f(row.r) }))
        )
      )
    )
  );
  return section(
    "sec-compare",
    "Compared with simple rules",
    el("div", { class: "table-wrap table-scroll", tabindex: "0", role: "region", "aria-label": "Rule comparison table" }, table)
  );
}

function limitsSection(data) {
  if (!data.limits?.length) return null;
  return section(
    "sec-limits",
    "For very large pools",
    el("p", { class: "note", text: "What the answer tends to as the pool grows without end, from the literature:" }),
    el(
      "ul",
      { class: "limits" },
      data.limits.map((l) =>
        el(
          "li",
          {},
          el("span", { text: `${limitName(l.quantity)}: ` }),
          el(
            "strong",
            {
              text: LIMIT_PERCENT.has(l.quantity) && isNum(l.value)
                ? `${formatPercent(l.value)} (${formatNumber(l.value, 4)})`
                : formatNumber(l.value, 4),
            }
          ),
          el("span", { class: "source", text: ` — ${l.source}` })
        )
      )
    )
  );
}

function notesSection(data) {
  const notes = data.notes ?? [];
  if (!notes.length && !data.method) return null;
  return section(
    "sec-notes",
    "Notes",
    notes.length ? el("ul", {}, notes.map((n) => el("li", { text: n }))) : null,
    data.method ? el("p", { class: "method" }, "Method: ", el("span", { text: data.method })) : null
  );
}

function buildDetails(details, state, handlers) {
  const data = state.result?.data;
  if (!data) {
    details.replaceChildren();
    return;
  }
  const curve = curveFigure(data);
  const ranks = rankFigure(data);
  replaceChildren(
    details,
    outcomeSection(data),
    topSection(data),
    ranks ? section("sec-ranks", "Rank of the person hired", ranks) : null,
    section(
      "sec-cutoffs",
      "The rule, stage by stage",
      cutoffContent(data, { expanded: state.ui.expanded, onExpand: handlers.onExpand })
    ),
    curve ? section("sec-curve", "Success by where you set the cutoff", curve) : null,
    compareSection(data),
    limitsSection(data),
    notesSection(data)
  );
}

// --- the render entry point ----------------------------------------------------------

/**
 * parts: {summary, status, details} elements; handlers: {onExpand(key)}.
 */
export function renderResults(state, parts, handlers) {
  const { summary, details } = parts;
  const uiVersion = state.ui.version ?? 0;
  if (built.result !== state.result || built.engine !== state.engine.state) {
    buildSummary(summary, state);
  }
  if (built.result !== state.result || built.uiVersion !== uiVersion) {
    buildDetails(details, state, handlers);
  }
  built = { result: state.result, uiVersion, engine: state.engine.state };

  const empty = summary.querySelector(".summary-empty");
  if (empty) setText(empty, emptyText(state));

  const titleNode = summary.querySelector(".summary-title");
  if (titleNode) {
    setText(titleNode, state.form.title.trim());
    titleNode.hidden = state.form.title.trim() === "";
  }

  const hasErrors = Object.keys(state.errors).length > 0 || Boolean(state.generalError);
  const stale = Boolean(state.result) && hasErrors;
  summary.classList.toggle("is-stale", stale);
  details.classList.toggle("is-stale", stale);
  summary.classList.toggle("is-pending", state.pending);
  setAttr(summary, "aria-busy", state.pending ? "true" : null);
  setAttr(details, "aria-busy", state.pending ? "true" : null);

  const flag = summary.querySelector(".summary-flag");
  let flagText = "";
  // A prerendered answer stays on screen when the solver fails to start: say so.
  const stranded = Boolean(state.result) && state.engine.state === "failed";
  if (stranded) {
    flagText = "The solver could not start, so these figures were worked out in advance and do not follow your changes. Reload the page to try again.";
  } else if (stale) flagText = "These figures are for the last entries that worked. Fix the marked entry to update them.";
  else if (state.pending && state.result) flagText = "Updating…";
  setText(flag, flagText);
  flag.hidden = flagText === "";
  flag.classList.toggle("flag-stale", stale || stranded);
}

/** Short numbers for a compare row in the form, from the last answer. */
export function ruleNumbersText(state, rowId) {
  const r = state.result;
  const i = r ? r.compareIds.indexOf(rowId) : -1;
  if (i < 0 || !r.data.compare?.[i]) return "Its numbers appear once the plan is worked out.";
  const c = r.data.compare[i];
  const bits = [];
  if (isNum(c.success_probability)) bits.push(`Success ${formatPercent(c.success_probability)}`);
  if (isNum(c.expected_score)) bits.push(`average score ${formatNumber(c.expected_score, 2)}`);
  if (isNum(c.expected_rank)) bits.push(`average rank ${formatNumber(c.expected_rank, 2)}`);
  bits.push(`meets ${formatNumber(c.expected_interviews, 1)} on average`);
  bits.push(`no hire ${formatPercent(c.p_no_hire)}`);
  return bits.join(" · ");
}
