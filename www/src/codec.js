/* Designs as text: the `#design=` link code (base64url of the JSON), the
 * text the engine reads (designText), and JSON and attributes made safe
 * for the share panel's HTML recipes. */

import { ordered } from "./design.js";

function utf8ToBase64Url(text) {
  const bytes = new TextEncoder().encode(text);
  let bin = "";
  for (let i = 0; i < bytes.length; i += 0x8000) {
    bin += String.fromCharCode.apply(null, bytes.subarray(i, i + 0x8000));
  }
  return btoa(bin).replace(/\+/g, "-").replace(/\//g, "_").replace(/=+$/, "");
}

function base64UrlToUtf8(text) {
  const b64 = text.replace(/-/g, "+").replace(/_/g, "/").replace(/\s+/g, "");
  const bin = atob(b64 + "===".slice((b64.length + 3) % 4));
  const bytes = new Uint8Array(bin.length);
  for (let i = 0; i < bin.length; i++) bytes[i] = bin.charCodeAt(i);
  return new TextDecoder().decode(bytes);
}

/** Encodes a design for a `#design=` fragment. */
export function encodeDesign(design) {
  return utf8ToBase64Url(JSON.stringify(ordered(design)));
}

/** The JSON text of a design given as JSON text, as a `#design=` link code
 * (base64url of the JSON) or as an object (serialised). The text is read
 * by the engine, the command line's own reader, before anything uses it
 * (see `_loadText`); this only turns the source into text. Throws an Error
 * with a message fit to show. */
export function designText(source) {
  if (typeof source === "string") {
    const text = source.trim();
    if (text.startsWith("{") || text === "") return text;
    try {
      return base64UrlToUtf8(text);
    } catch (e) {
      throw new Error("the design text is neither JSON nor a design link code");
    }
  }
  if (source === null || typeof source !== "object" || Array.isArray(source)) {
    throw new Error("a design must be a JSON object, or its text");
  }
  try {
    return JSON.stringify(source);
  } catch (e) {
    throw new Error("the design object cannot be written as JSON: " + e.message);
  }
}

/** JSON for inside an HTML <script> element: no "</" or "<!--". */
export function jsonForScript(design) {
  return JSON.stringify(ordered(design), null, 2).replace(/</g, "\\u003c");
}

export function escapeAttr(text) {
  return String(text).replace(/&/g, "&amp;").replace(/"/g, "&quot;").replace(/</g, "&lt;").replace(/>/g, "&gt;");
}
