// "Where does this one rank so far?" — the rank control for rank-only scenarios.
//
// A group of native radio buttons ("1st (best so far)", "2nd", ..., up to the
// number seen including this one), so arrow keys, Space, touch and screen
// readers work as they do for any radio group. Past SHOWN choices the rest
// are reached with a number box ("Other rank").

import { h } from "./dom.js";
import { ordinal } from "./model.js";

/** How many choices are shown as buttons before the number box takes over. */
export const SHOWN = 12;

/** [{value, text}] for the candidate at `stage` (1-based). */
export function rankChoices(stage) {
  const n = stage <= SHOWN ? stage : SHOWN - 2;
  const out = [];
  for (let j = 1; j <= n; j++) {
    let text = ordinal(j);
    if (j === 1) text += " (best so far)";
    else if (j === stage) text += " (worst so far)";
    out.push({ value: j, text });
  }
  return out;
}

/**
 * The control. `value`: the chosen rank or null; `otherText`: what is typed
 * in the number box; `onChoose(rank)` / `onOther(text)` report changes;
 * `errorId`: id of the message describing a problem, or null.
 */
export function buildRanker({ stage, value, otherText = "", onChoose, onOther, errorId = null }) {
  const choices = rankChoices(stage);
  const radios = choices.map(({ value: j, text }) =>
    h("label", { class: "cmp-rank" },
      h("input", {
        type: "radio",
        name: "cmp-rank",
        value: j,
        checked: value === j,
        dataset: { focusKey: `rank-${j}` },
        onchange: () => onChoose(j),
      }),
      h("span", { class: "cmp-rank-text" }, text)));
  const more = stage > choices.length;
  let other = null;
  if (more) {
    const id = "cmp-rank-other";
    other = h("div", { class: "cmp-rank-other" },
      h("label", { for: id }, `Other rank (${choices.length + 1}–${stage}, ${stage} = worst so far)`),
      h("input", {
        id,
        type: "text",
        inputmode: "numeric",
        autocomplete: "off",
        value: otherText,
        dataset: { focusKey: "rank-other" },
        "aria-describedby": errorId,
        oninput: (e) => onOther(e.target.value),
      }));
  }
  const legend = stage === 1
    ? "Where does this one rank so far? (The first candidate is the best so far.)"
    : `Where does this one rank among the ${stage} seen so far, this one included?`;
  return h("fieldset", { class: "cmp-ranker", "aria-describedby": errorId },
    h("legend", {}, legend),
    h("div", { class: "cmp-ranks" }, radios),
    other);
}
