/* The entry point of dist/stagewright.html and dist/stagewright.js: the
 * element with every view (calculator, from requirements, tolerances).
 * The engine starts compiling as soon as the script runs, before any
 * element is connected. */

// The order of the bundle: the wasm's base64 first, then the styles, then
// the code, so that the code stays in one stretch that gzip's window
// covers (the wasm between two modules costs about 0.5 KB of gzip).
import "stagewright:wasm";
import "./styles.css";
import { StagewrightCalc, defineElement } from "./element.js";
import { loadEngine } from "./engine.js";
import { withViews } from "./views/index.js";

loadEngine();
defineElement(withViews(StagewrightCalc));
