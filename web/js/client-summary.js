// @ts-check
// The client summary (Results): one printable page the core writes (`summary_html`, the same
// bytes as `throughline run --site … --still …` writes), with a still of the footage taken here
// from the frame shown. It is shown in the page (its own styles give way to the page's, whose
// policy forbids inline styles), printed alone (or saved as PDF from the print dialogue), and
// downloaded as the self-contained HTML file, named from the site and date.

import { byId, download } from "./dom.js";
import { handinContext, REFUSED } from "./handin-panel.js";
import { projectFileName, projectUnsaved } from "./project-panel.js";

/** @typedef {import("./store.js").PageStore} PageStore */
/** @typedef {import("./core-client.js").CoreClient} CoreClient */
/** @typedef {import("./picture.js").Picture} Picture */
/** @typedef {import("./handin-panel.js").HandinPanel} HandinPanel */

/** JPEG quality of the still: small enough to mail, sharp enough to read the site. */
const STILL_QUALITY = 0.9;

/**
 * The frame the picture shows, as a JPEG `data:` URL; null without playable footage.
 * @param {HTMLVideoElement} video
 */
export function stillOf(video) {
  if (!video.videoWidth || !video.videoHeight) return null;
  const canvas = document.createElement("canvas");
  canvas.width = video.videoWidth;
  canvas.height = video.videoHeight;
  const g = canvas.getContext("2d");
  if (!g) return null;
  g.drawImage(video, 0, 0, canvas.width, canvas.height);
  return canvas.toDataURL("image/jpeg", STILL_QUALITY);
}

/**
 * The summary's body as nodes of this page. Its head (own style sheet and policy) is left out; the
 * core writes no inline `style` attribute (colours are SVG fills), so the page's policy holds.
 * @param {string} html
 * @returns {Node[]}
 */
export function summaryNodes(html) {
  const body = html.slice(html.indexOf("<body>") + 6, html.lastIndexOf("</body>"));
  const doc = new DOMParser().parseFromString(`<!doctype html><html><head></head><body>${body}</body></html>`, "text/html");
  return [...doc.body.childNodes].map((n) => document.importNode(n, true));
}

export class ClientSummary {
  /**
   * @param {PageStore} store
   * @param {CoreClient} client
   * @param {Picture} picture
   * @param {HandinPanel} handin gives the files' stem
   */
  constructor(store, client, picture, handin) {
    this.store = store;
    this.client = client;
    this.picture = picture;
    this.handin = handin;
    this.card = byId("summary-card", HTMLElement);
    this.view = byId("client-summary", HTMLElement);
    this.status = byId("summary-status", HTMLElement);
    this.printButton = byId("print-summary", HTMLButtonElement);
    this.downloadButton = byId("download-summary", HTMLButtonElement);
    /** The summary shown, as the core wrote it, or "" when there is none (or the counts changed since). */
    this.html = "";
    byId("make-summary", HTMLButtonElement).addEventListener("click", () => this.make());
    this.printButton.addEventListener("click", () => {
      document.body.dataset.print = "summary";
      window.print();
    });
    this.downloadButton.addEventListener("click", () => {
      const stem = this.handin.sheets ? this.handin.sheets.stem : "counts";
      if (this.html) download(`${stem}_summary.html`, this.html, "text/html");
    });
    store.subscribe(["results", "site", "prints", "checks"], () => this.forget());
    store.subscribe(["planProblem"], () => {
      if (store.planRefused) this.forget();
    });
  }

  /** The counts (or what heads them) changed: the summary made before is not theirs. */
  forget() {
    this.card.hidden = !this.store.results;
    if (!this.html) return;
    this.html = "";
    this.view.hidden = true;
    this.view.replaceChildren();
    this.printButton.disabled = true;
    this.downloadButton.disabled = true;
    this.status.textContent = "The counts or their details changed: make the summary again.";
  }

  async make() {
    if (!this.store.results) return;
    if (this.store.planRefused) {
      this.status.textContent = REFUSED;
      return;
    }
    this.picture.pause();
    const still = this.store.video.playable ? stillOf(this.picture.video) : null;
    const context = handinContext(this.store);
    if (still) context.still = still;
    try {
      this.html = await this.client.summaryHtml(context);
    } catch (e) {
      this.status.textContent = `The summary could not be made: ${/** @type {Error} */ (e).message}`;
      return;
    }
    this.view.replaceChildren(...summaryNodes(this.html));
    this.view.hidden = false;
    this.view.dataset.frame = String(this.store.frame);
    this.printButton.disabled = false;
    this.downloadButton.disabled = false;
    const from = still ? `with the still of frame ${this.store.frame}` : "without a still (no footage open)";
    const save = projectUnsaved(this.store) ? ` It names ${projectFileName(this.store.work.site)} as what reproduces the counts: save the project (Set up, Files) so that file holds the work as it is now.` : "";
    this.status.textContent = `Summary made ${from}. Print it, or save it as PDF from the print dialogue; Download gives the page as one file.${save}`;
  }
}
