/* Design documents as plain objects: own keys only, paths into the
 * blocks, deep copies, numbers kept as numbers, and the documented key
 * order. */

import { FORMAT, TOP_ORDER } from "./schema.js";

/** `obj[key]` when `key` is the object's own property, else undefined: a
 * key that comes from a design ("constructor", "__proto__") never reaches
 * a prototype's member. */
export function own(obj, key) {
  return typeof key === "string" && Object.prototype.hasOwnProperty.call(obj, key) ? obj[key] : undefined;
}

export function getPath(obj, path) {
  let o = obj;
  for (const k of path) {
    if (o === null || typeof o !== "object") return undefined;
    o = o[k];
  }
  return o;
}

export function setPath(obj, path, value) {
  let o = obj;
  for (const k of path.slice(0, -1)) {
    if (o[k] === null || typeof o[k] !== "object" || Array.isArray(o[k])) o[k] = {};
    o = o[k];
  }
  const last = path[path.length - 1];
  if (value === undefined) delete o[last];
  else o[last] = value;
}

export function clone(v) {
  return v === undefined ? undefined : JSON.parse(JSON.stringify(v));
}

/** Plain numbers are stored as numbers, anything else as the text typed. */
export function storedValue(text) {
  return /^[+-]?(\d+\.?\d*|\.\d+)(e[+-]?\d+)?$/i.test(text) ? Number(text) : text;
}

/** The design with its keys in the documented order, empty blocks dropped. */
export function ordered(design) {
  const out = { format: FORMAT };
  for (const k of TOP_ORDER) {
    if (k === "format" || design[k] === undefined) continue;
    const v = design[k];
    if (v && typeof v === "object" && !Array.isArray(v) && Object.keys(v).length === 0) continue;
    out[k] = v;
  }
  for (const k of Object.keys(design)) if (!(k in out) && k !== "format") out[k] = design[k];
  return out;
}
