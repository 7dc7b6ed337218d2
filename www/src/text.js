/* Values as a field holds them. */

/** "4.7 kΩ" as a field holds it beside its unit: "4.7k" (µ as u, so that
 * it types on any keyboard). */
export function shortText(text, unit) {
  const t = unit && text.endsWith(unit) ? text.slice(0, -unit.length) : text;
  return t.replace(/\s+/g, "").replace(/µ/g, "u");
}
