/* <div data-stagewright> placeholders, for wikis that drop unknown tags:
 * each becomes a <stagewright-calc>, also ones added to the page later. */

export function upgradePlaceholders(root) {
  const scope = root || document;
  if (!scope.querySelectorAll) return;
  for (const div of scope.querySelectorAll("div[data-stagewright]:not([data-stagewright-ready])")) {
    div.setAttribute("data-stagewright-ready", "");
    const el = document.createElement("stagewright-calc");
    for (const a of ["readonly", "compact"]) {
      if (div.hasAttribute("data-" + a)) el.setAttribute(a, "");
    }
    // data-theme (auto, light, dark, inherit), data-views, data-view.
    for (const a of ["theme", "views", "view"]) {
      const v = div.getAttribute("data-" + a);
      if (v) el.setAttribute(a, v);
    }
    const src = div.getAttribute("data-src");
    const raw = div.getAttribute("data-design") || div.getAttribute("data-stagewright");
    const text = raw ? raw : div.textContent.trim();
    div.textContent = "";
    if (src && !text) el.setAttribute("src", src);
    div.append(el);
    if (text) el.design = text;
  }
}

export function watchPlaceholders() {
  upgradePlaceholders(document);
  if (typeof MutationObserver !== "function" || !document.documentElement) return;
  const mo = new MutationObserver((records) => {
    for (const r of records) {
      for (const n of r.addedNodes) {
        if (n.nodeType !== 1) continue;
        if ((n.matches && n.matches("div[data-stagewright]")) || (n.querySelector && n.querySelector("div[data-stagewright]"))) {
          upgradePlaceholders(document);
          return;
        }
      }
    }
  });
  mo.observe(document.documentElement, { childList: true, subtree: true });
}
