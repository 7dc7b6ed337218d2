/* The views beside the calculator: "from requirements" (spec.js) and
 * tolerances (tolerance.js), each a tab of the element (element.js builds
 * the tab bar), built the first time it is shown. */

import { withSpecView } from "./spec.js";
import { withToleranceView } from "./tolerance.js";

/** The element with every view (src/main.js defines it). */
export const withViews = (Base) => class extends withToleranceView(withSpecView(Base)) {
  _viewDefs() {
    return [...super._viewDefs(), ["requirements", "From requirements"], ["tolerances", "Tolerances"]];
  }

  _buildView(name) {
    if (name === "requirements") {
      const view = this._buildSpecView();
      if (this._api) this._fillSpecPresets(this._api);
      return view;
    }
    if (name === "tolerances") return this._buildToleranceView();
    return super._buildView(name);
  }
};
