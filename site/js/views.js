// View switching: "Plan" and "Live search" share one page. The current view
// lives in state.view; renderViews(state) shows its section and marks its nav
// button with aria-current. The fragment (#...) is left alone: share links use it.
//
// A view other than the plan registers itself:
//
//   import { registerView } from "./views.js";
//   registerView("live", {
//     mount(section, context) { ... },   // once, the first time it is shown
//     show(context) { ... },             // each time it is shown (optional)
//     hide() { ... },                    // each time it is left (optional)
//   });
//
// `context` is what app.js passes to initViews(): see the hook described at
// the top of app.js (engine, getPlan(), onPlan(callback)).

const registry = new Map(); // name -> {mount, show, hide, mounted}
let context = null;
let navButtons = [];
let sections = new Map(); // name -> section element
let missing = null; // shown when a view has no module yet
let current = null;
let changeView = null;

export function registerView(name, impl) {
  registry.set(name, { ...impl, mounted: false });
  // Registered after the page started on that view: mount now.
  if (current === name) {
    if (missing) missing.hidden = true;
    activate(name);
  }
}

/**
 * nav: the <nav> holding buttons with data-view="<name>";
 * sectionsByName: {name: section element}; missingNote: element shown for an
 * unregistered view; onChange(name): called when the user picks a view.
 */
export function initViews({ nav, sectionsByName, missingNote, ctx, onChange }) {
  navButtons = [...nav.querySelectorAll("[data-view]")];
  sections = new Map(Object.entries(sectionsByName));
  missing = missingNote;
  context = ctx;
  changeView = onChange;
  for (const b of navButtons) {
    b.addEventListener("click", () => changeView(b.dataset.view));
  }
}

function activate(name) {
  const impl = registry.get(name);
  if (!impl) return;
  const section = sections.get(name);
  if (!impl.mounted && impl.mount) {
    impl.mount(section, context);
    impl.mounted = true;
  }
  if (impl.show) impl.show(context);
}

/** Show state.view. The plan view needs no module; others need registerView(). */
export function renderViews(state) {
  const name = sections.has(state.view) ? state.view : "plan";
  for (const [n, section] of sections) section.hidden = n !== name;
  for (const b of navButtons) {
    if (b.dataset.view === name) b.setAttribute("aria-current", "page");
    else b.removeAttribute("aria-current");
  }
  if (missing) missing.hidden = name === "plan" || registry.has(name);
  if (name !== current) {
    const previous = current ? registry.get(current) : null;
    if (previous?.hide) previous.hide();
    current = name;
    activate(name);
  }
}

export function hasView(name) {
  return name === "plan" || registry.has(name);
}
