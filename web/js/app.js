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
import { byId } from "./dom.js";

const src = sources();
const client = new CoreClient(src.worker, src.wasm);
const store = new PageStore(window.localStorage);
const messages = new Messages(byId("messages", HTMLElement));
client.ready.catch((e) => messages.say("engine", "error", `The counting engine did not start: ${e.message}. Try a current Chromium, Firefox or Safari.`));

const planSync = new PlanSync(store, client);
const picture = new Picture(store, messages);
new OverlayView(store);
new Workspace(store);
const files = new FilesPanel(store, client, messages);
const demo = new Demo(src.demo, store, files, messages);
const planPanel = new PlanPanel(store, messages, { demoAgain: () => demo.open(true) });
const focusGround = (/** @type {number} */ i) => planPanel.focusGround(i);
new CoordsForm(store, { focusGround });
const editor = new Editor(byId("overlay", HTMLCanvasElement), store, { focusGround });
new FindPanel(store, client, messages, picture);
new RunPanel(store, client, messages, planSync);
new Review(store, picture);
new ResultsPanel(store, (name) => {
  const method = client.facts ? client.facts.methods.find((m) => m.name === name) : undefined;
  return method ? method.label : name;
});
new ExportsPanel(store, client);
bindShortcuts(store, picture, editor);

if (store.restored) planSync.send();
store.toolChosen("select");
await demo.open(false);
document.body.dataset.ready = "true";
