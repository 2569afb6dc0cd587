// The live view: accompanies the user through a search, candidate by
// candidate, with the engine's advice from the actual state.
//
//   import { mountCompanion } from "./companion/view.js";
//   mountCompanion(document.getElementById("view-live"), { engine, getScenario });
//
// One state object (below), one render path: every change goes through
// update(), which changes the state, saves what must be saved, re-renders
// from the state and asks the engine for advice when a candidate waits for
// it. Text the user typed (names, labels) only ever reaches the page as text.
//
// state = {
//   order: [id, ...], byId: {id: record},     // the searches (model.js records)
//   selectedId: id | null,
//   engine: {state, detail},                  // from engine.onStatus
//   advice: {key, status: "waiting" | "error" | "done", error} | null,
//                                             // the request for the selected search's
//                                             // waiting candidate; key = what was asked
//   ruleAsked: Set of ids whose rule in words was asked for this session,
//   saveProblem: text | null,                 // the last save failed (e.g. storage full)
//   notices: [{id, kind: "info" | "error", text, detail}],
//   ui: {
//     mode: null | "create" | "rename" | "erase",
//     nameDraft, formError, busy,             // the create / rename forms
//     draft: {rank, other, label, score, time},  // the next candidate, as typed
//     draftError: {field, message} | null,
//     note: text,                             // what the last action did (in the Advice region)
//     focus: focus key to move to after the next render, or null,
//   },
// }

import { h, fill } from "./dom.js";
import { buildRanker, rankChoices } from "./ranker.js";
import {
  DECISION_TEXT,
  OUTCOME_TEXT,
  betterSide,
  describeScenario,
  elapsedUnits,
  formatValue,
  numberText,
  valueCaptions,
} from "./describe.js";
import * as model from "./model.js";
import * as store from "./store.js";
import { formatCount } from "../format.js";

const CAUTION =
  "Decision support only. The advice rests on the plan's assumptions about the pool and the candidates. " +
  "Employment law, anti-discrimination rules and your own professional judgement come first.";

/** localStorage, or null when the browser refuses it (privacy modes, file://). */
function openStorage() {
  try {
    const s = globalThis.localStorage;
    const probe = "seqpick.probe";
    s.setItem(probe, "1");
    s.removeItem(probe);
    return s;
  } catch {
    return null;
  }
}

const NUM_RE = /^[+-]?(\d+\.?\d*|\.\d+)(e[+-]?\d+)?$/i;
function parseNum(text) {
  const t = String(text ?? "").trim().replace(/\u2212/g, "-");
  return NUM_RE.test(t) ? Number(t) : null;
}

function emptyDraft() {
  return { rank: null, other: "", label: "", score: "", time: null };
}

export function mountCompanion(root, { engine = null, getScenario = null, getSolved = null, storage, clock = () => new Date() } = {}) {
  const db = storage === undefined ? openStorage() : storage;
  const nowIso = () => clock().toISOString();
  let noticeId = 0;

  const state = {
    order: [],
    byId: {},
    selectedId: null,
    engine: { state: engine ? "loading" : "failed", detail: engine ? "" : "no engine" },
    advice: null,
    ruleAsked: new Set(),
    saveProblem: db ? null : "This browser does not let the page save: your entries last only while this tab is open. Export a search to keep it.",
    notices: [],
    ui: { mode: null, nameDraft: "", formError: null, busy: false, draft: emptyDraft(), draftError: null, note: "", focus: null },
  };

  // ---- loading ---------------------------------------------------------------

  function loadFromStorage() {
    if (!db) return;
    let loaded;
    try {
      loaded = store.loadAll(db);
    } catch (e) {
      state.saveProblem = `Saved searches could not be read (${e && e.name ? e.name : e}).`;
      return;
    }
    state.order = loaded.records.map((r) => r.id);
    state.byId = Object.fromEntries(loaded.records.map((r) => [r.id, r]));
    state.selectedId = loaded.selected;
    const aside = loaded.setAside;
    if (aside.length) {
      const n = aside.length;
      const text = n === 1
        ? "One saved search could not be read and was set aside; the others are unharmed."
        : `${n} saved searches could not be read and were set aside; the others are unharmed.`;
      const detail = aside.map((a) => `${a.key ? `Kept under “${a.key}”` : "Left where it was"}: ${a.reason}.`).join(" ");
      pushNotice("error", text, detail);
    }
  }

  function pushNotice(kind, text, detail = "") {
    state.notices.push({ id: ++noticeId, kind, text, detail });
    if (state.notices.length > 4) state.notices.shift();
  }

  // ---- saving ------------------------------------------------------------------

  function saved(result) {
    if (result.ok) {
      if (db) state.saveProblem = null;
      return true;
    }
    state.saveProblem = result.quota
      ? "Not saved: the browser's storage for this page is full. Your entries are still here in this tab, and what was saved before is kept. Export this search to keep it, or erase a search you no longer need."
      : `Not saved: ${result.message} Your entries are still here in this tab.`;
    return false;
  }

  function putRecord(record) {
    state.byId[record.id] = record;
    if (!state.order.includes(record.id)) state.order.push(record.id);
    if (db) saved(store.saveRecord(db, record)) && saved(store.saveIndex(db, state.order, state.selectedId));
  }

  function saveIndex() {
    if (db) saved(store.saveIndex(db, state.order, state.selectedId));
  }

  const current = () => (state.selectedId ? state.byId[state.selectedId] ?? null : null);

  // ---- the one way to change anything ------------------------------------------

  function update(change) {
    change();
    render();
    askAdvice();
    askRule();
  }

  // ---- actions -------------------------------------------------------------------

  function select(id) {
    update(() => {
      state.selectedId = id;
      state.ui = { ...state.ui, mode: null, formError: null, draft: emptyDraft(), draftError: null, note: "" };
      saveIndex();
    });
  }

  function uniqueName(name, exceptId = null) {
    const taken = new Set(state.order.filter((id) => id !== exceptId).map((id) => state.byId[id].name));
    if (!taken.has(name)) return name;
    for (let n = 2; ; n++) {
      const candidate = model.cleanText(`${name} (${n})`, model.MAX_NAME);
      if (!taken.has(candidate)) return candidate;
    }
  }

  function planScenario() {
    try {
      return typeof getScenario === "function" ? getScenario() : null;
    } catch {
      return null;
    }
  }

  function startCreate() {
    update(() => {
      const plan = planScenario();
      const title = plan && typeof plan.title === "string" ? plan.title : "";
      const base = model.cleanText(title, model.MAX_NAME) || `Search ${state.order.length + 1}`;
      state.ui.mode = "create";
      state.ui.nameDraft = uniqueName(base);
      state.ui.formError = null;
      state.ui.focus = "name";
    });
  }

  async function create() {
    const name = model.cleanText(state.ui.nameDraft, model.MAX_NAME);
    if (!name) {
      update(() => {
        state.ui.formError = "Give the search a name.";
        state.ui.focus = "name";
      });
      return;
    }
    const plan = planScenario();
    if (!plan) {
      update(() => (state.ui.formError = "There is no plan yet: set one up in the plan view first."));
      return;
    }
    update(() => {
      state.ui.busy = true;
      state.ui.formError = null;
    });
    // Solving checks that the plan can be solved (not only that each field is
    // well formed) and gives the canonical scenario and the rule in words.
    let scenario;
    let rule = null;
    try {
      // The plan view's answer, when it answers exactly this plan, saves a second solve.
      let solved = null;
      try {
        solved = typeof getSolved === "function" ? getSolved() : null;
      } catch {
        solved = null;
      }
      if (!solved || !solved.scenario) solved = await engine.request("solve", plan, { channel: "live-create" });
      scenario = { ...solved.scenario };
      // The plan view's answer ignores the title: take the plan's own.
      delete scenario.title;
      if (typeof plan.title === "string" && plan.title !== "") scenario = { version: scenario.version, title: plan.title, ...scenario };
      rule = solved.policy && typeof solved.policy.words === "string" ? solved.policy.words : null;
    } catch (e) {
      if (e && e.superseded) return;
      update(() => {
        state.ui.busy = false;
        state.ui.formError = `The current plan cannot be used${e && e.field ? ` (${e.field})` : ""}: ${e && e.message ? e.message : e}. Fix it in the plan view, then try again.`;
      });
      return;
    }
    update(() => {
      const record = model.createSearch({ id: model.newId(), name: uniqueName(name), scenario, rule, now: nowIso() });
      state.selectedId = record.id;
      putRecord(record);
      state.ui = { ...state.ui, mode: null, busy: false, formError: null, draft: emptyDraft(), draftError: null, note: "", focus: "entry-head" };
    });
  }

  function startRename() {
    const rec = current();
    if (!rec) return;
    update(() => {
      state.ui.mode = "rename";
      state.ui.nameDraft = rec.name;
      state.ui.formError = null;
      state.ui.focus = "name";
    });
  }

  function saveRename() {
    const rec = current();
    if (!rec) return;
    const out = model.rename(rec, uniqueName(model.cleanText(state.ui.nameDraft, model.MAX_NAME), rec.id), nowIso());
    update(() => {
      if (out.error) {
        state.ui.formError = out.error.message;
        state.ui.focus = "name";
        return;
      }
      putRecord(out.record);
      state.ui.mode = null;
      state.ui.focus = "rename";
    });
  }

  function cancelMode(focus) {
    update(() => {
      state.ui.mode = null;
      state.ui.formError = null;
      state.ui.busy = false;
      state.ui.focus = focus;
    });
  }

  function askErase() {
    update(() => {
      state.ui.mode = "erase";
      state.ui.focus = "erase-keep";
    });
  }

  function erase() {
    const rec = current();
    if (!rec) return;
    update(() => {
      const order = state.order.filter((id) => id !== rec.id);
      const next = order.length ? order[Math.max(0, state.order.indexOf(rec.id) - 1)] : null;
      // The record goes first, then the index (store.js explains why).
      if (db) saved(store.eraseRecord(db, rec.id, state.order, next));
      delete state.byId[rec.id];
      state.order = order;
      state.selectedId = next;
      state.advice = null;
      state.ui = { ...state.ui, mode: null, draft: emptyDraft(), draftError: null, note: "", focus: next ? "switch" : "new" };
      pushNotice("info", `Erased “${rec.name}” from this browser.`);
    });
  }

  function readDraft(rec) {
    const st = model.status(rec);
    const d = state.ui.draft;
    const input = { label: d.label };
    if (st.needs.hasScores) input.score = parseNum(d.score);
    else input.relative_rank = d.rank ?? (d.other.trim() !== "" ? parseNum(d.other) : st.nextStage === 1 ? 1 : null);
    if (st.needs.isWindow) input.time = d.time === null ? defaultTime(rec) : parseNum(d.time);
    return input;
  }

  function addCandidate() {
    const rec = current();
    if (!rec) return;
    const out = model.addCandidate(rec, readDraft(rec), nowIso());
    update(() => {
      if (out.error) {
        state.ui.draftError = out.error;
        state.ui.focus = { relative_rank: "rank-1", score: "score", time: "time" }[out.error.field] ?? "add";
        return;
      }
      putRecord(out.record);
      state.ui.draft = emptyDraft();
      state.ui.draftError = null;
      state.ui.note = "";
      state.ui.focus = "outcome-head";
    });
  }

  function recordOutcome(outcome) {
    const rec = current();
    if (!rec) return;
    const out = model.recordOutcome(rec, outcome, nowIso());
    if (out.error) return;
    const stage = rec.entries.length;
    update(() => {
      putRecord(out.record);
      const st = model.status(out.record);
      state.ui.note = `Candidate ${stage}: ${OUTCOME_TEXT[outcome].toLowerCase()}.` +
        (st.over ? " The search is over; the summary is below." : ` Add candidate ${stage + 1} when you have met them.`);
      state.ui.focus = st.over ? "summary-head" : "entry-head";
    });
  }

  function endSearch() {
    const rec = current();
    if (!rec) return;
    const out = model.endSearch(rec, nowIso());
    if (out.error) return;
    update(() => {
      putRecord(out.record);
      state.ui.note = "You ended the search. The summary is below.";
      state.ui.focus = "summary-head";
    });
  }

  function undoLast() {
    const rec = current();
    if (!rec) return;
    const { record, undone } = model.undo(rec, nowIso());
    if (!undone) return;
    const last = rec.entries[rec.entries.length - 1];
    update(() => {
      putRecord(record);
      state.ui.draftError = null;
      if (undone === "end") state.ui.note = "Undone: the search is open again.";
      else if (undone === "outcome") state.ui.note = `Undone: candidate ${rec.entries.length} waits for your decision again.`;
      else {
        state.ui.note = `Undone: candidate ${rec.entries.length} was removed; their details are back in the form.`;
        const shown = rankChoices(rec.entries.length).length;
        state.ui.draft = {
          rank: last.relative_rank != null && last.relative_rank <= shown ? last.relative_rank : null,
          other: last.relative_rank != null && last.relative_rank > shown ? String(last.relative_rank) : "",
          label: last.label ?? "",
          score: last.score != null ? String(last.score) : "",
          time: last.time != null ? String(last.time) : null,
        };
      }
      state.ui.focus = "undo";
    });
  }

  function exportCurrent() {
    const rec = current();
    if (!rec) return;
    const blob = new Blob([store.exportText(rec)], { type: "application/json" });
    const url = URL.createObjectURL(blob);
    const a = h("a", { href: url, download: store.exportFileName(rec.name), hidden: true });
    document.body.append(a);
    a.click();
    a.remove();
    setTimeout(() => URL.revokeObjectURL(url), 60_000);
    update(() => pushNotice("info", `Exported “${rec.name}” as ${store.exportFileName(rec.name)}.`));
  }

  async function importFile(file) {
    if (!file) return;
    let text;
    try {
      text = file.size > store.MAX_IMPORT ? null : await file.text();
    } catch {
      text = undefined;
    }
    const parsed = text === null
      ? { error: "This file cannot be imported: it is too large to be a Seqpick search." }
      : store.parseImport(text);
    if (parsed.error) {
      update(() => pushNotice("error", parsed.error, "Nothing was changed."));
      return;
    }
    const rec = parsed.record;
    // The engine checks the plan and the whole candidate list before anything is kept.
    let reply;
    try {
      reply = rec.entries.length
        ? await engine.request("advise", model.adviceRequest(rec), { channel: "live-import" })
        : await engine.request("validate", rec.scenario, { channel: "live-import" });
    } catch (e) {
      if (e && e.superseded) return;
      const where = e && e.field ? fieldWords(e.field) : "";
      update(() => pushNotice("error",
        `This file cannot be imported: ${where ? `${where}: ` : ""}${e && e.message ? e.message : e}.`, "Nothing was changed."));
      return;
    }
    update(() => {
      let record = { ...rec, id: model.newId(), name: uniqueName(rec.name), updated: nowIso() };
      if (rec.entries.length === 0) record.scenario = reply;
      const st = model.status(record);
      if (st.pending) record = model.setAdvice(record, st.pendingIndex, reply, nowIso());
      state.selectedId = record.id;
      putRecord(record);
      state.ui = { ...state.ui, mode: null, draft: emptyDraft(), draftError: null, note: "", focus: "switch" };
      pushNotice("info", `Imported “${record.name}” with ${formatCount(record.entries.length)} ${record.entries.length === 1 ? "candidate" : "candidates"}.`);
    });
  }

  function dismiss(id) {
    update(() => {
      state.notices = state.notices.filter((n) => n.id !== id);
      state.ui.focus = "switch";
    });
  }

  // ---- the engine ----------------------------------------------------------------------

  function adviceKey(rec) {
    return `${rec.id}|${JSON.stringify(model.adviceRequest(rec))}`;
  }

  /** Ask for advice when the selected search has a candidate waiting for it. */
  function askAdvice() {
    const rec = current();
    if (!rec || !engine) return;
    const st = model.status(rec);
    if (!st.pending || st.pending.advice) return;
    const key = adviceKey(rec);
    if (state.advice && state.advice.key === key) return; // asked already (or failed)
    state.advice = { key, status: "waiting", error: null };
    const id = rec.id;
    const index = st.pendingIndex;
    engine.request("advise", model.adviceRequest(rec), { channel: "live" }).then(
      (result) => {
        const now = state.byId[id];
        if (!now || adviceKey(now) !== key) return; // the search moved on meanwhile
        update(() => {
          putRecord(model.setAdvice(now, index, result, nowIso()));
          if (state.advice && state.advice.key === key) state.advice = { key, status: "done", error: null };
        });
      },
      (e) => {
        if (!state.advice || state.advice.key !== key) return;
        if (e && e.superseded) {
          state.advice = null;
          return;
        }
        update(() => {
          state.advice = { key, status: "error", error: { field: e && e.field, message: e && e.message ? e.message : String(e) } };
        });
      },
    );
  }

  /** Ask once per session for the plan's rule in words when a search lacks it. */
  function askRule() {
    const rec = current();
    if (!rec || !engine || rec.rule || state.ruleAsked.has(rec.id)) return;
    state.ruleAsked.add(rec.id);
    const id = rec.id;
    engine.request("solve", rec.scenario, { channel: "live-rule" }).then(
      (result) => {
        const words = result && result.policy && typeof result.policy.words === "string" ? result.policy.words : null;
        const now = state.byId[id];
        if (!words || !now) return;
        update(() => putRecord(model.setRule(now, words, now.updated)));
      },
      () => {},
    );
  }

  // ---- words ------------------------------------------------------------------------------

  function fieldWords(field) {
    const m = /^seen\.(\d+)\.?(.*)$/.exec(String(field));
    if (m) return `candidate ${Number(m[1]) + 1}${m[2] ? ` (${m[2].replace(/_/g, " ")})` : ""}`;
    if (String(field).startsWith("scenario")) return `the plan (${field.replace(/^scenario\.?/, "") || "scenario"})`;
    return String(field);
  }

  function defaultTime(rec) {
    const needs = model.scenarioNeeds(rec.scenario);
    const t = elapsedUnits(needs.start, needs.unit, clock().getTime());
    if (t === null) return null;
    const hi = needs.window ?? Infinity;
    if (t < 0 || t > hi) return null; // the window is not running now: the user types the time
    const st = model.status(rec);
    return Math.round(Math.max(st.lastTime, t) * 1000) / 1000;
  }

  // ---- the page's fixed frame (built once: the Advice region must stay the same node) ------

  root.classList.add("cmp");
  const frame = {
    head: h("header", { class: "cmp-head" },
      h("h2", { class: "cmp-title" }, "Live search"),
      h("p", { class: "cmp-caution" }, CAUTION)),
    notices: h("div", { class: "cmp-notices", "aria-live": "polite" }),
    bar: h("div", { class: "cmp-bar" }),
    panel: h("div", { class: "cmp-panel" }),
    plan: h("div", { class: "cmp-plan" }),
    entry: h("div", { class: "cmp-entry" }),
    advice: h("section", { class: "cmp-advice", role: "status", "aria-label": "Advice", "aria-live": "polite", "aria-atomic": "true" }),
    outcome: h("div", { class: "cmp-outcome" }),
    actions: h("div", { class: "cmp-actions" }),
    summary: h("div", { class: "cmp-summary-box" }),
    history: h("div", { class: "cmp-history" }),
  };
  const fileInput = h("input", {
    type: "file",
    accept: ".json,application/json",
    class: "cmp-file",
    hidden: true,
    "aria-label": "Import a search file",
    onchange: (e) => {
      const file = e.target.files && e.target.files[0];
      e.target.value = "";
      importFile(file);
    },
  });
  const work = h("div", { class: "cmp-work" }, frame.plan, frame.entry, frame.advice, frame.outcome, frame.actions, frame.summary);
  root.replaceChildren(frame.head, frame.notices, frame.bar, frame.panel, work, frame.history, fileInput);
  let adviceSig = null;

  // ---- rendering ----------------------------------------------------------------------------

  function render() {
    const active = document.activeElement;
    const activeKey = active && root.contains(active) ? active.dataset.focusKey : null;
    const selection = activeKey && typeof active.selectionStart === "number" ? [active.selectionStart, active.selectionEnd] : null;

    const rec = current();
    fill(frame.notices, renderNotices());
    fill(frame.bar, renderBar(rec));
    fill(frame.panel, renderPanel(rec));
    work.hidden = !rec;
    work.dataset.phase = rec ? (model.status(rec).over ? "over" : model.status(rec).pending ? "decide" : "enter") : "";
    frame.history.hidden = !rec;
    if (rec) {
      const st = model.status(rec);
      fill(frame.plan, renderPlan(rec, st));
      fill(frame.entry, st.pending || st.over ? null : renderEntry(rec, st));
      fill(frame.outcome, st.pending ? renderOutcome(rec, st) : null);
      fill(frame.actions, renderActions(rec, st));
      fill(frame.summary, st.over ? renderSummary(rec, st) : null);
      fill(frame.history, renderHistory(rec));
      renderAdvice(rec, st);
    } else {
      adviceSig = null;
      frame.advice.replaceChildren();
    }

    const want = state.ui.focus ?? activeKey;
    const moved = state.ui.focus != null;
    state.ui.focus = null;
    if (want) {
      const target = root.querySelector(`[data-focus-key="${CSS.escape(want)}"]`);
      if (target && target !== document.activeElement) {
        target.focus({ preventScroll: !moved });
        if (!moved && selection && typeof target.setSelectionRange === "function") {
          try {
            target.setSelectionRange(selection[0], selection[1]);
          } catch {
            /* not a text field */
          }
        }
      }
    }
  }

  function renderNotices() {
    const out = [];
    if (state.saveProblem) out.push(h("p", { class: "cmp-notice cmp-notice-error", role: "alert" }, state.saveProblem));
    for (const n of state.notices) {
      out.push(h("div", { class: `cmp-notice cmp-notice-${n.kind}` },
        h("p", {}, n.text, n.detail ? h("span", { class: "cmp-notice-detail" }, ` ${n.detail}`) : null),
        h("button", { type: "button", class: "cmp-link", onclick: () => dismiss(n.id), "aria-label": `Dismiss: ${n.text}` }, "Dismiss")));
    }
    return out;
  }

  function renderBar(rec) {
    const hasAny = state.order.length > 0;
    const picker = hasAny
      ? h("div", { class: "cmp-field cmp-switch" },
        h("label", { for: "cmp-switch" }, "Search"),
        h("select", {
          id: "cmp-switch",
          dataset: { focusKey: "switch" },
          onchange: (e) => select(e.target.value),
        }, state.order.map((id) => {
          const r = state.byId[id];
          const st = model.status(r);
          const text = `${r.name} — ${formatCount(st.seenCount)} seen${st.over ? ", over" : ""}`;
          return h("option", { value: id, selected: id === state.selectedId }, text);
        })))
      : null;
    const button = (text, key, onclick, extra = {}) => h("button", { type: "button", dataset: { focusKey: key }, onclick, ...extra }, text);
    return [
      picker,
      h("div", { class: "cmp-bar-buttons" },
        hasAny ? button("New search from the plan", "new", startCreate, { "aria-expanded": String(state.ui.mode === "create") }) : null,
        rec ? button("Rename", "rename", startRename) : null,
        rec ? button("Export", "export", exportCurrent) : null,
        button("Import…", "import", () => fileInput.click()),
        rec ? button("Erase this search", "erase", askErase, { class: "cmp-danger" }) : null),
    ];
  }

  function nameForm({ title, submitText, onSubmit, onCancel, intro }) {
    const errId = "cmp-name-error";
    return h("form", {
      class: "cmp-form",
      novalidate: true,
      onsubmit: (e) => {
        e.preventDefault();
        onSubmit();
      },
      onkeydown: (e) => {
        if (e.key === "Escape" && onCancel) {
          e.preventDefault();
          onCancel();
        }
      },
    },
    h("h3", {}, title),
    intro,
    h("div", { class: "cmp-field" },
      h("label", { for: "cmp-name" }, "Name of the search"),
      h("input", {
        id: "cmp-name",
        type: "text",
        maxlength: model.MAX_NAME,
        autocomplete: "off",
        value: state.ui.nameDraft,
        "aria-invalid": state.ui.formError ? "true" : null,
        "aria-describedby": state.ui.formError ? errId : null,
        dataset: { focusKey: "name" },
        oninput: (e) => (state.ui.nameDraft = e.target.value),
      })),
    state.ui.formError ? h("p", { id: errId, class: "cmp-error" }, state.ui.formError) : null,
    h("div", { class: "cmp-buttons" },
      h("button", { type: "submit", class: "cmp-primary", disabled: state.ui.busy, dataset: { focusKey: "name-submit" } },
        state.ui.busy ? (state.engine.state === "loading" ? "Starting the engine…" : "Checking the plan…") : submitText),
      onCancel ? h("button", { type: "button", onclick: onCancel }, "Cancel") : null));
  }

  function renderPanel(rec) {
    const mode = state.order.length === 0 && state.ui.mode !== "create" ? "empty" : state.ui.mode;
    if (mode === "empty") {
      return h("div", { class: "cmp-empty" },
        h("p", {}, "Keep the plan beside you during the search: enter each candidate as you meet them, get advice from the actual state of the search, record what you did, and see afterwards how the plan performed. Everything stays in this browser."),
        h("button", { type: "button", class: "cmp-primary", dataset: { focusKey: "new" }, onclick: startCreate }, "Start a search from the current plan"));
    }
    if (mode === "create") {
      const plan = planScenario();
      return nameForm({
        title: "New search from the current plan",
        submitText: "Start the search",
        onSubmit: create,
        onCancel: () => cancelMode("new"),
        intro: h("p", { class: "cmp-muted" }, "Plan: ", plan ? describeScenario(plan) : "none yet (set one up in the plan view)."),
      });
    }
    if (mode === "rename" && rec) {
      return nameForm({ title: "Rename this search", submitText: "Save name", onSubmit: saveRename, onCancel: () => cancelMode("rename") });
    }
    if (mode === "erase" && rec) {
      const n = rec.entries.length;
      return h("div", { class: "cmp-confirm", role: "group", "aria-labelledby": "cmp-erase-q" },
        h("p", { id: "cmp-erase-q" },
          "Erase “", h("strong", {}, rec.name), `” and its ${formatCount(n)} ${n === 1 ? "candidate" : "candidates"} from this browser? This cannot be undone; export it first if you may need it.`),
        h("div", { class: "cmp-buttons" },
          h("button", { type: "button", class: "cmp-danger", dataset: { focusKey: "erase-yes" }, onclick: erase }, "Yes, erase it"),
          h("button", { type: "button", dataset: { focusKey: "erase-keep" }, onclick: () => cancelMode("erase") }, "Keep it")));
    }
    return null;
  }

  function renderPlan(rec, st) {
    const where = st.over
      ? "The search is over."
      : st.pending
        ? `Candidate ${formatCount(st.seenCount)}${st.maxCandidates ? ` of ${formatCount(st.maxCandidates)}` : ""} is waiting for your decision.`
        : st.seenCount === 0
          ? `No candidate seen yet${st.maxCandidates ? `; ${formatCount(st.maxCandidates)} in the pool` : ""}.`
          : `${formatCount(st.seenCount)}${st.maxCandidates ? ` of ${formatCount(st.maxCandidates)}` : ""} seen so far.`;
    const open = st.openings > 1 ? ` ${formatCount(st.openingsLeft)} of ${formatCount(st.openings)} openings left.` : "";
    return [
      h("h3", { class: "cmp-search-name" }, rec.name),
      h("p", { class: "cmp-plan-line" }, h("span", { class: "cmp-k" }, "Plan: "), describeScenario(rec.scenario)),
      h("p", { class: "cmp-plan-line" }, h("span", { class: "cmp-k" }, "Rule: "), rec.rule ?? "(being worked out…)"),
      h("p", { class: "cmp-progress" }, where, open),
    ];
  }

  function renderEntry(rec, st) {
    const d = state.ui.draft;
    const errId = "cmp-draft-error";
    const error = state.ui.draftError;
    const errFor = (field) => (error && error.field === field ? errId : null);
    const fields = [];
    if (st.needs.hasScores) {
      fields.push(h("div", { class: "cmp-field" },
        h("label", { for: "cmp-score" }, "Score"),
        h("input", {
          id: "cmp-score", type: "text", inputmode: "decimal", autocomplete: "off", value: d.score,
          "aria-invalid": errFor("score") ? "true" : null, "aria-describedby": errFor("score"),
          dataset: { focusKey: "score" }, oninput: (e) => (state.ui.draft.score = e.target.value),
        })));
    } else {
      fields.push(buildRanker({
        stage: st.nextStage,
        value: d.rank ?? (st.nextStage === 1 ? 1 : null),
        otherText: d.other,
        errorId: errFor("relative_rank"),
        onChoose: (j) => {
          state.ui.draft.rank = j;
          state.ui.draft.other = "";
        },
        onOther: (text) => {
          state.ui.draft.other = text;
          state.ui.draft.rank = null;
          for (const r of frame.entry.querySelectorAll('input[name="cmp-rank"]')) r.checked = false;
        },
      }));
    }
    if (st.needs.isWindow) {
      const auto = defaultTime(rec);
      const unit = st.needs.unit ? `${st.needs.unit}s` : "time units";
      const range = `from ${numberText(st.lastTime)} to ${numberText(st.needs.window)}`;
      const hint = auto !== null
        ? `Filled in with now; change it if they arrived earlier (${range}).`
        : st.needs.start
          ? `The window (opening ${st.needs.start}) is not running now: enter the time, ${range}.`
          : `Enter the time, ${range}.`;
      fields.push(h("div", { class: "cmp-field" },
        h("label", { for: "cmp-time" }, `Arrival time (${unit} since the window opened)`),
        h("input", {
          id: "cmp-time", type: "text", inputmode: "decimal", autocomplete: "off",
          value: d.time !== null ? d.time : numberText(auto),
          "aria-invalid": errFor("time") ? "true" : null, "aria-describedby": `cmp-time-hint ${errFor("time") ?? ""}`.trim(),
          dataset: { focusKey: "time" }, oninput: (e) => (state.ui.draft.time = e.target.value),
        }),
        h("p", { id: "cmp-time-hint", class: "cmp-hint" }, hint)));
    }
    fields.push(h("div", { class: "cmp-field" },
      h("label", { for: "cmp-label" }, "Label (optional: initials or a note of your own)"),
      h("input", {
        id: "cmp-label", type: "text", maxlength: model.MAX_LABEL, autocomplete: "off", value: d.label,
        dataset: { focusKey: "label" }, oninput: (e) => (state.ui.draft.label = e.target.value),
      })));
    return h("form", {
      class: "cmp-form cmp-add",
      novalidate: true,
      "aria-labelledby": "cmp-entry-head",
      onsubmit: (e) => {
        e.preventDefault();
        addCandidate();
      },
    },
    h("h3", { id: "cmp-entry-head", tabindex: "-1", dataset: { focusKey: "entry-head" } }, `Candidate ${formatCount(st.nextStage)}`),
    fields,
    error ? h("p", { id: errId, class: "cmp-error", role: "alert" }, error.message) : null,
    h("div", { class: "cmp-buttons" },
      h("button", { type: "submit", class: "cmp-primary", dataset: { focusKey: "add" } }, "Add candidate")));
  }

  function renderAdvice(rec, st) {
    let view;
    if (st.pending) {
      const a = st.pending.advice;
      const stage = st.pendingIndex + 1;
      if (a && a.decision) view = { state: "ready", advice: a, stage };
      else if (state.advice && state.advice.key === adviceKey(rec) && state.advice.status === "error") {
        view = { state: "error", error: state.advice.error, stage };
      } else {
        view = { state: "waiting", engine: state.engine.state, detail: state.engine.detail, stage };
      }
    } else if (st.over) view = { state: "idle", text: state.ui.note || "The search is over; the summary is below." };
    else view = { state: "idle", text: state.ui.note || (st.seenCount === 0 ? "Enter the first candidate to get advice." : `Enter candidate ${st.nextStage} to get advice.`) };
    const sig = JSON.stringify([rec.id, view]);
    if (sig === adviceSig) return;
    adviceSig = sig;
    const box = frame.advice;
    box.dataset.state = view.state;
    delete box.dataset.decision;
    delete box.dataset.offerValue;
    delete box.dataset.passValue;
    delete box.dataset.valueKind;
    if (view.state === "idle") {
      fill(box, h("p", { class: "cmp-advice-note" }, view.text));
    } else if (view.state === "waiting") {
      const text = view.engine === "loading"
        ? `Starting the engine${view.detail ? ` (${view.detail})` : ""}… advice for candidate ${view.stage} follows.`
        : view.engine === "failed"
          ? "The engine could not start, so there is no advice. You can still record your decisions."
          : `Working out advice for candidate ${view.stage}…`;
      fill(box, h("p", { class: "cmp-advice-note" }, text));
    } else if (view.state === "error") {
      const where = view.error.field ? `${fieldWords(view.error.field)}: ` : "";
      fill(box,
        h("p", { class: "cmp-advice-decision cmp-advice-none" }, "No advice"),
        h("p", { class: "cmp-advice-reason" }, `${where}${view.error.message}`),
        h("p", { class: "cmp-hint" }, "You can still record what you did, or undo the last entry and enter it again."));
    } else {
      const a = view.advice;
      box.dataset.decision = a.decision;
      box.dataset.valueKind = a.value_kind ?? "";
      if (a.offer_value != null) box.dataset.offerValue = String(a.offer_value);
      if (a.pass_value != null) box.dataset.passValue = String(a.pass_value);
      const [capOffer, capPass] = valueCaptions(a.value_kind);
      const better = betterSide(a.value_kind, a.offer_value, a.pass_value);
      const card = (side, caption, value) => h("div", { class: `cmp-value${better === side ? " is-better" : ""}` },
        h("span", { class: "cmp-value-num" }, formatValue(a.value_kind, value)),
        h("span", { class: "cmp-value-cap" }, caption, better === side ? h("span", { class: "cmp-better" }, " (better)") : null));
      fill(box,
        h("p", { class: "cmp-advice-stage" }, `Candidate ${formatCount(view.stage)}`),
        h("p", { class: `cmp-advice-decision cmp-advice-${a.decision}` }, DECISION_TEXT[a.decision] ?? a.decision),
        h("p", { class: "cmp-advice-reason" }, a.reason),
        h("div", { class: "cmp-values" }, card("offer", capOffer, a.offer_value), card("pass", capPass, a.pass_value)),
        a.plan_decision && a.plan_decision !== a.decision
          ? h("p", { class: "cmp-hint" }, `The plan as set before the search would ${a.plan_decision === "offer" ? "make an offer" : "pass"} here; the advice follows the search as it actually went.`)
          : null,
        (a.notes || []).map((n) => h("p", { class: "cmp-hint" }, n)));
    }
  }

  function renderOutcome(rec, st) {
    const stage = st.pendingIndex + 1;
    const b = (text, outcome, key) => h("button", { type: "button", class: "cmp-outcome-btn", dataset: { focusKey: key }, onclick: () => recordOutcome(outcome) }, text);
    return h("div", { class: "cmp-outcome-group", role: "group", "aria-labelledby": "cmp-outcome-head" },
      h("h3", { id: "cmp-outcome-head", tabindex: "-1", dataset: { focusKey: "outcome-head" } }, `What happened with candidate ${formatCount(stage)}?`),
      h("div", { class: "cmp-buttons" },
        b("Offer accepted", "accepted", "out-accepted"),
        b("Offer declined", "declined", "out-declined"),
        b("Passed", "passed", "out-passed")));
  }

  function renderActions(rec, st) {
    const canEnd = !st.pending && !st.over;
    return h("div", { class: "cmp-buttons" },
      h("button", { type: "button", dataset: { focusKey: "undo" }, disabled: rec.entries.length === 0 && !rec.ended, onclick: undoLast }, "Undo last entry"),
      canEnd && st.seenCount > 0
        ? h("button", { type: "button", dataset: { focusKey: "end" }, onclick: endSearch }, "No more candidates: end the search")
        : null);
  }

  function who(stage, label) {
    return label ? `“${label}” (candidate ${formatCount(stage)})` : `candidate ${formatCount(stage)}`;
  }

  function renderSummary(rec, st) {
    const s = model.summarize(rec);
    const why = {
      filled: st.openings > 1 ? "Every opening is filled." : "The opening is filled.",
      exhausted: `All ${formatCount(st.seenCount)} candidates of the pool were seen.`,
      ended: "You ended the search.",
    }[st.overReason];
    const items = [];
    if (s.hires.length === 0) items.push(h("li", {}, "Nobody was hired."));
    for (const hire of s.hires) {
      const parts = [`Hired: ${who(hire.stage, hire.label)}, of the ${formatCount(s.seenCount)} you saw.`];
      if (hire.rankAmongSeen != null) {
        parts.push(hire.rankAmongSeen === 1
          ? ` Best of all ${formatCount(s.seenCount)} you saw.`
          : ` Ranks ${model.ordinal(hire.rankAmongSeen)} of all ${formatCount(s.seenCount)} you saw.`);
      } else if (hire.score != null && s.bestScore != null) {
        parts.push(` Score ${numberText(hire.score)}; best score seen ${numberText(s.bestScore)}.`);
      }
      if (hire.advised) parts.push(` The advice was to ${hire.advised === "offer" ? "make an offer" : "pass"}.`);
      if (hire.planDecision) parts.push(` The plan set before the search would have ${hire.planDecision === "offer" ? "offered too" : "passed"}.`);
      items.push(h("li", {}, parts.join("")));
    }
    const offersText = `${formatCount(s.offers)} ${s.offers === 1 ? "offer" : "offers"} made, ${formatCount(s.declines)} declined.`;
    items.push(h("li", {}, offersText));
    items.push(h("li", {}, s.decisions
      ? `Advice followed at ${formatCount(s.followed)} of ${formatCount(s.decisions)} decisions.`
      : "No advice was recorded for these decisions."));
    for (const dv of s.deviations) {
      items.push(h("li", { class: "cmp-dev" },
        `Not followed at ${who(dv.stage, dv.label)}: the advice was to ${dv.advised === "offer" ? "make an offer" : "pass"}; you ${dv.outcome === "passed" ? "passed" : `made an offer (${dv.outcome})`}.`));
    }
    items.push(h("li", {}, s.planFirstOffer
      ? `The plan set before the search would first have made an offer at ${who(s.planFirstOffer.stage, s.planFirstOffer.label)}.`
      : "The plan set before the search would not have made an offer to anyone you saw."));
    return h("section", { class: "cmp-summary", "aria-labelledby": "cmp-summary-head" },
      h("h3", { id: "cmp-summary-head", tabindex: "-1", dataset: { focusKey: "summary-head" } }, "Search summary"),
      h("p", {}, why),
      h("ul", {}, items));
  }

  function renderHistory(rec) {
    const needs = model.scenarioNeeds(rec.scenario);
    if (rec.entries.length === 0) return null;
    const head = ["#", "Label", needs.hasScores ? "Score" : "Rank so far", needs.isWindow ? "Arrived" : null, "Advice", "What you did"].filter(Boolean);
    const rows = rec.entries.map((e, i) => {
      const f = model.followedAdvice(e);
      const advice = e.advice && e.advice.decision ? DECISION_TEXT[e.advice.decision] : "—";
      return h("tr", { class: f === false ? "cmp-row-dev" : null },
        h("td", {}, formatCount(i + 1)),
        h("td", { class: "cmp-label-cell" }, e.label ?? ""),
        h("td", {}, needs.hasScores ? numberText(e.score) : model.ordinal(e.relative_rank)),
        needs.isWindow ? h("td", {}, numberText(e.time)) : null,
        h("td", {}, advice, f === false ? h("span", { class: "cmp-dev-mark" }, " (not followed)") : null),
        h("td", {}, OUTCOME_TEXT[e.outcome]));
    });
    return h("div", { class: "cmp-table-wrap", tabindex: "0", role: "region", "aria-labelledby": "cmp-hist-cap" },
      h("table", { class: "cmp-table" },
        h("caption", { id: "cmp-hist-cap" }, "Candidates so far"),
        h("thead", {}, h("tr", {}, head.map((t) => h("th", { scope: "col" }, t)))),
        h("tbody", {}, rows)));
  }

  // ---- start --------------------------------------------------------------------------------

  loadFromStorage();
  if (typeof window !== "undefined") {
    // Another tab changed the saved searches: show what is saved now.
    window.addEventListener("storage", (e) => {
      if (!db || (e.key !== null && !e.key.startsWith("seqpick.search"))) return;
      update(() => {
        const keep = state.selectedId;
        loadFromStorage();
        if (keep && state.byId[keep]) state.selectedId = keep;
      });
    });
  }
  // Subscribed only now: onStatus calls back at once when the engine already
  // has a status, and render() needs the frame built above.
  if (engine && typeof engine.onStatus === "function") {
    engine.onStatus((s) => {
      const was = state.engine.state;
      state.engine = { state: s.state, detail: s.detail || "" };
      if (was !== s.state) render();
    });
  }

  render();
  askAdvice();
  askRule();

  return {
    /** Re-render (e.g. when the view is shown again). */
    refresh: () => update(() => {}),
    /** For tests and debugging: the state object (read only, please). */
    get state() {
      return state;
    },
  };
}
