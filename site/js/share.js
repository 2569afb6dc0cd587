// Share link, downloads and printing for the plan.
//
// The whole scenario lives in the URL fragment ("#v=1&pool=size:24&..."),
// which browsers never send to a server. The engine is the only encoder and
// decoder of that format (pylib/seqpick/link.py, commands "link_encode" and
// "link_decode"); this module only moves fragments between the address bar
// and the engine.
//
//   initShare(ctx)     once at start, before the first render; ctx =
//                      {state, engine, render, loadScenario, parts: {form}}
//   renderShare(state) from the page's one render path, on every render
//
// state.share = {
//   opening:  true while a link from the address bar is being decoded (the
//             page then shows "Opening the shared plan…", never the demo's
//             numbers, and the form waits);
//   notice:   null | {kind: "partial" | "unreadable" | "failed", items: [{part, message}], detail}
//             what was wrong with the link, shown until dismissed or another
//             link is opened;
//   copy:     null | {ok, text}: the message after "Copy link";
//   fallback: true when the link is shown in a read-only box to copy by hand.
// }
//
// Flow: on load with a fragment (other than the prerendered demo's own) ->
// link_decode -> loadScenario(scenario) -> solve. After every render whose
// answer matches the form (incl. a title-only change) -> link_encode ->
// history.replaceState (no history entries pile up). "hashchange" (a link
// pasted into the address bar) opens that link.

import { el, replaceChildren, setAttr, setText } from "./plan/dom.js";
import { scenarioFromState, scenarioKey } from "./state.js";
import { comparisonCsv, csvFileName, cutoffCsv, downloadText, scenarioFacts } from "./export.js";
import { readPrerendered } from "./prerendered.js";

let ctx = null;
const dom = {};
let openSeq = 0; // newest link being opened
let encodeSeq = 0; // newest link_encode request
let asked = null; // JSON of the scenario last sent to link_encode
let written = null; // the fragment this page last put in the address bar (or opened)
let builtNotice;
let builtPrint = { result: undefined, title: undefined };

// --- words -------------------------------------------------------------------------------

/** Names of the link's parts (the keys of pylib/seqpick/link.py) in the form's words. */
export const PART_NAMES = {
  v: "Version",
  title: "Title",
  pool: "Candidates",
  goal: "Goal",
  scores: "Scores",
  accept: "Chance an offer is accepted",
  open: "Openings",
  cost: "Cost per candidate",
  must: "Must hire someone",
  cmp: "Rules to compare",
  fragment: "The link as a whole",
};

/** What to tell the reader about a decoded link: null when it was read in full. */
export function noticeFor(decoded) {
  const warnings = Array.isArray(decoded?.warnings) ? decoded.warnings : [];
  if (!warnings.length) return null;
  const items = warnings.map((w) => ({ part: String(w?.field ?? ""), message: String(w?.message ?? "") }));
  return { kind: decoded.version == null ? "unreadable" : "partial", items };
}

/** {title, lead, items: [text]} for a notice; plain text only. */
export function noticeText(notice) {
  const items = (notice.items ?? []).map(({ part, message }) => {
    const name = PART_NAMES[part] ?? "An unknown part";
    const where = part && part !== "fragment" ? ` (“${part}=” in the link)` : "";
    const why = message.replace(/[.\s]+$/, "");
    return `${name}${where}: ${why}.`;
  });
  if (notice.kind === "failed") {
    return {
      title: "The shared plan could not be opened.",
      lead: `${notice.detail ?? "The solver did not start"}. Reload the page to try again.`,
      items,
    };
  }
  if (notice.kind === "unreadable") {
    return {
      title: "This link could not be read.",
      lead: "None of it could be used, so the page shows the standard starting plan instead. You may want to ask whoever sent it for a fresh link.",
      items,
    };
  }
  return {
    title: "Part of this link could not be read.",
    lead: "The plan below uses everything else in the link. For each part listed here, the usual setting is used instead:",
    items,
  };
}

// --- building --------------------------------------------------------------------------------

function build() {
  const share = document.getElementById("share");
  dom.copy = el("button", { type: "button", class: "button button-primary", text: "Copy link" });
  dom.cutoffs = el("button", { type: "button", class: "button button-secondary", text: "Download cutoff table (CSV)" });
  dom.compare = el("button", { type: "button", class: "button button-secondary", text: "Download comparison (CSV)" });
  dom.print = el("button", { type: "button", class: "button button-secondary", text: "Print plan" });
  dom.message = el("p", { class: "share-message", role: "status" });
  dom.url = el("input", { id: "share-url", type: "text", readonly: true, spellcheck: "false", autocomplete: "off" });
  dom.fallback = el(
    "div",
    { class: "share-fallback field", hidden: true },
    el("label", { for: "share-url", text: "Link to this plan" }),
    dom.url
  );
  replaceChildren(
    share,
    el("h2", { class: "share-heading", id: "share-heading", text: "Send, save or print this plan" }),
    el("div", { class: "share-buttons" }, dom.copy, dom.cutoffs, dom.compare, dom.print),
    dom.message,
    dom.fallback,
    el("p", {
      class: "field-help",
      text: "The link holds the whole plan after its “#”, a part of the address browsers never send to any server.",
    })
  );

  dom.copy.addEventListener("click", copyLink);
  dom.cutoffs.addEventListener("click", () => download("cutoffs"));
  dom.compare.addEventListener("click", () => download("comparison"));
  dom.print.addEventListener("click", () => window.print());
  dom.url.addEventListener("focus", () => dom.url.select());

  dom.notice = document.getElementById("link-notice");
  dom.printHead = document.getElementById("print-head");
}

export function initShare(c) {
  ctx = c;
  const pre = readPrerendered();
  const hash = location.hash;
  // The prerendered demo's own link needs no decoding: its answer is on the page.
  const opening = hash.length > 1 && !(pre && pre.result && pre.fragment === hash);
  if (hash.length > 1 && !opening) written = hash;
  c.state.share = { opening, notice: null, copy: null, fallback: false };
  build();
  if (opening) openLink(hash);
  window.addEventListener("hashchange", () => {
    const h = location.hash;
    if (h.length > 1 && h !== written) openLink(h);
  });
  window.addEventListener("beforeprint", () => {
    if (dom.printUrl) setText(dom.printUrl, location.href);
  });
}

// --- opening a link ------------------------------------------------------------------------------

function openLink(hash) {
  const { state, engine } = ctx;
  const mine = ++openSeq;
  encodeSeq++; // an encode on its way is for the plan being replaced: drop it
  asked = null;
  written = hash;
  Object.assign(state.share, { opening: true, copy: null, fallback: false });
  ctx.render();
  engine.request("link_decode", hash, { channel: "link-decode" }).then(
    (decoded) => {
      if (mine !== openSeq) return;
      state.share.opening = false;
      state.share.notice = noticeFor(decoded);
      ctx.loadScenario(decoded.scenario);
    },
    (err) => {
      if (err.superseded || mine !== openSeq) return;
      state.share.opening = false;
      state.share.notice = { kind: "failed", items: [], detail: String(err.message || "").replace(/\.$/, "") };
      // Carry on with what the form shows.
      ctx.loadScenario(scenarioFromState(state));
    }
  );
}

// --- keeping the address bar in step ----------------------------------------------------------------

function syncFragment(state) {
  if (state.share.opening || state.engine.state !== "ready" || !state.result || state.pending) return;
  if (Object.keys(state.errors).length || state.generalError) return;
  const scenario = scenarioFromState(state);
  if (scenarioKey(scenario) !== state.result.key) return;
  const json = JSON.stringify(scenario);
  if (json === asked) return;
  asked = json;
  const mine = ++encodeSeq;
  ctx.engine.request("link_encode", scenario, { channel: "link-encode" }).then(
    ({ fragment }) => {
      if (mine !== encodeSeq || typeof fragment !== "string") return;
      written = fragment;
      if (location.hash !== fragment) {
        history.replaceState(history.state, "", fragment);
        if (dom.printUrl) setText(dom.printUrl, location.href);
        const sh = ctx.state.share;
        if (sh.copy || sh.fallback) {
          // The copied link was for the plan before this change.
          sh.copy = null;
          ctx.render();
        }
      }
    },
    () => {
      // Not encodable as it stands (the engine names the problem when solving).
    }
  );
}

// --- buttons -----------------------------------------------------------------------------------------

async function copyLink() {
  const sh = ctx.state.share;
  const href = location.href;
  try {
    if (!navigator.clipboard?.writeText) throw new Error("no clipboard here");
    await navigator.clipboard.writeText(href);
    sh.fallback = false;
    sh.copy = { ok: true, text: "Link copied. Whoever opens it sees this plan, worked out afresh in their own browser." };
    ctx.render();
  } catch {
    sh.fallback = true;
    sh.copy = null;
    ctx.render();
    dom.url.value = href;
    dom.url.focus();
    dom.url.select();
    let copied = false;
    try {
      copied = document.execCommand("copy");
    } catch {
      copied = false;
    }
    sh.copy = copied
      ? { ok: true, text: "Link copied. It is also shown below." }
      : { ok: false, text: "This browser did not let the page copy. The link is selected in the box below: copy it with Ctrl+C (⌘C on a Mac)." };
    ctx.render();
  }
}

function download(kind) {
  const r = ctx.state.result;
  if (!r) return;
  const title = ctx.state.form.title.trim();
  const named = { ...r.scenario, title };
  const text = kind === "cutoffs" ? cutoffCsv(r.data) : comparisonCsv(r.data);
  downloadText(text, csvFileName(kind, named));
}

function dismissNotice() {
  ctx.state.share.notice = null;
  ctx.render();
  dom.copy.focus();
}

// --- render ------------------------------------------------------------------------------------------

function renderNotice(notice) {
  if (builtNotice === notice) return;
  builtNotice = notice;
  if (!notice) {
    dom.notice.replaceChildren();
    return;
  }
  const { title, lead, items } = noticeText(notice);
  const dismiss = el("button", {
    type: "button",
    class: "button button-quiet link-notice-dismiss",
    text: "Dismiss",
    "aria-label": "Dismiss the message about the link",
  });
  dismiss.addEventListener("click", dismissNotice);
  replaceChildren(
    dom.notice,
    el(
      "div",
      { class: `link-notice link-notice-${notice.kind}` },
      el("p", { class: "link-notice-title", text: title }),
      el("p", { text: lead }),
      items.length ? el("ul", {}, items.map((t) => el("li", { text: t }))) : null,
      dismiss
    )
  );
}

function renderPrintHead(state) {
  const r = state.result;
  const title = state.form.title.trim();
  if (builtPrint.result === r && builtPrint.title === title) return;
  builtPrint = { result: r, title };
  dom.printUrl = el("span", { class: "print-url", text: location.href });
  replaceChildren(
    dom.printHead,
    el("p", { class: "print-kicker", text: "Seqpick · plan for a one-at-a-time search" }),
    el("p", { class: "print-title", text: title || "Untitled plan" }),
    r
      ? el(
          "dl",
          { class: "print-facts" },
          scenarioFacts(r.scenario).map(([k, v]) => el("div", { class: "print-fact" }, el("dt", { text: k }), el("dd", { text: v })))
        )
      : null,
    el("p", { class: "print-link" }, "Open this plan again: ", dom.printUrl)
  );
}

export function renderShare(state) {
  const sh = state.share;
  renderNotice(sh.notice);
  const none = !state.result;
  dom.cutoffs.disabled = none;
  dom.compare.disabled = none;
  setText(dom.message, sh.copy?.text ?? "");
  dom.message.classList.toggle("is-problem", Boolean(sh.copy && !sh.copy.ok));
  dom.fallback.hidden = !sh.fallback;
  if (sh.fallback && dom.url.value !== location.href) dom.url.value = location.href;
  const form = ctx.parts.form;
  if (form.inert !== sh.opening) form.inert = sh.opening;
  form.classList.toggle("is-opening", sh.opening);
  setAttr(form, "aria-busy", sh.opening ? "true" : null);
  renderPrintHead(state);
  syncFragment(state);
}
