// @ts-check
// The page's entry: makes the store, the client of the core's worker, the views and panels, and
// wires them together. Nothing here counts or tracks; the core does, exactly as on the command line.
// Nothing here keeps state either: the store does (store.js), and each panel shows its part of it.

import { sources, Demo } from "./demo.js";
import { CoreClient } from "./core-client.js";
import { PageStore } from "./store.js";
import { Messages } from "./messages.js";
import { PlanSync } from "./plan-sync.js";
import { Picture } from "./picture.js";
import { OverlayView } from "./overlay-view.js";
import { Workspace } from "./workspace.js";
import { FilesPanel } from "./files-panel.js";
import { PlanPanel } from "./plan-panel.js";
import { CoordsForm } from "./coords-form.js";
import { Editor } from "./editor.js";
import { FindPanel } from "./find-panel.js";
import { RunPanel } from "./run-panel.js";
import { Review } from "./review.js";
import { ResultsPanel } from "./results.js";
import { ExportsPanel } from "./exports-panel.js";
import { bindShortcuts } from "./shortcuts.js";
import { EditSync } from "./edit-sync.js";
import { Evidence } from "./evidence.js";
import { EvidenceSheet } from "./evidence-sheet.js";
import { ProjectPanel } from "./project-panel.js";
import { TallyPanel } from "./tally-panel.js";
import { TallyChecks } from "./tally-checks.js";
import { HandinPanel } from "./handin-panel.js";
import { MergedPanel } from "./merged-panel.js";
import { ClientSummary } from "./client-summary.js";
import { byId, el } from "./dom.js";

const src = sources();
const client = new CoreClient(src.worker, src.wasm);
const store = new PageStore(window.localStorage);
const messages = new Messages(byId("messages", HTMLElement));
client.ready.catch((e) => messages.say("engine", "error", `The counting engine did not start: ${e.message}. Try a current Chromium, Firefox or Safari.`));

const planSync = new PlanSync(store, client);
const editSync = new EditSync(store, client, messages);
const picture = new Picture(store, messages);
new OverlayView(store, client);
new Workspace(store);
const files = new FilesPanel(store, client, messages);
const demo = new Demo(src.demo, store, files, messages);
const planPanel = new PlanPanel(store, messages, { demoAgain: () => demo.open(true) });
client.ready.then(() => { if (client.facts) planPanel.showDefaults(client.facts); }).catch(() => {});
const focusGround = (/** @type {number} */ i) => planPanel.focusGround(i);
new CoordsForm(store, { focusGround });
const editor = new Editor(byId("overlay", HTMLCanvasElement), store, { focusGround });
new FindPanel(store, client, messages, picture);
const project = new ProjectPanel(store, client, messages);
files.openProject = (text, name) => project.open(text, name);
new RunPanel(store, client, messages, planSync, editSync);
const evidence = new Evidence(store);
const review = new Review(store, picture, client, evidence);
new EvidenceSheet(store, evidence);
new ResultsPanel(store, (name) => {
  const method = client.facts ? client.facts.methods.find((m) => m.name === name) : undefined;
  return method ? method.label : name;
});
new ExportsPanel(store, client);
const tally = new TallyPanel(store, picture);
new TallyChecks(store, review);
const handin = new HandinPanel(store, client);
new MergedPanel(client);
new ClientSummary(store, client, picture, handin);
bindShortcuts(store, picture, editor, review, tally);

if (store.restored) planSync.send();
if (store.work.edits.length || store.work.extras.tallies || store.work.extras.correction) editSync.send();
store.toolChosen("select");
// A plan of the person's own kept from last time: their work goes on, on their files, not over
// the demo's (a newcomer's re-trial: a reload put their line over the demo's boxes and offered
// to run them).
const ownPlan = store.restored && store.plans.source !== "demo" && store.plans.source !== "demo-edited";
if (ownPlan) sayOwnPlanKept();
else await demo.open(false);
if (store.workRestored) sayWorkKept();
if (store.handCount.resume()) sayTallyResumed();
document.body.dataset.ready = "true";

/** After a reload on a plan of the person's own: their files are to open again. */
function sayOwnPlanKept() {
  const demoAgain = el("button", { type: "button", text: "Open the demo", onclick: () => { messages.clear("own-plan-kept"); demo.open(true); } });
  messages.say("own-plan-kept", "ok", "Your plan is kept from last time (this browser keeps it for this address). Open your footage and detections again under Set up, Files, to go on, or open the bundled demo instead:", [demoAgain]);
  // Out of date once detections are open again (a newcomer's trial: it stayed after the files were
  // open and Run done, and on a phone pushed the tabs down).
  const stop = store.subscribe(["detections"], () => {
    if (!store.detections) return;
    messages.clear("own-plan-kept");
    stop();
  });
}

/** After a reload: the corrections, decisions and hand counts are back, and wait for tracks to apply to. */
function sayWorkKept() {
  const n = store.work.edits.length;
  const m = store.work.marks.size;
  const t = (store.work.extras.tallies || []).length;
  const parts = [`${n} correction${n === 1 ? "" : "s"}`, `${m} review decision${m === 1 ? "" : "s"}`];
  if (t) parts.push(`${t} hand count${t === 1 ? "" : "s"}`);
  const what = `${parts.slice(0, -1).join(", ")} and ${parts[parts.length - 1]}`;
  const run = el("button", { type: "button", text: "Run now", onclick: () => { messages.clear("work-kept"); byId("run", HTMLButtonElement).click(); } });
  const open = store.detections ? "Press Run to track again" : "Open the same detections (and footage), then press Run";
  messages.say("work-kept", "ok", `Your ${what} are kept from last time. ${open}: they are applied to the new tracks.`, store.detections ? [run] : []);
  // Out of date once the work is applied to new tracks' counts.
  const stop = store.subscribe(["results"], () => {
    if (!store.results) return;
    messages.clear("work-kept");
    stop();
  });
}

/** After a reload in the middle of a hand count: it goes on, its presses kept. */
function sayTallyResumed() {
  const run = store.handCount.run;
  if (!run) return;
  const { who, from_frame: from, to_frame: to, presses } = run.tally;
  const go = el("button", { type: "button", text: "Show it", onclick: () => { messages.clear("tally-resumed"); store.viewChosen("review"); store.reviewTabChosen("tally"); tally.resumedShown(); } });
  messages.say("tally-resumed", "ok", `The hand count by ${who} (frames ${from} to ${to}, ${presses.length} press${presses.length === 1 ? "" : "es"} so far) was under way when the page closed: it goes on, under Review, Hand count. Open the same footage if it is not open.`, [go]);
}
