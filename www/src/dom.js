/* Small DOM helpers: h() for HTML elements, sv() for SVG ones, and the
 * quantity symbols with subscripts (sym, symNodes). Attribute values go
 * through setAttribute and strings become text nodes, never HTML. */

const SVG_NS = "http://www.w3.org/2000/svg";

/** Creates an element; `attrs` values are set with setAttribute, children
 * that are strings become text nodes. */
export function h(tag, attrs, ...children) {
  const el = document.createElement(tag);
  if (attrs) {
    for (const [k, v] of Object.entries(attrs)) {
      if (v === false || v === null || v === undefined) continue;
      el.setAttribute(k, v === true ? "" : String(v));
    }
  }
  for (const c of children.flat()) {
    if (c === null || c === undefined || c === false) continue;
    el.append(typeof c === "string" ? document.createTextNode(c) : c);
  }
  return el;
}

/** Creates an SVG element under `parent`. */
export function sv(tag, attrs, parent) {
  const el = document.createElementNS(SVG_NS, tag);
  if (attrs) {
    for (const [k, v] of Object.entries(attrs)) {
      if (v !== null && v !== undefined) el.setAttribute(k, String(v));
    }
  }
  if (parent) parent.appendChild(el);
  return el;
}

/** A quantity symbol with a subscript, sym("I", "C") for I<sub>C</sub>;
 * kept as data, made into nodes per element by symNodes. */
export function sym(main, sub) {
  return [main, sub || ""];
}

export function symNodes([main, sub]) {
  return sub ? [main, h("sub", null, sub)] : [main];
}

/** Sets an element's text only when it differs, and by changing its one
 * text node's data where it has one: the browser then lays the text out
 * again without rebuilding the element's style and layout tree (a
 * textContent assignment makes a new text node, which costs both). */
export function setText(el, text) {
  const only = el.firstChild;
  if (only && only === el.lastChild && only.nodeType === 3) {
    if (only.data !== text) only.data = text;
  } else if (el.textContent !== text) {
    el.textContent = text;
  }
}

/** Makes `parent`'s children equal to `nodes` (freshly built, detached),
 * keeping every existing child that is already equal to its new one, so
 * that a table redrawn after an edit restyles only the rows that changed. */
export function syncChildren(parent, nodes) {
  let i = 0;
  for (; i < nodes.length; i++) {
    const old = parent.children[i];
    if (!old) parent.append(nodes[i]);
    else if (!old.isEqualNode(nodes[i])) old.replaceWith(nodes[i]);
  }
  while (parent.children.length > nodes.length) parent.lastElementChild.remove();
}
