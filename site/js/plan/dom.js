// Tiny DOM builders. Text only ever goes in through textContent (no markup
// parsing anywhere), so user input and engine strings cannot become markup.
//
//   el("p", {class: "note", id: "x"}, "some text", el("strong", {}, "bold"))
//   svg("rect", {x: 0, width: 37.1, class: "seg-best"})
//
// Props: `class`, `text`, `hidden` (boolean), `dataset` (object), `value` and
// `checked` (set as properties), `on<event>` (listener); anything else is set with setAttribute (true -> "", and
// null/undefined/false leave it out). Never pass "style": the page's policy
// refuses style attributes; use classes.

export function el(tag, props = {}, ...children) {
  return fill(document.createElement(tag), props, children);
}

const SVG_NS = "http://www.w3.org/2000/svg";

export function svg(tag, props = {}, ...children) {
  return fill(document.createElementNS(SVG_NS, tag), props, children);
}

function fill(node, props, children) {
  for (const [key, value] of Object.entries(props || {})) {
    if (value == null || value === false) continue;
    if (key === "class") node.setAttribute("class", value);
    else if (key === "text") node.textContent = String(value);
    else if (key === "hidden") node.hidden = Boolean(value);
    else if (key === "dataset") Object.assign(node.dataset, value);
    else if (key === "value") node.value = String(value);
    else if (key === "checked") node.checked = Boolean(value);
    else if (key.startsWith("on") && typeof value === "function") {
      node.addEventListener(key.slice(2), value);
    } else node.setAttribute(key, value === true ? "" : String(value));
  }
  append(node, children);
  return node;
}

/** Append children: nodes, strings (as text), arrays, null/false (skipped). */
export function append(node, children) {
  for (const child of children.flat(Infinity)) {
    if (child == null || child === false) continue;
    node.append(child instanceof Node ? child : document.createTextNode(String(child)));
  }
  return node;
}

/** Replace all children of `node`. */
export function replaceChildren(node, ...children) {
  node.replaceChildren();
  return append(node, children);
}

/** Set an attribute only when it changes (keeps focus and selection calm). */
export function setAttr(node, name, value) {
  if (value == null || value === false) {
    if (node.hasAttribute(name)) node.removeAttribute(name);
  } else {
    const text = value === true ? "" : String(value);
    if (node.getAttribute(name) !== text) node.setAttribute(name, text);
  }
}

/** Set textContent only when it changes. */
export function setText(node, text) {
  const t = String(text ?? "");
  if (node.textContent !== t) node.textContent = t;
}
