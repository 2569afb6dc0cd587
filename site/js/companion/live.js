// Plugs the live view into the page: registers it with views.js, which
// mounts it into <section id="view-live"> the first time "Live search" is
// chosen (see the HOOK comment at the top of app.js). app.js needs one line:
//   import "./companion/live.js";

import { registerView } from "../views.js";
import { mountCompanion } from "./view.js";

let view = null;

registerView("live", {
  mount(section, ctx) {
    view = mountCompanion(section, {
      engine: ctx.engine,
      // The scenario the plan form describes now (the engine checks it when a search starts).
      getScenario: () => ctx.getPlan().scenario,
      // The plan view's SolveResult when it answers exactly that scenario, else null.
      getSolved: () => {
        const plan = ctx.getPlan();
        return plan.upToDate ? plan.result : null;
      },
    });
  },
  show() {
    if (view) view.refresh();
  },
});
