// @ts-check
// The Export panel: the report, counts CSV, tracks and detections as files, and the counts printed.
// Each button is enabled while there is something for it to give.

import { byId, download, localStamp } from "./dom.js";

/** @typedef {import("./store.js").PageStore} PageStore */
/** @typedef {import("./core-client.js").CoreClient} CoreClient */

export class ExportsPanel {
  /**
   * @param {PageStore} store
   * @param {CoreClient} client
   */
  constructor(store, client) {
    const report = byId("export-report", HTMLButtonElement);
    const csv = byId("export-csv", HTMLButtonElement);
    const print = byId("print-counts", HTMLButtonElement);
    const tracks = byId("export-tracks", HTMLButtonElement);
    const detections = byId("export-detections", HTMLButtonElement);
    store.subscribe(["results"], () => {
      for (const b of [report, csv, print]) b.disabled = !store.results;
    });
    store.subscribe(["tracks"], () => { tracks.disabled = !store.tracks; });
    store.subscribe(["detections"], () => { detections.disabled = !store.detections; });

    report.addEventListener("click", () => { if (store.results) download("throughline-report.json", store.results.reportText, "application/json"); });
    csv.addEventListener("click", () => { if (store.results) download("counts.csv", store.results.csv, "text/csv"); });
    tracks.addEventListener("click", async () => download("tracks.txt", await client.tracksText(), "text/plain"));
    detections.addEventListener("click", async () => {
      const text = await client.detectionsText();
      // CSV has a header (after the footage's length, for boxes found in footage).
      const isCsv = /^(# [^\n]*\n)?frame,/.test(text);
      download(isCsv ? "detections.csv" : "detections.txt", text, isCsv ? "text/csv" : "text/plain");
    });
    print.addEventListener("click", () => window.print());
    // Printing (or saving as PDF from the print dialogue) shows the results alone, headed with what
    // they were counted from; the report's caution is part of them.
    window.addEventListener("beforeprint", () => {
      const footage = store.footage ? store.footage.name : "no footage opened";
      const when = localStamp(new Date());
      byId("print-head", HTMLElement).textContent = `Throughline counts · footage: ${footage} · plan: ${store.planName} · printed ${when}`;
    });
  }
}
