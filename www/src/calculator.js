/* The calculator's entry point (dist/stagewright.html and .js): the
 * element without the designer's views. */

// The order of the bundle: the wasm's base64 first, then the styles, then
// the code, so that the code stays in one stretch that gzip's window
// covers (the wasm between two modules costs about 0.5 KB of gzip).
import "stagewright:wasm";
import "./styles.css";
import { StagewrightCalc, defineElement } from "./element.js";

defineElement(StagewrightCalc);
