// DOM builders for the live view. Text only ever goes in as text nodes or
// textContent, never as markup, so candidate labels and search names (the
// user's own text) and engine messages cannot become HTML.
//
//   h("p", {class: "note", dataset: {key: "x"}, onclick: fn}, "text", h("b", {}, "bold"))
//
// Props: class, text, hidden, dataset, on<event> (listener), and attributes
// (true -> "", null/undefined/false -> left out). No "style": the page's
// Content-Security-Policy refuses style attributes; use classes.

export function h(tag, props = {}, ...children) {
  const node = document.createElement(tag);
  for (const [key, value] of Object.entries(props || {})) {
    if (value == null || value === false) continue;
    if (key === "class") node.className = value;
    else if (key === "text") node.textContent = String(value);
    else if (key === "hidden") node.hidden = Boolean(value);
    else if (key === "dataset") Object.assign(node.dataset, value);
    else if (key === "value") node.value = String(value);
    else if (key === "checked") node.checked = Boolean(value);
    else if (key.startsWith("on") && typeof value === "function") node.addEventListener(key.slice(2), value);
    else node.setAttribute(key, value === true ? "" : String(value));
  }
  add(node, children);
  return node;
}

export function add(node, children) {
  for (const child of children.flat(Infinity)) {
    if (child == null || child === false) continue;
    node.append(child instanceof Node ? child : document.createTextNode(String(child)));
  }
  return node;
}

/** Replace the children of `node` with `children`. */
export function fill(node, ...children) {
  node.replaceChildren();
  return add(node, children);
}
