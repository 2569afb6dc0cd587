// Starts the engine worker as soon as the page is parsed. index.html loads
// this module on its own with `async`, so Pyodide begins to boot while the
// page's other modules are still on their way (they import `engine` from
// here: one module, one worker).
import { createEngine } from "./engine.js";

export const engine = createEngine();
