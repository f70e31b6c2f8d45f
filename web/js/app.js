// The page: wires files, the plan editor, the engine (a worker running the core) and the results
// together. Nothing here counts or tracks; the core does, exactly as on the command line.

import { Engine } from "./engine.js";
import { PlanStore, parsePlanText, planForEngine, hasCountingGeometry } from "./plan.js";
import { Editor } from "./editor.js";
import { drawOverlay } from "./overlay.js";
import { TrackView, LiveCounts } from "./tracks.js";
import { showResults } from "./results.js";
import { el, download, clockText } from "./dom.js";
import { planColour } from "./geometry.js";

const $ = (id) => document.getElementById(id);
const video = $("video");
const canvas = $("overlay");
const ctx = canvas.getContext("2d");

const state = {
  frame: 1,
  lastFrame: 1,
  videoFrames: 0,
  hasVideo: false,
  footageName: "",
  footageBlob: null, // the footage itself, for decoding in the worker
  detectionsSource: null, // the detections as a file (Blob), to give a restarted engine
  restoring: null, // while a restarted engine is given the detections and plan again
  detections: null, // summary from the core
  tracks: null, // TrackView
  report: null, // parsed report
  reportText: "",
  csv: "",
  live: null,
  selected: null,
  playing: false,
  timer: null,
  fpsSamples: [],
  lastVideoFrame: null,
};

// ---------------------------------------------------------------- messages

/** Shows a message; one per key, so a new one replaces an old one about the same thing. */
function say(key, kind, text, extra = []) {
  clear(key);
  const dismiss = el("button", { type: "button", class: "dismiss", text: "\u2715", "aria-label": "Dismiss", onclick: () => clear(key) });
  $("messages").append(el("div", { class: `message ${kind}`, "data-key": key }, [dismiss, text, ...extra]));
}
function clear(key) {
  for (const m of $("messages").querySelectorAll(".message")) if (m.dataset.key === key) m.remove();
}

// ---------------------------------------------------------------- the plan

const store = new PlanStore(window.localStorage, onPlanChange);
const saved = store.restore();
let planTimer = null;

function onPlanChange(plan, why) {
  renderPlanPanel();
  redraw();
  clearTimeout(planTimer);
  planTimer = setTimeout(sendPlan, why === "edit" ? 120 : 0);
  if (why === "file" || why === "demo") {
    say("plan-replaced", "ok", why === "file" ? "Plan opened. " : "The demo plan is back. ", [
      el("button", { type: "button", text: "Undo", onclick: () => { store.undo(); clear("plan-replaced"); } }),
    ]);
  }
}

/** Gives the plan to the core, which checks every field; counts again if there are tracks. */
async function sendPlan() {
  const { json, calibrationNote } = planForEngine(store.plan);
  $("plan-error").textContent = calibrationNote;
  try {
    const results = await engine.setPlan(json);
    if (results) takeResults(results);
  } catch (e) {
    $("plan-error").textContent = `The plan needs a fix: ${e.message}` + (calibrationNote ? `\n${calibrationNote}` : "");
  }
}

function renderPlanPanel() {
  const plan = store.plan;
  $("frame-rate").value = plan.frame_rate ?? "";
  $("start-time").value = plan.start ?? "";
  $("interval-minutes").value = plan.interval_minutes ?? 15;
  $("anchor").value = plan.anchor || "bottom";
  $("hysteresis").value = plan.rules && plan.rules.hysteresis !== undefined ? plan.rules.hysteresis : "";

  const edit = (fn) => store.change(fn, "edit");
  $("line-list").replaceChildren(
    ...plan.screenlines.map((line, i) => {
      const li = el("li", { class: state.selected === `line:${i}` ? "selected" : null }, [
        el("div", { class: "row" }, [
          el("input", { type: "text", value: line.name, "aria-label": `Name of line ${i + 1}`, onchange: (e) => edit((p) => (p.screenlines[i].name = e.target.value.trim() || line.name)) }),
          el("button", { type: "button", text: "Flip", title: "Reverse which way is forward", "aria-label": `Flip direction of ${line.name}`, onclick: () => edit((p) => p.screenlines[i].points.reverse()) }),
          el("button", { type: "button", text: "\u2715", title: "Delete", "aria-label": `Delete ${line.name}`, onclick: () => edit((p) => p.screenlines.splice(i, 1)) }),
        ]),
        el("div", { class: "row" }, [
          el("input", { type: "text", value: line.forward || "", placeholder: "forward (arrow)", "aria-label": `Forward label of ${line.name}`, onchange: (e) => edit((p) => setLabel(p.screenlines[i], "forward", e.target.value)) }),
          el("input", { type: "text", value: line.backward || "", placeholder: "backward", "aria-label": `Backward label of ${line.name}`, onchange: (e) => edit((p) => setLabel(p.screenlines[i], "backward", e.target.value)) }),
        ]),
      ]);
      li.style.setProperty("--swatch", planColour(i));
      return li;
    }),
  );
  if (!plan.screenlines.length) $("line-list").append(el("li", { class: "hint", text: "No lines yet: press Draw line, then click two points." }));

  $("zone-list").replaceChildren(
    ...plan.zones.map((zone, i) => {
      const li = el("li", { class: state.selected === `zone:${i}` ? "selected" : null }, [
        el("div", { class: "row" }, [
          el("input", { type: "text", value: zone.name, "aria-label": `Name of zone ${i + 1}`, onchange: (e) => edit((p) => (p.zones[i].name = e.target.value.trim() || zone.name)) }),
          el("button", { type: "button", text: "\u2715", title: "Delete", "aria-label": `Delete ${zone.name}`, onclick: () => edit((p) => p.zones.splice(i, 1)) }),
        ]),
      ]);
      li.style.setProperty("--swatch", planColour(plan.screenlines.length + i));
      return li;
    }),
  );

  const pairs = plan.calibration ? plan.calibration.pairs || [] : [];
  const calib = $("calibration-list");
  if (!pairs.length) {
    calib.replaceChildren(el("p", { class: "hint", text: "For speeds: add 4 or more points whose ground position you know (e.g. measured corners of paving)." }));
  } else {
    const num = (v) => (typeof v === "number" ? String(v) : "");
    const setGround = (i, k, text) => edit((p) => {
      const v = text.trim() === "" ? null : Number(text);
      p.calibration.pairs[i].ground[k] = Number.isFinite(v) ? v : null;
    });
    calib.replaceChildren(
      el("table", { class: "calib-table" }, [
        el("thead", {}, el("tr", {}, ["", "picture x, y", "ground X", "ground Y", ""].map((h) => el("th", { text: h })))),
        el("tbody", {}, pairs.map((pair, i) => el("tr", {}, [
          el("td", { text: `G${i + 1}` }),
          el("td", { text: `${pair.image[0]}, ${pair.image[1]}` }),
          el("td", {}, el("input", { type: "number", step: "any", value: num(pair.ground[0]), "aria-label": `Ground X of G${i + 1}`, "data-ground": `${i}`, onchange: (e) => setGround(i, 0, e.target.value) })),
          el("td", {}, el("input", { type: "number", step: "any", value: num(pair.ground[1]), "aria-label": `Ground Y of G${i + 1}`, onchange: (e) => setGround(i, 1, e.target.value) })),
          el("td", {}, el("button", { type: "button", text: "\u2715", "aria-label": `Delete G${i + 1}`, onclick: () => edit((p) => {
            p.calibration.pairs.splice(i, 1);
            if (!p.calibration.pairs.length) delete p.calibration;
          }) })),
        ]))),
      ]),
      el("label", {}, ["Ground unit ", el("input", { type: "text", value: plan.calibration.unit || "m", "aria-label": "Ground unit", onchange: (e) => edit((p) => (p.calibration.unit = e.target.value.trim() || "m")) })]),
    );
  }
}

function setLabel(line, key, text) {
  const t = text.trim();
  if (t) line[key] = t;
  else delete line[key];
}

function bindSetting(id, key, parse) {
  $(id).addEventListener("change", (e) => {
    const v = parse(e.target.value);
    store.change((p) => {
      if (v === null) delete p[key];
      else p[key] = v;
    }, "edit");
  });
}
bindSetting("frame-rate", "frame_rate", (v) => (v === "" ? null : Number(v)));
bindSetting("start-time", "start", (v) => (v ? (v.length === 16 ? `${v}:00` : v) : null));
bindSetting("interval-minutes", "interval_minutes", (v) => (v === "" ? null : Number(v)));
bindSetting("anchor", "anchor", (v) => v);
$("hysteresis").addEventListener("change", (e) => setHysteresis(e.target.value === "" ? null : Number(e.target.value)));

/**
 * The plan's `rules.hysteresis` (null: the default, 0.15); `zones`, when given, sets
 * `rules.zone_hysteresis` too (zone edges keep their own margin).
 */
function setHysteresis(v, zones) {
  store.change((p) => {
    const rules = { ...(p.rules || {}) };
    if (v === null) delete rules.hysteresis;
    else rules.hysteresis = v;
    if (zones !== undefined && rules.zone_hysteresis === undefined) rules.zone_hysteresis = zones;
    if (Object.keys(rules).length) p.rules = rules;
    else delete p.rules;
  }, "edit");
}

// ---------------------------------------------------------------- drawing

const editor = new Editor(canvas, store, {
  redraw,
  select(key) {
    state.selected = key;
    renderPlanPanel();
    redraw();
  },
  toolChanged(tool) {
    for (const b of document.querySelectorAll("[data-tool]")) b.setAttribute("aria-pressed", String(b.dataset.tool === tool));
    $("tool-hint").textContent = {
      select: "Drag the ends of a line or the corners of a zone to move them. Click a line to select it; Delete removes it.",
      line: "Click where the line starts, then where it ends (hold Shift to add bends, Enter to finish). The arrow shows forward.",
      zone: "Click the corners; click the first corner again or press Enter to close the zone. Escape cancels.",
      calibration: "Click a point on the ground whose position you know, then type its X and Y on the right.",
    }[tool];
  },
  focusGround(i) {
    requestAnimationFrame(() => {
      const input = document.querySelector(`[data-ground="${i}"]`);
      if (input) input.focus();
    });
  },
});
for (const b of document.querySelectorAll("[data-tool]")) b.addEventListener("click", () => editor.setTool(b.dataset.tool));

function redraw() {
  const rect = canvas.getBoundingClientRect();
  drawOverlay(ctx, {
    plan: store.plan,
    frame: state.frame,
    px: rect.width ? canvas.width / rect.width : 1,
    selected: state.selected,
    live: state.live,
    tracks: state.tracks,
    showTrails: $("show-trails").checked,
    showBoxes: $("show-boxes").checked,
    trailFrames: Math.round(2 * fps()),
    draft: editor.draft,
  });
  $("clock").textContent = `frame ${state.frame} · ${clockText((state.frame - 1) / fps())}`;
  $("scrub").value = String(state.frame);
}
window.addEventListener("resize", redraw);
$("show-trails").addEventListener("change", redraw);
$("show-boxes").addEventListener("change", redraw);

function setPictureSize(w, h) {
  if (canvas.width !== w || canvas.height !== h) {
    canvas.width = w;
    canvas.height = h;
  }
  $("stage").style.aspectRatio = `${w} / ${h}`;
  $("stage-empty").hidden = true;
  redraw();
}

// ---------------------------------------------------------------- frames and playback

function fps() {
  const f = Number(store.plan.frame_rate);
  return Number.isFinite(f) && f > 0 ? f : 25;
}

function updateFrameRange() {
  const detFrames = state.detections ? state.detections.frames : 0;
  state.lastFrame = Math.max(1, state.videoFrames, detFrames);
  $("scrub").max = String(state.lastFrame);
}

/** The middle of frame f (1-based), which is on screen from (f - 1) / fps to f / fps seconds. */
function frameTime(f) {
  return (f - 0.5) / fps();
}

/** Shows frame f. */
function seekFrame(f) {
  state.frame = Math.max(1, Math.min(state.lastFrame, Math.round(f)));
  if (state.hasVideo) video.currentTime = frameTime(state.frame);
  redraw();
}

function onVideoFrame(now, meta) {
  // While a seek is still under way, a frame presented now belongs to an earlier position: keep
  // the frame the user asked for until the seek is done.
  if (state.hasVideo && !video.seeking) {
    const f = Math.round(meta.mediaTime * fps()) + 1;
    state.frame = Math.max(1, f);
    measureFrameRate(meta);
    redraw();
  }
  video.requestVideoFrameCallback(onVideoFrame);
}
if ("requestVideoFrameCallback" in video) video.requestVideoFrameCallback(onVideoFrame);
else video.addEventListener("timeupdate", () => onVideoFrame(0, { mediaTime: video.currentTime, presentedFrames: 0 }));

/** The footage's own frame rate, from the time between frames shown one after another. */
function measureFrameRate(meta) {
  const last = state.lastVideoFrame;
  state.lastVideoFrame = meta;
  if (!state.playing || !last || meta.presentedFrames !== last.presentedFrames + 1) return;
  const dt = meta.mediaTime - last.mediaTime;
  if (dt <= 0) return;
  state.fpsSamples.push(dt);
  if (state.fpsSamples.length !== 24) return;
  const sorted = [...state.fpsSamples].sort((a, b) => a - b);
  showFrameRate(1 / sorted[sorted.length >> 1], "plays at");
}

/**
 * Compares the footage's own frame rate (`measured`, from playback or from the decoded frames'
 * times) with the plan's, and offers the correction when they differ by more than 1%: the plan's
 * rate turns frames into times and so into intervals.
 */
function showFrameRate(measured, how) {
  if (!(measured > 0 && Number.isFinite(measured))) return;
  const hint = $("fps-hint");
  if (Math.abs(measured - fps()) / fps() > 0.01) {
    hint.replaceChildren(`The footage ${how} about ${measured.toFixed(2)} fps, not ${fps()}. `,
      el("button", { type: "button", text: `Use ${measured.toFixed(2)}`, onclick: () => store.change((p) => (p.frame_rate = Number(measured.toFixed(3))), "edit") }));
  } else {
    hint.textContent = `The footage ${how} ${measured.toFixed(2)} fps, as set.`;
  }
}

function play() {
  if (state.playing) return pause();
  state.playing = true;
  $("play").textContent = "Pause";
  if (state.hasVideo) {
    video.playbackRate = Number($("speed").value);
    video.play().catch((e) => say("play", "error", `The footage would not play: ${e.message}`));
  } else {
    // No footage: step through the tracks at the plan's frame rate.
    state.timer = setInterval(() => {
      if (state.frame >= state.lastFrame) return pause();
      state.frame += 1;
      redraw();
    }, 1000 / (fps() * Number($("speed").value)));
  }
}
function pause() {
  state.playing = false;
  $("play").textContent = "Play";
  if (state.hasVideo) video.pause();
  clearInterval(state.timer);
}
video.addEventListener("ended", pause);
$("play").addEventListener("click", play);
$("step-back").addEventListener("click", () => { pause(); seekFrame(state.frame - 1); });
$("step-forward").addEventListener("click", () => { pause(); seekFrame(state.frame + 1); });
$("scrub").addEventListener("input", (e) => { pause(); seekFrame(Number(e.target.value)); });
$("speed").addEventListener("change", () => { if (state.hasVideo) video.playbackRate = Number($("speed").value); });

document.addEventListener("keydown", (e) => {
  if (e.target.closest("input, select, textarea")) return;
  // Enter and Space on a focused button press that button; they are not shortcuts there.
  if ((e.key === "Enter" || e.key === " ") && e.target.closest("button")) return;
  if ((e.ctrlKey || e.metaKey) && e.key.toLowerCase() === "z") {
    e.preventDefault();
    store.undo();
  } else if (e.key === " ") {
    e.preventDefault();
    play();
  } else if (e.key === "ArrowRight" || e.key === "ArrowLeft") {
    e.preventDefault();
    pause();
    const step = e.shiftKey ? Math.round(fps()) : 1;
    seekFrame(state.frame + (e.key === "ArrowRight" ? step : -step));
  } else if (e.key === "Enter") {
    editor.finish();
  } else if (e.key === "Escape") {
    editor.setTool("select");
  } else if ((e.key === "Delete" || e.key === "Backspace") && state.selected) {
    const [kind, i] = state.selected.split(":");
    state.selected = null;
    store.change((p) => (kind === "line" ? p.screenlines : p.zones).splice(Number(i), 1), "edit");
  }
});

// ---------------------------------------------------------------- files

function openFootage(blob, name) {
  clear("footage");
  state.footageName = name;
  state.footageBlob = blob;
  $("footage-name").textContent = name;
  state.fpsSamples = [];
  if (video.src) URL.revokeObjectURL(video.src);
  video.src = URL.createObjectURL(blob);
}

video.addEventListener("loadedmetadata", () => {
  state.hasVideo = true;
  $("find-objects").disabled = false;
  state.videoFrames = Math.round(video.duration * fps());
  updateFrameRange();
  setPictureSize(video.videoWidth, video.videoHeight);
  checkFit();
  seekFrame(1);
});
video.addEventListener("error", () => {
  state.hasVideo = false;
  $("find-objects").disabled = true;
  const name = state.footageName || "the footage";
  const stem = name.replace(/\.[^.]+$/, "");
  const why = video.error && video.error.code === 4 ? "its format or codec is not one this browser plays" : "it could not be read";
  say("footage", "error", `This browser cannot play ${name}: ${why}. Browsers play WebM (VP8, VP9, AV1) and MP4 (H.264). Convert it on this computer with ffmpeg:\n`, [
    el("code", { text: `ffmpeg -i "${name}" -c:v libvpx-vp9 -crf 32 -b:v 0 -an "${stem}.webm"` }),
  ]);
});

async function openDetections(bytes, name) {
  clear("detections");
  $("detections-name").textContent = `${name} (reading…)`;
  try {
    const source = new Blob([bytes]); // a copy: the bytes themselves go to the worker
    const summary = await engine.loadDetections(bytes);
    state.detectionsSource = source;
    state.detections = summary;
    state.tracks = null;
    state.live = null;
    setExports(false);
    $("detections-name").textContent = `${name}: ${summary.rows} boxes, ${summary.frames} frames`;
    $("export-detections").disabled = false;
    if (summary.warnings.length || summary.skipped_rows) {
      say("detections", "warn", `${name}: ${summary.skipped_rows} rows skipped.\n${summary.warnings.slice(0, 5).join("\n")}`);
    }
    updateFrameRange();
    if (!state.hasVideo) setPictureSize(Math.ceil(summary.max_x) || 640, Math.ceil(summary.max_y) || 360);
    checkFit();
    $("run-status").textContent = "Ready: press Run to track and count.";
  } catch (e) {
    $("detections-name").textContent = `${name}: not read`;
    say("detections", "error", `${name} could not be read: ${e.message}`);
  }
}

/** Warns when the detections cannot belong to this footage: too big, or running past its end. */
function checkFit() {
  clear("fit");
  const d = state.detections;
  if (!d || !state.hasVideo) return;
  const problems = [];
  if (d.max_x > video.videoWidth * 1.25 || d.max_y > video.videoHeight * 1.25) {
    problems.push(`The detections reach x = ${Math.round(d.max_x)}, y = ${Math.round(d.max_y)}, but the footage is ${video.videoWidth} × ${video.videoHeight} pixels. Were they made on a different size of this video? Open the matching footage, or scale the detections.`);
  }
  if (state.videoFrames && d.frames > state.videoFrames * 1.02 + 2) {
    problems.push(`The detections run to frame ${d.frames}, but the footage has about ${state.videoFrames} frames at ${fps()} fps. Check the frame rate in the plan.`);
  }
  if (problems.length) say("fit", "warn", problems.join("\n"));
}

async function openPlanFile(text, name) {
  try {
    const plan = parsePlanText(text, name);
    store.replace(plan, "file");
    $("plan-name").textContent = name;
  } catch (e) {
    say("plan-file", "error", e.message);
  }
}

$("open-footage").addEventListener("change", (e) => {
  const f = e.target.files[0];
  if (f) openFootage(f, f.name);
});
$("open-detections").addEventListener("change", async (e) => {
  const f = e.target.files[0];
  if (f) openDetections(await f.arrayBuffer(), f.name);
});
$("open-plan").addEventListener("change", async (e) => {
  const f = e.target.files[0];
  if (f) openPlanFile(await f.text(), f.name);
});

// Drag and drop: footage by type, JSON with a frame rate or lines is a plan, anything else detections.
const stage = $("stage");
stage.addEventListener("dragover", (e) => { e.preventDefault(); stage.classList.add("dragover"); });
stage.addEventListener("dragleave", () => stage.classList.remove("dragover"));
stage.addEventListener("drop", async (e) => {
  e.preventDefault();
  stage.classList.remove("dragover");
  for (const f of e.dataTransfer.files) {
    if (f.type.startsWith("video/") || /\.(webm|mp4|mkv|mov|avi)$/i.test(f.name)) {
      openFootage(f, f.name);
      continue;
    }
    const text = await f.text();
    if (/\.json$/i.test(f.name) && /"(frame_rate|screenlines)"/.test(text.slice(0, 4000))) openPlanFile(text, f.name);
    else openDetections(new TextEncoder().encode(text).buffer, f.name);
  }
});

// ---------------------------------------------------------------- finding objects in footage

for (const [id, key] of [["far-height", "farHeight"], ["near-height", "nearHeight"]]) {
  $(id).value = store.settings[key] ?? "";
  $(id).addEventListener("change", (e) => store.setSetting(key, e.target.value));
}

/** Detector settings from the two height fields (docs/detector-settings.md). */
function detectorSettings() {
  const settings = {};
  for (const [id, key] of [["far-height", "far_height"], ["near-height", "near_height"]]) {
    const v = Number($(id).value);
    if ($(id).value !== "" && Number.isFinite(v) && v > 0) settings[key] = v;
  }
  return JSON.stringify(settings);
}

/**
 * Shows frame f and resolves once the browser has presented it: the next video frame callback after
 * the seek starts (drawing on "seeked" can give the frame before). A seek to the frame already shown
 * presents nothing new, so "seeked" plus a short wait also ends it.
 */
function presentFrame(f) {
  return new Promise((resolve) => {
    let done = false;
    const finish = () => { if (!done) { done = true; resolve(); } };
    if ("requestVideoFrameCallback" in video) video.requestVideoFrameCallback(finish);
    video.addEventListener("seeked", () => setTimeout(finish, "requestVideoFrameCallback" in video ? 300 : 0), { once: true });
    video.currentTime = frameTime(f);
  });
}

let findCancelled = false;
$("cancel-find").addEventListener("click", () => {
  findCancelled = true;
  engine.cancelFind();
});

/** Progress of finding objects: bar, frames a second, time left. */
function showFindProgress(done, total, started) {
  const rate = done / Math.max(1e-3, (performance.now() - started) / 1000);
  $("find-progress").value = done / Math.max(1, total);
  $("find-status").textContent = `Frame ${done} of ${total}, ${rate.toFixed(0)} frames a second, ${Math.ceil(Math.max(0, total - done) / Math.max(rate, 1e-3))} s left`;
}

/**
 * The slow way, for footage or browsers WebCodecs cannot serve: seek the video element to each
 * frame, draw it and hand its RGBA pixels to the detector (about 11 frames a second at 640x360).
 */
async function findByDrawing(w, h, total, started) {
  const grab = el("canvas", { width: w, height: h });
  const g = grab.getContext("2d", { willReadFrequently: true });
  await engine.startDetection(w, h, detectorSettings());
  for (let f = 1; f <= total; f++) {
    if (findCancelled) throw new Error("cancelled; the detections opened before are kept");
    await presentFrame(f);
    g.drawImage(video, 0, 0, w, h);
    const pixels = g.getImageData(0, 0, w, h).data.buffer;
    await engine.detectRgba(pixels, w, h);
    showFindProgress(f, total, started);
  }
  return engine.finishDetection();
}

// Frames are decoded in the worker with WebCodecs where the browser has it and the footage is WebM
// or MP4 (hundreds of frames a second); otherwise taken by seeking and drawing each one. Either way
// the core's motion detector searches them in the worker.
$("find-objects").addEventListener("click", async () => {
  if (!state.hasVideo) return;
  pause();
  clear("find");
  const w = video.videoWidth;
  const h = video.videoHeight;
  const total = Math.max(1, Math.round(video.duration * fps()));
  const bar = $("find-progress");
  findCancelled = false;
  bar.hidden = false;
  $("cancel-find").hidden = false;
  $("find-objects").disabled = true;
  $("run").disabled = true;
  $("find-status").textContent = "Starting…";
  const started = performance.now();
  try {
    let summary = null;
    let how = "";
    const found = typeof VideoDecoder === "function"
      ? await engine.findInFootage(state.footageBlob, w, h, detectorSettings(), total, (done, n) => showFindProgress(done, n, started))
      : { fallback: "this browser has no WebCodecs video decoder" };
    if (found.fallback) {
      say("find", "warn", `Frames are taken by playing the footage, which is slower: ${found.fallback}.`);
    } else {
      summary = found.summary;
      how = ` (decoded in this page: ${found.container}, ${found.codec})`;
      showFrameRate(found.frameRate, "is coded at");
      if (found.stopped) {
        say("find", "warn", `Reading the footage stopped early: ${found.stopped}. The objects found in frames 1 to ${found.frames} are kept; the rest of the footage was not searched. The file may be damaged or cut short: re-encode it with ffmpeg and search again to count all of it.`);
      } else {
        // The footage's own rate, where the decoder told it, not the plan's (which may be wrong).
        const expected = found.frameRate ? Math.round(video.duration * found.frameRate) : found.expected;
        if (found.frames < 0.98 * expected) {
          say("find", "warn", `Only ${found.frames} frames could be read, but the footage should have about ${expected}. The file may be damaged: re-encode it with ffmpeg and search again to count all of it.`);
        }
      }
    }
    if (!summary) summary = await findByDrawing(w, h, total, started);
    const seconds = (performance.now() - started) / 1000;
    state.detectionsSource = new Blob([await engine.detectionsText()]);
    state.detections = summary;
    state.tracks = null;
    state.live = null;
    setExports(false);
    $("export-detections").disabled = false;
    $("detections-name").textContent = `found in ${state.footageName}: ${summary.rows} boxes, ${summary.frames} frames`;
    updateFrameRange();
    $("find-status").textContent = `Found ${summary.rows} moving objects over ${summary.frames} frames in ${seconds.toFixed(1)} s${how}. Press Run to track and count them.`;
    const margin = store.plan.rules && store.plan.rules.hysteresis;
    if (!(margin >= 0.35)) {
      say("margin", "ok", "Boxes found in footage jump when two people join or split near a line. A crossing margin of 0.35 box heights counts line crossings more steadily (zones keep 0.15: people leaving a zone at the picture's edge are soon out of sight). See docs/detector-settings.md.", [
        el("button", { type: "button", text: "Use 0.35", onclick: () => { setHysteresis(0.35, 0.15); clear("margin"); } }),
      ]);
    }
    $("run-status").textContent = "Ready: press Run to track and count.";
  } catch (e) {
    $("find-status").textContent = "";
    if (String(e.message).startsWith("cancelled")) say("find", "warn", `Finding objects was ${e.message}.`);
    else say("find", "error", `Finding objects stopped: ${e.message}`);
  } finally {
    bar.hidden = true;
    $("cancel-find").hidden = true;
    $("find-objects").disabled = false;
    $("run").disabled = false;
    seekFrame(1);
  }
});

// ---------------------------------------------------------------- run and results

$("method").value = store.settings.method || "";
$("method").addEventListener("change", (e) => store.setSetting("method", e.target.value));

// Tracking runs in one piece inside the worker, so Cancel replaces the worker and gives the new
// one the detections and plan again.
$("cancel-run").addEventListener("click", () => {
  $("cancel-run").hidden = true;
  state.restoring = (async () => {
    await engine.restart();
    if (state.detectionsSource) await engine.loadDetections(await state.detectionsSource.arrayBuffer());
    await sendPlan();
  })().finally(() => { state.restoring = null; });
});

$("run").addEventListener("click", async () => {
  if (state.restoring) await state.restoring;
  if (!state.detections) {
    say("run", "error", "Open a detections file first (Open detections): the boxes found in each frame, as text, CSV or JSON.");
    return;
  }
  clear("run");
  const bar = $("progress");
  bar.hidden = false;
  bar.value = 0;
  $("run").disabled = true;
  $("cancel-run").hidden = false;
  $("run-status").textContent = "Tracking…";
  const started = performance.now();
  try {
    const out = await engine.track($("method").value, "", (done, total) => {
      bar.value = total ? done / total : 0;
      $("run-status").textContent = `Tracking… frame ${done} of ${total}`;
    });
    state.tracks = new TrackView(out.boxes, out.trackList);
    $("export-tracks").disabled = false;
    const seconds = ((performance.now() - started) / 1000).toFixed(1);
    $("run-status").textContent = `${out.tracks} tracks in ${seconds} s.`;
    if (!hasCountingGeometry(store.plan)) {
      say("run", "warn", "The plan has no lines or zones, so nothing was counted. Press Draw line and click two points across the path, or open a plan file; the counts appear at once.");
    }
    await sendPlan();
    redraw();
  } catch (e) {
    $("run-status").textContent = "";
    if (String(e.message).startsWith("cancelled")) {
      state.tracks = null;
      state.live = null;
      setExports(false);
      redraw();
      say("run", "warn", "Tracking was cancelled. The detections and the plan are kept: press Run to track again.");
    } else {
      say("run", "error", `Tracking stopped: ${e.message}`);
    }
  } finally {
    bar.hidden = true;
    $("cancel-run").hidden = true;
    $("run").disabled = false;
  }
});

function takeResults({ report, csv }) {
  state.reportText = report;
  state.csv = csv;
  state.report = JSON.parse(report);
  state.live = new LiveCounts(state.report);
  setExports(true);
  showResults($("results"), state.report, (event) => {
    pause();
    seekFrame(event.frame);
  });
  redraw();
}

function setExports(ready) {
  $("export-report").disabled = !ready;
  $("export-csv").disabled = !ready;
  $("print-counts").disabled = !ready;
  if (!ready) {
    $("export-tracks").disabled = true;
    $("results").hidden = true;
    state.report = null;
  }
}

$("export-report").addEventListener("click", () => download("throughline-report.json", state.reportText, "application/json"));
$("export-csv").addEventListener("click", () => download("counts.csv", state.csv, "text/csv"));
$("export-tracks").addEventListener("click", async () => download("tracks.txt", await engine.tracksText(), "text/plain"));
// Printing (or saving as PDF from the print dialogue) shows the results alone, headed with what
// they were counted from; the report's caution is part of them.
window.addEventListener("beforeprint", () => {
  const footage = state.footageName || "no footage opened";
  const when = new Date().toLocaleString();
  $("print-head").textContent = `Throughline counts · footage: ${footage} · plan: ${$("plan-name").textContent} · printed ${when}`;
});
$("print-counts").addEventListener("click", () => window.print());

$("export-detections").addEventListener("click", async () => {
  const text = await engine.detectionsText();
  const csv = text.startsWith("frame,");
  download(csv ? "detections.csv" : "detections.txt", text, csv ? "text/csv" : "text/plain");
});
$("save-plan").addEventListener("click", () => download("plan.json", planForEngine(store.plan).json, "application/json"));
$("undo").addEventListener("click", () => store.undo());
$("load-demo").addEventListener("click", () => openDemo(true));

// ---------------------------------------------------------------- start

/** Where the core and the demo come from: the site's files, or the single file's embedded copies. */
function sources() {
  const embedded = document.getElementById("tl-embedded");
  if (embedded) {
    const data = JSON.parse(embedded.textContent);
    const bytes = (b64) => Uint8Array.from(atob(b64), (c) => c.charCodeAt(0));
    const workerCode = document.getElementById("tl-worker").textContent;
    return {
      worker: () => new Worker(URL.createObjectURL(new Blob([workerCode], { type: "text/javascript" }))),
      wasm: async () => bytes(data.wasm),
      demo: data.demo
        ? async (name) => (name === "footage.webm" ? new Blob([bytes(data.demo[name])], { type: "video/webm" }) : new Blob([bytes(data.demo[name])]))
        : null,
    };
  }
  return {
    worker: () => new Worker("worker.js"),
    wasm: async () => new Uint8Array(await (await fetch("pkg/throughline_wasm_bg.wasm")).arrayBuffer()),
    demo: async (name) => {
      const r = await fetch(`demo/${name}`);
      if (!r.ok) throw new Error(`demo/${name}: ${r.status}`);
      return r.blob();
    },
  };
}

const src = sources();
const engine = new Engine(src.worker, await src.wasm());
engine.ready.catch((e) => say("engine", "error", `The counting engine did not start: ${e.message}. Try a current Chromium, Firefox or Safari.`));

/** Opens the bundled demo: footage, detections and, unless the user has a plan of their own, its plan. */
async function openDemo(resetPlan) {
  if (!src.demo) return;
  try {
    const [footage, detections, planText] = await Promise.all([
      src.demo("footage.webm"),
      src.demo("detections.csv"),
      src.demo("plan.json").then((b) => b.text()),
    ]);
    openFootage(footage, "demo footage.webm");
    await openDetections(await detections.arrayBuffer(), "demo detections.csv");
    if (resetPlan || !saved) {
      store.replace(parsePlanText(planText, "demo plan.json"), "demo");
      clear("plan-replaced");
      $("plan-name").textContent = "demo plan.json";
    }
    say("demo", "ok", "This is the bundled demo: a simulated footbridge plaza. Press Run to track and count it, or open your own footage, detections and plan.");
  } catch (e) {
    say("demo", "warn", `The demo could not be opened (${e.message}). Open your own footage and detections.`);
  }
}

renderPlanPanel();
if (saved) {
  $("plan-name").textContent = saved.source === "file" ? "kept from last time" : "kept from last time (edited)";
  sendPlan();
}
editor.setTool("select");
await openDemo(false);
document.body.dataset.ready = "true";
