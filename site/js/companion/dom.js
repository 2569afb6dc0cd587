// DOM builders for the live view: the same text-only builders as the plan
// view (one implementation for the whole page). Text only ever goes in as text
// nodes or textContent, never as markup, so candidate labels and search names
// (the user's own text) and engine messages cannot become HTML.
//
//   h("p", {class: "note", dataset: {key: "x"}, onclick: fn}, "text", h("b", {}, "bold"))
//   add(node, children)      append nodes / strings / arrays
//   fill(node, ...children)  replace the children

export { el as h, append as add, replaceChildren as fill } from "../plan/dom.js";
