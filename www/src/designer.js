/* The offline designer's entry point (dist/stagewright-designer.html and
 * .js): the element with the "from requirements" and tolerance views, on
 * an engine built with the cargo feature `extras`. */

// The order of the bundle: the wasm's base64 first, then the styles, then
// the code, so that the code stays in one stretch that gzip's window
// covers (the wasm between two modules costs about 0.5 KB of gzip).
import "stagewright:wasm";
import "./styles.css";
import { StagewrightCalc, defineElement } from "./element.js";
import { withViews } from "./views/index.js";

defineElement(withViews(StagewrightCalc));
