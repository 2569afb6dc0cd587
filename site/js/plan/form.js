// The scenario form: built once from the spec below, then kept in step with
// the state by renderForm(state). Every control has a visible label, a
// one-line explanation (aria-describedby) and a slot for the engine's error
// message about it (also in aria-describedby, with aria-invalid on the control).
//
// Controls that do not apply are hidden, never cleared: their values stay in
// state.form. Input events go to the callbacks given to buildForm(); this
// module never changes the state itself.

import { el, setAttr, setText } from "./dom.js";
import { compareApplies, PERCENT_KINDS, MAX_COMPARE, percentTextToShare } from "../state.js";

// --- the spec ---------------------------------------------------------------------

const isPool = (form) => (f) => f.poolForm === form;
const isScores = (form) => (f) => f.scoresForm === form;

const SECTIONS = [
  {
    id: "about",
    legend: "The search",
    fields: [
      {
        key: "title",
        label: "Title",
        help: "A name for this plan, so you can tell plans apart.",
        type: "text",
        maxlength: 200,
      },
    ],
  },
  {
    id: "pool",
    legend: "Candidates",
    fields: [
      {
        key: "poolForm",
        label: "What you know about the count",
        help: "Pick what you know about how many people will come forward.",
        type: "select",
        options: [
          ["size", "The exact number"],
          ["range", "A range, every count in it equally likely"],
          ["mean", "An average (the count varies at random)"],
          ["weights", "My own weights for each count"],
          ["window", "A time window and an arrival rate"],
          ["chances", "Chances per stage (advanced)"],
        ],
      },
      {
        key: "size",
        label: "Number of candidates",
        help: "Everyone you will meet, one after another, in random order.",
        type: "number",
        inputmode: "numeric",
        when: isPool("size"),
      },
      {
        key: "sizeMin",
        label: "Fewest candidates",
        help: "The smallest count you think possible (0 is allowed).",
        type: "number",
        inputmode: "numeric",
        when: isPool("range"),
      },
      {
        key: "sizeMax",
        label: "Most candidates",
        help: "The largest count you think possible; every count in between is as likely.",
        type: "number",
        inputmode: "numeric",
        when: isPool("range"),
      },
      {
        key: "sizeMean",
        label: "Average count",
        help: "The count varies around this average the way random arrivals do (Poisson).",
        type: "number",
        inputmode: "decimal",
        when: isPool("mean"),
      },
      {
        key: "sizeWeights",
        label: "Weights for 1, 2, 3, … candidates",
        help: "One weight per count, starting at one candidate; bigger means more likely. Separate with commas or spaces.",
        type: "textarea",
        when: isPool("weights"),
      },
      {
        key: "window",
        label: "Length of the window",
        help: "How long the search stays open, in the unit below.",
        type: "number",
        inputmode: "decimal",
        when: isPool("window"),
      },
      {
        key: "unit",
        label: "Unit of time",
        help: "Only for how times are shown; it does not change the odds.",
        type: "select",
        options: [
          ["", "Not stated"],
          ["minute", "Minutes"],
          ["hour", "Hours"],
          ["day", "Days"],
          ["week", "Weeks"],
          ["month", "Months"],
        ],
        when: isPool("window"),
      },
      {
        key: "arrivalsPerUnit",
        label: "Arrivals per unit",
        help: "How many candidates turn up per unit of time, on average.",
        type: "number",
        inputmode: "decimal",
        when: isPool("window"),
      },
      {
        key: "start",
        label: "Window opens (optional)",
        help: "A date and time such as 2026-03-02T09:00, to show the cutoff as a date.",
        type: "text",
        maxlength: 40,
        placeholder: "2026-03-02T09:00",
        when: isPool("window"),
      },
      {
        key: "chances",
        label: "Chance for each stage",
        help: "For each stage in order, the chance (0 to 1) that it brings what you are after, independently of the others.",
        type: "textarea",
        when: isPool("chances"),
      },
    ],
  },
  {
    id: "goal",
    legend: "What counts as a good hire",
    fields: [
      {
        key: "goalType",
        label: "Goal",
        help: "The plan makes this as likely (or as good on average) as it can be.",
        type: "select",
        options: [
          ["best", "Hire the very best"],
          ["top", "Hire someone in the top group"],
          ["rank", "Best place in the ranking, on average"],
          ["score", "Highest score, on average (needs scores)"],
        ],
      },
      {
        key: "topK",
        label: "Size of the top group",
        help: "A hire counts as a success if they are among this many best of all candidates.",
        type: "number",
        inputmode: "numeric",
        when: (f) => f.goalType === "top",
      },
    ],
  },
  {
    id: "scores",
    legend: "Scores",
    fields: [
      {
        key: "scoresForm",
        label: "Candidate scores",
        help: "With scores on a known scale, each candidate is judged against what is possible, not only against those seen so far.",
        type: "select",
        options: [
          ["none", "No scores: only who is better than whom"],
          ["uniform", "Scores spread evenly over a range"],
          ["normal", "Bell-shaped scores (normal)"],
          ["sample", "Past scores I paste in"],
        ],
      },
      {
        key: "low",
        label: "Lowest possible score",
        help: "Every score from the lowest to the highest is equally likely.",
        type: "number",
        inputmode: "decimal",
        when: isScores("uniform"),
      },
      {
        key: "high",
        label: "Highest possible score",
        help: "Must be above the lowest.",
        type: "number",
        inputmode: "decimal",
        when: isScores("uniform"),
      },
      {
        key: "mean",
        label: "Average score",
        help: "The middle of the bell curve.",
        type: "number",
        inputmode: "decimal",
        when: isScores("normal"),
      },
      {
        key: "sd",
        label: "Spread (standard deviation)",
        help: "About two in three scores fall within one spread of the average.",
        type: "number",
        inputmode: "decimal",
        when: isScores("normal"),
      },
      {
        key: "values",
        label: "Past scores",
        help: "Scores from earlier, comparable searches, separated by commas, spaces or lines; use a point for decimals.",
        type: "textarea",
        when: isScores("sample"),
      },
    ],
  },
  {
    id: "offers",
    legend: "Offers and costs",
    fields: [
      {
        key: "acceptPercent",
        label: "Chance an offer is accepted (%)",
        help: "If some people turn offers down, the share you expect to say yes.",
        type: "number",
        inputmode: "decimal",
        percent: true,
      },
      {
        key: "openings",
        label: "Openings",
        help: "How many people this search should hire.",
        type: "number",
        inputmode: "numeric",
      },
      {
        key: "cost",
        label: "Cost per candidate",
        help: "What meeting one more candidate costs, in the units of the goal; 0 to leave it out.",
        type: "number",
        inputmode: "decimal",
      },
      {
        key: "mustHire",
        label: "Must hire someone",
        help: "If nobody has been chosen by the end, take the last candidate rather than no one.",
        type: "checkbox",
      },
    ],
  },
];

const RULE_KINDS = [
  {
    kind: "skip",
    option: "Pass on a set number",
    label: "Candidates to pass",
    help: "Pass on this many, then offer to the first who beats everyone before.",
    inputmode: "numeric",
  },
  {
    kind: "skip_share",
    option: "Pass on a share",
    label: "Share to pass (%)",
    help: "Pass on this share of the pool, then offer to the first who beats everyone before.",
    inputmode: "decimal",
  },
  {
    kind: "start_share",
    option: "Wait for a share of the time",
    label: "Share of the window to wait (%)",
    help: "Wait this share of the window, then offer to the first who beats everyone before.",
    inputmode: "decimal",
  },
  {
    kind: "score_at_least",
    option: "Take the first above a score bar",
    label: "Score bar",
    help: "Offer to the first candidate whose score is at least this.",
    inputmode: "decimal",
  },
];
const RULE_KIND = Object.fromEntries(RULE_KINDS.map((k) => [k.kind, k]));

// --- building ---------------------------------------------------------------------

const controls = new Map(); // key -> {spec, wrap, input, help, error}
const rows = new Map(); // row id -> row parts
let rowList = null;
let addButton = null;
let asideNote = null;
let compareError = null;
let generalError = null;
let handlers = null;

function controlId(key) {
  return `f-${key}`;
}

function buildField(spec) {
  const id = controlId(spec.key);
  const help = el("p", { class: "field-help", id: `${id}-help`, text: spec.help });
  const error = el("p", { class: "field-error", id: `${id}-error`, hidden: true });
  let input;
  if (spec.type === "select") {
    input = el(
      "select",
      { id, name: spec.key },
      spec.options.map(([value, text]) => el("option", { value, text }))
    );
  } else if (spec.type === "textarea") {
    input = el("textarea", { id, name: spec.key, rows: 3, spellcheck: "false" });
  } else if (spec.type === "checkbox") {
    input = el("input", { id, name: spec.key, type: "checkbox" });
  } else {
    input = el("input", {
      id,
      name: spec.key,
      type: "text",
      inputmode: spec.inputmode,
      autocomplete: "off",
      spellcheck: "false",
      maxlength: spec.maxlength,
      placeholder: spec.placeholder,
    });
  }
  input.dataset.key = spec.key;
  setAttr(input, "aria-describedby", help.id);
  const label = el("label", { for: id, text: spec.label });
  const wrap =
    spec.type === "checkbox"
      ? el("div", { class: "field field-check" }, el("div", { class: "check-line" }, input, label), help, error)
      : el("div", { class: "field" }, label, input, help, error);
  controls.set(spec.key, { spec, wrap, input, help, error });
  return wrap;
}

/**
 * Build the form inside `form` (a <form> element).
 * handlers: {onField(key, value), onRuleKind(id, kind), onRuleValue(id, text),
 *            onRuleAdd(), onRuleRemove(id)}
 */
export function buildForm(form, h) {
  handlers = h;
  form.replaceChildren();
  form.append(el("h2", { id: "form-heading", class: "section-title", text: "Your search" }));
  generalError = el("p", { class: "form-error", id: "form-error", role: "alert", hidden: true });
  form.append(generalError);
  for (const section of SECTIONS) {
    const legend = el("legend", { text: section.legend });
    form.append(el("fieldset", { class: "group", id: `group-${section.id}` }, legend, section.fields.map(buildField)));
  }

  // Compare rules.
  rowList = el("div", { class: "rule-list" });
  addButton = el("button", { type: "button", class: "button button-secondary", text: "Add a rule" });
  asideNote = el("p", { class: "field-help rule-aside", hidden: true });
  compareError = el("p", { class: "field-error", id: "f-compare-error", hidden: true });
  const help = el("p", {
    class: "field-help",
    id: "f-compare-help",
    text: "See how simple rules of thumb do beside the best rule, on the same odds.",
  });
  form.append(
    el(
      "fieldset",
      { class: "group", id: "group-compare", "aria-describedby": "f-compare-help" },
      el("legend", { text: "Rules to compare" }),
      help,
      compareError,
      rowList,
      asideNote,
      addButton
    )
  );
  controls.set("compare", { spec: { key: "compare" }, wrap: null, input: null, help, error: compareError });

  form.addEventListener("submit", (e) => e.preventDefault());
  form.addEventListener("input", onInput);
  form.addEventListener("change", onInput);
  addButton.addEventListener("click", () => handlers.onRuleAdd());
}

function onInput(event) {
  const t = event.target;
  if (t.dataset.key) {
    const value = t.type === "checkbox" ? t.checked : t.value;
    // Text boxes report on "input"; selects and checkboxes on "change" too.
    handlers.onField(t.dataset.key, value);
  } else if (t.dataset.ruleKind) {
    handlers.onRuleKind(t.dataset.ruleKind, t.value);
  } else if (t.dataset.ruleValue) {
    handlers.onRuleValue(t.dataset.ruleValue, t.value);
  }
}

function buildRow(id) {
  const kindId = `rule-${id}-kind`;
  const valueId = `rule-${id}-value`;
  const legend = el("legend", { class: "rule-legend" });
  const kindSelect = el(
    "select",
    { id: kindId, dataset: { ruleKind: id } },
    RULE_KINDS.map((k) => el("option", { value: k.kind, text: k.option }))
  );
  const valueLabel = el("label", { for: valueId });
  const valueInput = el("input", {
    id: valueId,
    type: "text",
    autocomplete: "off",
    spellcheck: "false",
    dataset: { ruleValue: id },
  });
  const help = el("p", { class: "field-help", id: `${valueId}-help` });
  const error = el("p", { class: "field-error", id: `${valueId}-error`, hidden: true });
  const numbers = el("output", { class: "rule-numbers", for: valueId });
  const remove = el("button", { type: "button", class: "button button-quiet rule-remove", text: "Remove" });
  remove.addEventListener("click", () => handlers.onRuleRemove(id));
  const root = el(
    "fieldset",
    { class: "rule-row", dataset: { rowId: id } },
    legend,
    el("div", { class: "field" }, el("label", { for: kindId, text: "Kind of rule" }), kindSelect),
    el("div", { class: "field" }, valueLabel, valueInput, help, error),
    numbers,
    remove
  );
  return { root, legend, kindSelect, valueLabel, valueInput, help, error, numbers, remove, kind: null };
}

// --- rendering ----------------------------------------------------------------------

function syncValue(input, value) {
  if (input.type === "checkbox") {
    if (input.checked !== Boolean(value)) input.checked = Boolean(value);
  } else if (input.value !== String(value ?? "")) {
    input.value = String(value ?? "");
  }
}

function percentHint(text, message) {
  const share = percentTextToShare(text);
  if (typeof share !== "number") return message;
  return `${message} (This box is in percent: ${String(text).trim().replace(/%$/, "")}% is ${share}.)`;
}

function showError(input, help, error, message) {
  setText(error, message || "");
  error.hidden = !message;
  if (input) {
    setAttr(input, "aria-invalid", message ? "true" : null);
    setAttr(input, "aria-describedby", message ? `${help.id} ${error.id}` : help.id);
  }
}

/** Keys of errors that have a visible control to sit beside. */
export function visibleErrorKeys(state) {
  const out = new Set();
  for (const key of Object.keys(state.errors)) {
    if (key.startsWith("compare:")) {
      const row = state.form.compare.find((r) => `compare:${r.id}` === key);
      if (row && compareApplies(row.kind, state.form)) out.add(key);
    } else if (key === "compare") {
      out.add(key);
    } else {
      const c = controls.get(key);
      if (c && (!c.spec.when || c.spec.when(state.form))) out.add(key);
    }
  }
  return out;
}

/** Bring the form in line with the state. */
export function renderForm(state, ruleNumbers) {
  // ruleNumbers(rowId) -> the short result line shown in that compare row.
  const f = state.form;
  const shown = visibleErrorKeys(state);
  for (const [key, c] of controls) {
    if (key === "compare") continue;
    const visible = !c.spec.when || c.spec.when(f);
    c.wrap.hidden = !visible;
    syncValue(c.input, f[key]);
    let message = shown.has(key) ? state.errors[key] : null;
    if (message && c.spec.percent) message = percentHint(f[key], message);
    showError(c.input, c.help, c.error, message);
  }
  // An error that belongs to no visible control is shown above the form.
  const stray = Object.keys(state.errors).filter((k) => !shown.has(k));
  const general = state.generalError || (stray.length ? state.errors[stray[0]] : null);
  setText(generalError, general || "");
  generalError.hidden = !general;

  const compareMessage = shown.has("compare") ? state.errors.compare : null;
  setText(compareError, compareMessage || "");
  compareError.hidden = !compareMessage;

  renderRows(state, shown, ruleNumbers);
}

function renderRows(state, shown, ruleNumbers) {
  const f = state.form;
  const keep = new Set(f.compare.map((r) => r.id));
  for (const [id, parts] of rows) {
    if (!keep.has(id)) {
      parts.root.remove();
      rows.delete(id);
    }
  }
  let number = 0;
  let setAside = 0;
  let previous = null;
  for (const row of f.compare) {
    let parts = rows.get(row.id);
    if (!parts) {
      parts = buildRow(row.id);
      rows.set(row.id, parts);
    }
    // Keep DOM order equal to state order.
    const expectedPrev = previous ? previous.root : null;
    if (parts.root.previousElementSibling !== expectedPrev || parts.root.parentNode !== rowList) {
      if (expectedPrev) expectedPrev.after(parts.root);
      else rowList.prepend(parts.root);
    }
    previous = parts;

    const applies = compareApplies(row.kind, f);
    parts.root.hidden = !applies;
    if (!applies) {
      setAside++;
      continue;
    }
    number++;
    const kindInfo = RULE_KIND[row.kind];
    setText(parts.legend, `Rule ${number}`);
    setAttr(parts.remove, "aria-label", `Remove rule ${number}`);
    // Only the kinds that apply now (plus the row's own) are offered.
    for (const option of parts.kindSelect.options) {
      option.hidden = !compareApplies(option.value, f);
      option.disabled = option.hidden;
    }
    syncValue(parts.kindSelect, row.kind);
    setText(parts.valueLabel, kindInfo.label);
    setText(parts.help, kindInfo.help);
    setAttr(parts.valueInput, "inputmode", kindInfo.inputmode);
    syncValue(parts.valueInput, row.values[row.kind]);
    let message = shown.has(`compare:${row.id}`) ? state.errors[`compare:${row.id}`] : null;
    if (message && PERCENT_KINDS.has(row.kind)) message = percentHint(row.values[row.kind], message);
    showError(parts.valueInput, parts.help, parts.error, message);
    setText(parts.numbers, ruleNumbers(row.id));
  }
  asideNote.hidden = setAside === 0;
  setText(
    asideNote,
    setAside === 1
      ? "1 rule is set aside: it needs scores or a time window. It comes back when they do."
      : `${setAside} rules are set aside: they need scores or a time window. They come back when they do.`
  );
  addButton.disabled = f.compare.length >= MAX_COMPARE;
  setText(addButton, f.compare.length >= MAX_COMPARE ? `At most ${MAX_COMPARE} rules` : "Add a rule");
}

/** Focus the value box of a compare row (after adding it). */
export function focusRule(id) {
  rows.get(id)?.valueInput.focus();
}

/** Focus the kind select of the row at this position, or the add button. */
export function focusAfterRemove(nextId) {
  if (nextId && rows.get(nextId)) rows.get(nextId).kindSelect.focus();
  else addButton?.focus();
}
