/* The Share panel: the link, the three wiki recipes (script and element,
 * frame, placeholder), copying, downloading the design file and opening
 * one. Methods of the element. */

import { encodeDesign, escapeAttr, jsonForScript } from "./codec.js";
import { h } from "./dom.js";
import { asFieldError } from "./engine.js";

/** Where this script was loaded from, if known: read while it runs. */
const SCRIPT_URL = (document.currentScript && document.currentScript.src) || "";

/** Shown by a recipe-1 element until the script runs. */
export const FALLBACK_TEXT = "<p>The Stagewright calculator appears here when stagewright.js has loaded " +
  "(under a Content-Security-Policy, its script-src must allow that script and 'wasm-unsafe-eval').</p>";

/** The host page's listener of the framed page's height messages. */
export const FRAME_LISTENER = 'addEventListener("message", (e) => {\n' +
  '  if (!e.data || e.data.stagewright !== "height") return;\n' +
  '  for (const f of document.querySelectorAll("iframe.stagewright")) {\n' +
  '    if (f.contentWindow === e.source) f.style.height = e.data.height + "px";\n' +
  '  }\n' +
  '});';

/** The Share panel's methods, mixed into the element (element.js). */
export const withShare = (Base) => class extends Base {
  _buildShare() {
    const id = this._id;
    const linkBox = h("input", { type: "text", readonly: true, class: "link-box", "aria-label": "link to this design" });
    const fileInput = h("input", { type: "file", accept: ".json,application/json", hidden: true });
    fileInput.addEventListener("change", () => {
      const file = fileInput.files && fileInput.files[0];
      if (file) this._openFile(file);
      fileInput.value = "";
    });
    const btn = (text, cls, fn) => {
      const b = h("button", { type: "button", class: cls }, text);
      b.addEventListener("click", fn);
      return b;
    };
    const snippets = {};
    const snippetBlock = (key, title, help) => {
      const ta = h("textarea", { readonly: true, rows: 4, class: "snippet", id: id("s-" + key), spellcheck: "false" });
      snippets[key] = ta;
      return h("div", { class: "recipe" },
        h("label", { for: ta.id }, h("strong", null, title), " ", help),
        ta,
        btn("Copy", "small", () => this._copy(ta.value, ta, "Snippet copied.")));
    };
    this._snippets = snippets;
    this._linkBox = linkBox;
    this._fileInput = fileInput;
    const copyLink = btn("Copy link", "linking", () => this._copy(this._shareLink(), linkBox, "Link copied."));
    const panel = h("div", { class: "share-panel" },
      h("div", { class: "share-row" },
        copyLink,
        btn("Download design", "", () => this._download()),
        btn("Open design file…", "editing", () => fileInput.click()),
        btn("Print", "", () => window.print())),
      linkBox,
      fileInput,
      h("h4", null, "Put this calculator in a wiki page"),
      h("p", { class: "hint" }, "Replace the file locations with wherever you keep stagewright.js or stagewright.html."),
      snippetBlock("script", "1. Script and element.", "Load the script once per page, then place elements."),
      snippetBlock("iframe", "2. Frame.", "Shows the standalone page; the short script sizes the frame to its content (leave it out for a fixed 1500 px)."),
      snippetBlock("div", "3. Placeholder.", "For wikis that remove unknown tags: the script turns each such div into a calculator."),
      h("p", { class: "hint" }, "A page with a Content-Security-Policy needs this in its policy for ways 1 and 3:"),
      h("code", { class: "csp" }, "Content-Security-Policy: script-src 'self' 'wasm-unsafe-eval'"));
    const details = h("details", { class: "share" }, h("summary", null, "Share"), panel);
    details.addEventListener("toggle", () => {
      if (details.open) this._refreshShare();
    });
    this._shareDetails = details;
    return details;
  }

  _shareLink() {
    const base = this.getAttribute("share-url") || (location.href.split("#")[0]);
    return `${base}#design=${encodeDesign(this._exportDesign())}`;
  }

  _refreshShare() {
    const design = this._exportDesign();
    // A link reopens the design only on the standalone page (or a page
    // named by share-url), which reads the #design= fragment.
    const linkable = this.hasAttribute("page") || this.hasAttribute("share-url");
    this._frame.classList.toggle("no-link", !linkable);
    this._linkBox.value = linkable ? this._shareLink() : "";
    const scriptUrl = this.getAttribute("script-url") || SCRIPT_URL || "stagewright.js";
    const pageUrl = this.getAttribute("share-url") || (this.hasAttribute("page") ? location.href.split("#")[0] : "stagewright.html");
    const title = typeof design.title === "string" && design.title ? design.title : "amplifier stage";
    // Recipe 1 inside a <div>: Markdown processors pass an HTML block
    // through untouched, where they would wrap the element's tags in <p>.
    // The text inside the element shows only until the script has run,
    // so a page whose script is missing or blocked says so in place.
    this._snippets.script.value =
      `<script src="${escapeAttr(scriptUrl)}"></script>\n` +
      `<div class="stagewright">\n<stagewright-calc>\n${FALLBACK_TEXT}\n` +
      `<script type="application/json">\n${jsonForScript(design)}\n</script>\n</stagewright-calc>\n</div>`;
    // The standalone page posts its height to the frame's parent; the
    // listener sizes the frame to it (without it the frame keeps 1500 px).
    this._snippets.iframe.value =
      `<iframe class="stagewright" src="${escapeAttr(pageUrl)}#design=${encodeDesign(design)}" title="Stagewright: ${escapeAttr(title)}" ` +
      `width="100%" height="1500" loading="lazy" style="border:0"></iframe>\n` +
      `<script>\n${FRAME_LISTENER}\n</script>`;
    this._snippets.div.value =
      `<div data-stagewright data-design="${encodeDesign(design)}"></div>\n` +
      `<script src="${escapeAttr(scriptUrl)}"></script>`;
  }

  async _copy(text, box, done) {
    let ok = false;
    try {
      if (navigator.clipboard && window.isSecureContext) {
        await navigator.clipboard.writeText(text);
        ok = true;
      }
    } catch (e) {
      ok = false;
    }
    if (!ok && box) {
      box.value = text;
      box.focus();
      box.select();
      try {
        ok = document.execCommand("copy");
      } catch (e) {
        ok = false;
      }
    }
    if (box && box === this._linkBox) box.value = text;
    this._status.textContent = ok ? done : "Copying was refused; the text is selected so you can copy it yourself.";
  }

  _download() {
    const design = this._exportDesign();
    const json = JSON.stringify(design, null, 2) + "\n";
    this._saveBlob(new Blob([json], { type: "application/json" }), `${this._slug()}.stagewright.json`);
    this._status.textContent = "Design file saved.";
  }

  /** The design's title as a file-name stem ("sensor-buffer"). */
  _slug() {
    const title = this._design && typeof this._design.title === "string" ? this._design.title : "";
    return title.toLowerCase().replace(/[^a-z0-9]+/g, "-").replace(/^-+|-+$/g, "").slice(0, 60) || "stage";
  }

  /** Offers `blob` for download as `name` (a blob: link, clicked). */
  _saveBlob(blob, name) {
    const url = URL.createObjectURL(blob);
    const a = h("a", { href: url, download: name });
    this.shadowRoot.append(a);
    a.click();
    a.remove();
    setTimeout(() => URL.revokeObjectURL(url), 10000);
  }

  _openFile(file) {
    const reader = new FileReader();
    reader.onload = () => {
      const api = this._api;
      let text;
      try {
        // The engine checks the bytes are UTF-8, with the command line's message.
        const bytes = new Uint8Array(reader.result);
        text = api && typeof api.utf8_text === "function"
          ? api.utf8_text(bytes)
          : new TextDecoder("utf-8", { fatal: true }).decode(bytes);
      } catch (err) {
        this._showLoadError(`${file.name}: ${asFieldError(err).message}`);
        return;
      }
      const before = this._design;
      this._loadText(text);
      if (this._design !== before) this._status.textContent = `Opened ${file.name}.`;
    };
    reader.onerror = () => this._showLoadError(`${file.name} could not be read`);
    reader.readAsArrayBuffer(file);
  }
};
