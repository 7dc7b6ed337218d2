/* The offline designer's views, on top of the element: "from
 * requirements" (spec.js) and tolerances (tolerance.js), built at the end
 * of the results column. Only in the designer (src/designer.js), whose
 * engine has the cargo feature `extras`; the calculator leaves them out
 * for its size budget (DEVELOPERS.md, "Size"). */

import { withSpecView } from "./spec.js";
import { withToleranceView } from "./tolerance.js";

/** The element with both views (src/designer.js defines it). */
export const withViews = (Base) => class extends withToleranceView(withSpecView(Base)) {
  /** Builds both views at the end of the results column. */
  _buildViews(column) {
    this._specView = this._buildSpecView();
    this._tolView = this._buildToleranceView();
    column.append(this._specView, this._tolView);
    if (this._api) this._fillSpecPresets(this._api);
  }
};
