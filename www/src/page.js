/* Standalone page: the design lives in the address, as #design=<base64url
 * of the design JSON>, so a copied address reopens the same design. */
(function () {
  "use strict";
  var el = document.querySelector("stagewright-calc[page]");
  var Calc = window.customElements && window.customElements.get("stagewright-calc");
  if (!el || !Calc) return;
  var written = "";
  // "Stagewright" or "Stagewright designer" (www/build.mjs).
  var appName = document.title;

  function fromHash() {
    var m = /^#design=(.+)$/.exec(location.hash);
    if (!m || location.hash === written) return;
    written = location.hash;
    el.design = m[1];
  }

  // The address follows the design a moment after typing stops.
  var pending = null;
  var timer = 0;
  function write() {
    timer = 0;
    var design = pending;
    pending = null;
    // The address changed from outside since it was last read or written
    // (a link followed, back or forward): that design wins, not this one.
    if (location.hash !== written && /^#design=/.test(location.hash)) {
      fromHash();
      return;
    }
    var hash = "#design=" + Calc.encodeDesign(design);
    if (hash !== location.hash) {
      written = hash;
      history.replaceState(history.state, "", hash);
    }
    document.title = (typeof design.title === "string" && design.title ? design.title + " · " : "") + appName;
  }
  el.addEventListener("stagewright-design", function (e) {
    if (!e.detail || !e.detail.design) return;
    pending = e.detail.design;
    if (!timer) timer = setTimeout(write, 250);
  });
  window.addEventListener("pagehide", function () {
    if (timer) {
      clearTimeout(timer);
      write();
    }
  });

  window.addEventListener("hashchange", fromHash);
  fromHash();

  // In a frame: the page's height, posted to the parent whenever it
  // changes, so that the host page can size the frame to it (EMBEDDING.md,
  // recipe 2). Only the height leaves the frame.
  if (window.parent !== window && typeof ResizeObserver === "function") {
    var lastHeight = 0;
    new ResizeObserver(function () {
      var height = Math.ceil(document.body.getBoundingClientRect().height);
      if (height === lastHeight) return;
      lastHeight = height;
      window.parent.postMessage({ stagewright: "height", height: height }, "*");
    }).observe(document.body);
  }
})();
