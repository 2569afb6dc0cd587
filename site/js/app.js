// Seqpick page entry point: one state object (state.js), one render path
// (render() below), the engine in a worker (engine.js).
//
// Flow: an input event changes `state` -> render() -> scheduleSolve(). A solve
// sends the scenario on channel "plan" with a sequence number; only the answer
// to the newest request is kept (older ones are ignored here, and the worker
// drops queued ones that a newer request replaced).
//
// ---------------------------------------------------------------------------
// HOOK for the live-search view (site/js/companion/) and the share-link feature
// ---------------------------------------------------------------------------
// 1. Context passed to a registered view (views.js registerView("live", ...)):
//      mount(section, ctx) / show(ctx) receive
//      ctx.engine            the page's engine; use your own channel ({channel: "live"})
//      ctx.getPlan()         -> {scenario, result, upToDate}: the scenario the form
//                               describes now (scenarioFromState), the last good
//                               SolveResult dict (or null), and whether that result
//                               answers exactly this scenario
//      ctx.onPlan(cb)        cb(plan) after every new good answer; returns unsubscribe
//      ctx.showView(name)    switch views ("plan" | "live")
//    The live view's module is imported below (import "./companion/live.js";
//    it calls registerView("live", {...})).
// 2. The same without views.js: `import { getPlan, onPlan, engine } from "./app.js"`
//    (lazily, inside functions, because app.js imports the view modules), or
//      document.addEventListener("seqpick:plan", (e) => e.detail /* = getPlan() */)
//    which fires after every new good answer.
// 3. loadScenario(scenario) replaces the form with a scenario (share links,
//    "start from this plan") and solves it.
// 4. Prerendered answer: if the page holds
//      <script type="application/json" id="prerendered-plan">
//        {"scenario": <scenario as the page sends it>, "result": <SolveResult.to_dict()>}
//      </script>
//    and its scenario is the one the form starts with, that answer is shown at
//    once, before the solver has booted (summary data-plan-source="prerendered"),
//    then solved once more in the background when the engine is ready
//    (data-plan-source="live"; a difference beyond 1e-12 replaces it, with a warning).
// 5. Share link (share.js): the scenario lives in the URL fragment; a page
//    opened with one decodes it with the engine before solving.
// 6. <html data-engine="loading|ready|failed" data-engine-ready-at="<ms>">.
// ---------------------------------------------------------------------------

import { engine } from "./engine-start.js";
import {
  DEMO_SCENARIO,
  buildRequest,
  controlForField,
  emptyRuleValues,
  parseNumberText,
  parseListText,
  scenarioFromState,
  scenarioKey,
  stateFromScenario,
} from "./state.js";
import { buildForm, focusAfterRemove, focusRule, renderForm } from "./plan/form.js";
import { renderResults, ruleNumbersText } from "./plan/results.js";
import { initViews, renderViews } from "./views.js";
import { setText } from "./plan/dom.js";
import { initShare, renderShare } from "./share.js";
import { readPrerendered, resultsAgree } from "./prerendered.js";
import "./offline.js";

const SOLVE_DELAY_MS = 200;

export { engine };
const state = stateFromScenario(DEMO_SCENARIO);
state.engine = { state: "loading", detail: "" };

const $ = (id) => document.getElementById(id);
const parts = {
  form: $("scenario-form"),
  status: $("engine-status"),
  summary: $("summary"),
  details: $("details"),
};

// --- solving ------------------------------------------------------------------------

let seq = 0; // number of the newest request
let inflightKey = null; // scenario key of the newest request on its way
let timer = null;

function scheduleSolve(delay = SOLVE_DELAY_MS) {
  clearTimeout(timer);
  timer = setTimeout(solveNow, delay);
}

function solveNow() {
  timer = null;
  // Solved when the engine is ready, and once a shared link has been read.
  if (state.engine.state !== "ready" || state.share.opening) return;
  const { scenario, compareIds } = buildRequest(state);
  const key = scenarioKey(scenario);

  if (state.result && state.result.key === key) {
    // Back to the inputs of the answer on screen: cancel whatever is on its way.
    seq++;
    inflightKey = null;
    state.pending = false;
    state.errors = {};
    state.generalError = null;
    if (String(state.result.compareIds) !== String(compareIds)) state.result = { ...state.result, compareIds };
    render();
    return;
  }
  if (key === inflightKey) return; // already asked
  const mine = ++seq;
  inflightKey = key;
  state.pending = true;
  render();
  engine.request("solve", scenario, { channel: "plan" }).then(
    (data) => {
      if (mine !== seq) return; // a newer request was sent: never show this one
      inflightKey = null;
      state.result = { data, key, compareIds, scenario, source: "live" };
      state.errors = {};
      state.generalError = null;
      state.pending = false;
      render();
      announcePlan();
    },
    (err) => {
      if (err.superseded || mine !== seq) return;
      inflightKey = null;
      state.pending = false;
      const control = controlForField(err.field, compareIds);
      state.errors = control ? { [control]: err.message } : {};
      state.generalError = control ? null : err.message;
      render();
    }
  );
}

// --- state changes --------------------------------------------------------------------

function update(mutate, { solve = true } = {}) {
  mutate(state);
  if (solve && state.engine.state === "ready") {
    // Mark the answer on screen as out of date at once, not only when the
    // (debounced) request leaves.
    const key = scenarioKey(buildRequest(state).scenario);
    state.pending = !state.result || state.result.key !== key;
  }
  render();
  if (solve) scheduleSolve();
}

function defaultRuleValue(kind, f) {
  if (kind === "skip") {
    const n = parseNumberText(f.size);
    return f.poolForm === "size" && typeof n === "number" && n >= 2 ? String(Math.floor(n / 4)) : "5";
  }
  if (kind === "skip_share" || kind === "start_share") return "25";
  if (kind === "score_at_least") {
    const lo = parseNumberText(f.low);
    const hi = parseNumberText(f.high);
    const mean = parseNumberText(f.mean);
    const sd = parseNumberText(f.sd);
    if (f.scoresForm === "uniform" && typeof lo === "number" && typeof hi === "number") return String(lo + 0.75 * (hi - lo));
    if (f.scoresForm === "normal" && typeof mean === "number" && typeof sd === "number") return String(mean + sd);
    if (f.scoresForm === "sample") {
      const v = parseListText(f.values).filter((x) => typeof x === "number").sort((a, b) => a - b);
      if (v.length) return String(v[Math.floor(0.75 * (v.length - 1))]);
    }
  }
  return "";
}

const formHandlers = {
  onField(key, value) {
    if (state.form[key] === value) return;
    update((s) => {
      const f = s.form;
      if (key === "mustHire") {
        f.mustHire = Boolean(value);
        f.mustHireSet = true;
      } else if (key === "goalType") {
        f.goalType = value;
        // As the engine does when must_hire is not given.
        if (!f.mustHireSet) f.mustHire = value === "rank" || value === "score";
      } else {
        f[key] = value;
      }
    });
  },
  onRuleKind(id, kind) {
    update((s) => {
      const row = s.form.compare.find((r) => r.id === id);
      if (!row) return;
      row.kind = kind;
      if (row.values[kind] === "") row.values[kind] = defaultRuleValue(kind, s.form);
    });
  },
  onRuleValue(id, text) {
    update((s) => {
      const row = s.form.compare.find((r) => r.id === id);
      if (row) row.values[row.kind] = text;
    });
  },
  onRuleAdd() {
    let id;
    update((s) => {
      const f = s.form;
      const kind = f.poolForm === "window" ? "start_share" : f.poolForm === "size" ? "skip" : "skip_share";
      id = `r${s.nextRowId++}`;
      const values = emptyRuleValues();
      values[kind] = defaultRuleValue(kind, f);
      f.compare.push({ id, kind, values });
    });
    focusRule(id);
  },
  onRuleRemove(id) {
    const list = state.form.compare;
    const i = list.findIndex((r) => r.id === id);
    if (i < 0) return;
    const next = list[i + 1]?.id ?? list[i - 1]?.id ?? null;
    update((s) => {
      s.form.compare.splice(i, 1);
      delete s.errors[`compare:${id}`];
    });
    focusAfterRemove(next);
  },
};

const resultHandlers = {
  onExpand(key) {
    update(
      (s) => {
        s.ui.expanded[key] = Infinity;
        s.ui.version = (s.ui.version ?? 0) + 1;
      },
      { solve: false }
    );
    parts.details.querySelector(`[data-table="${CSS.escape(key)}"]`)?.focus();
  },
};

// --- the one render path --------------------------------------------------------------

function statusText(s) {
  if (s.state === "failed") {
    return `The solver could not start${s.detail ? `: ${s.detail}` : ""}. You can keep editing; reload the page to try again.`;
  }
  if (s.state === "ready") return "Solver ready: the plan updates as you type.";
  return `Starting the solver…${s.detail ? ` (${s.detail})` : ""}`;
}

/** ruleNumbers(rowId) for the form, given the request the form makes now. */
function ruleNumbersFor(request) {
  return (rowId) => {
    // Numbers only when the answer on screen was for this row's rule as it is now.
    const r = state.result;
    if (!r) return ruleNumbersText(state, rowId);
    const now = request.scenario.compare[request.compareIds.indexOf(rowId)];
    const then = r.scenario.compare[r.compareIds.indexOf(rowId)];
    if (!now || !then || JSON.stringify(now) !== JSON.stringify(then)) {
      return state.pending ? "Working out its numbers…" : "Its numbers appear once the plan is worked out.";
    }
    return ruleNumbersText(state, rowId);
  };
}

function render() {
  setText(parts.status, statusText(state.engine));
  parts.status.dataset.state = state.engine.state;
  renderForm(state, ruleNumbersFor(buildRequest(state)));
  renderResults(state, parts, resultHandlers);
  renderViews(state);
  renderShare(state);
  if (state.result) parts.summary.dataset.planSource = state.result.source;
  else delete parts.summary.dataset.planSource;
  const title = state.form.title.trim();
  document.title = title ? `${title} · Seqpick` : "Seqpick: plan a one-at-a-time search";
}

// --- hook for other views ----------------------------------------------------------------

const planListeners = new Set();

/** The plan as it stands: see the HOOK comment at the top. */
export function getPlan() {
  const scenario = scenarioFromState(state);
  const result = state.result ? state.result.data : null;
  return { scenario, result, upToDate: Boolean(state.result) && state.result.key === scenarioKey(scenario) };
}

/** Call cb(getPlan()) after every new good answer. Returns an unsubscribe function. */
export function onPlan(cb) {
  planListeners.add(cb);
  return () => planListeners.delete(cb);
}

function announcePlan() {
  const plan = getPlan();
  for (const cb of planListeners) {
    try {
      cb(plan);
    } catch (err) {
      console.error(err);
    }
  }
  document.dispatchEvent(new CustomEvent("seqpick:plan", { detail: plan }));
}

/** Replace the form with `scenario` (kept as typed where it is not valid) and solve it. */
export function loadScenario(scenario) {
  const fresh = stateFromScenario(scenario);
  update((s) => {
    s.form = fresh.form;
    s.nextRowId = fresh.nextRowId;
    s.errors = {};
    s.generalError = null;
  });
}

/** The last view chosen is remembered on this device (a reload reopens it). */
const VIEW_KEY = "seqpick.view.v1";
const VIEWS = new Set(["plan", "live"]);

function rememberedView() {
  try {
    const v = globalThis.localStorage?.getItem(VIEW_KEY);
    return VIEWS.has(v) ? v : "plan";
  } catch {
    return "plan"; // storage blocked: start on the plan
  }
}

function showView(name) {
  update((s) => {
    s.view = name;
  }, { solve: false });
  try {
    globalThis.localStorage?.setItem(VIEW_KEY, state.view);
  } catch {
    // storage full or blocked: the choice lasts until the page is left
  }
}

// --- start -----------------------------------------------------------------------------------

function usePrerendered() {
  const pre = readPrerendered(); // null when absent or broken: the solver answers soon anyway
  if (!pre || !pre.result || state.share.opening) return;
  const { scenario: now, compareIds } = buildRequest(state);
  const key = scenarioKey(now);
  if (scenarioKey(pre.scenario) === key) {
    state.result = { data: pre.result, key, compareIds, scenario: now, source: "prerendered" };
  }
}

/** Once the engine is ready, solve the prerendered scenario again in the
 *  background; if the answers differ beyond 1e-12, show the live one. */
function checkPrerendered() {
  const shown = state.result;
  if (!shown || shown.source !== "prerendered") return;
  engine.request("solve", shown.scenario, { channel: "prerender-check" }).then(
    (data) => {
      if (state.result !== shown) return; // the entries changed meanwhile: their own answer counts
      if (resultsAgree(shown.data, data, 1e-12)) {
        shown.source = "live"; // the same numbers: nothing to redraw
        render();
      } else {
        console.warn("Seqpick: the prerendered plan differs from the live engine's answer; showing the live one.");
        state.result = { ...shown, data, source: "live" };
        render();
        announcePlan();
      }
    },
    () => {} // a failed engine is reported by the status line
  );
}

/** Markers for tests and the benchmark: <html data-engine="loading|ready|failed"
 *  data-engine-ready-at="<performance.now() when it became ready>"
 *  data-engine-phases='{"python": ms, "solver": ms}' (from the worker's start)>. */
function markEngine(status) {
  const marks = document.documentElement.dataset;
  if (status.state === "ready" && marks.engine !== "ready") {
    marks.engineReadyAt = String(performance.now());
    if (status.phases) marks.enginePhases = JSON.stringify(status.phases);
  }
  marks.engine = status.state;
}

buildForm(parts.form, formHandlers);
initViews({
  nav: document.querySelector(".views-nav"),
  sectionsByName: { plan: $("view-plan"), live: $("view-live") },
  missingNote: $("view-missing"),
  ctx: { engine, getPlan, onPlan, showView },
  onChange: showView,
});
initShare({ state, engine, render, loadScenario, parts });
performance.mark("seqpick:modules-evaluated");
// A link someone opens shows its plan; a reload, or a visit without a link,
// reopens the view left last.
const reloaded = performance.getEntriesByType?.("navigation")[0]?.type === "reload";
if (reloaded || !state.share.opening) state.view = rememberedView();
usePrerendered();
render();
if (state.result) performance.mark("seqpick:first-answer");
// The live view loads after the first answer is on screen (it registers
// itself with views.js, which mounts it at once if it is the current view).
import("./companion/live.js").catch((err) => {
  console.error(err);
  setText($("view-missing"), "The live search could not be loaded. Reload the page to try again; your plan and saved searches are kept.");
});

engine.onStatus((status) => {
  state.engine = { state: status.state, detail: status.detail ?? "" };
  if (status.state === "failed") state.pending = false;
  markEngine(status);
  render();
  if (status.state === "ready") {
    solveNow();
    checkPrerendered();
  }
});
