// @ts-check
// Keys on the page (not while typing in a field or on a control): Space plays or pauses, the arrows
// step a frame (Shift: a second), Enter ends the line or zone being drawn, Escape drops it and ends
// the tool (or, with no tool in use, lets go of the track in focus), Delete or Backspace removes the
// selected line or zone. Ctrl+Z undoes what the view shown changes: the corrections and decisions
// while reviewing, the plan otherwise; Ctrl+Shift+Z or Ctrl+Y redoes a correction. While reviewing,
// N and P go to the next and previous doubtful moment, A accepts it (the count stands), R rejects
// it (or the crossing chosen). While a hand count runs, each line's key counts a crossing and
// Backspace takes back the last press, before anything else (tally-panel.js), except while typing.
// No key here is one a tab list or a button already answers.

/** @typedef {import("./store.js").PageStore} PageStore */
/** @typedef {import("./picture.js").Picture} Picture */
/** @typedef {import("./editor.js").Editor} Editor */
/** @typedef {import("./review.js").Review} Review */
/** @typedef {import("./tally-panel.js").TallyPanel} TallyPanel */

/**
 * @param {PageStore} store
 * @param {Picture} picture
 * @param {Editor} editor
 * @param {Review} review
 * @param {TallyPanel} tally
 */
export function bindShortcuts(store, picture, editor, review, tally) {
  document.addEventListener("keydown", (e) => {
    if (e.defaultPrevented) return; // taken already (the arrow keys on a tab list move between tabs)
    if (tally.handleKey(e)) return e.preventDefault();
    const target = e.target instanceof Element ? e.target : null;
    if (target && target.closest("input, select, textarea")) return;
    // On a button, Enter and Space press it; Delete and Backspace there are no reason to delete a
    // line (Tab from a line's name lands on its Flip button).
    if (target && target.closest("button") && ["Enter", " ", "Delete", "Backspace"].includes(e.key)) return;
    if (e.ctrlKey || e.metaKey) undoKeys(e, store);
    else if (store.view === "review" && !e.altKey && reviewKey(e.key, review)) e.preventDefault();
    else playKeys(e, store, picture, editor);
  });
}

/**
 * Ctrl+Z, Ctrl+Shift+Z and Ctrl+Y: undo and redo of what the view shown changes.
 * @param {KeyboardEvent} e
 * @param {PageStore} store
 */
function undoKeys(e, store) {
  const key = e.key.toLowerCase();
  const redo = key === "y" || (key === "z" && e.shiftKey);
  if (key !== "z" && key !== "y") return;
  e.preventDefault();
  if (store.view === "review") {
    if (redo) store.correctionsRedone();
    else store.correctionsUndone();
  } else if (!redo) {
    store.planUndone();
  }
}

/**
 * The review's letters; true when the key was one of them.
 * @param {string} key
 * @param {Review} review
 */
function reviewKey(key, review) {
  switch (key.toLowerCase()) {
    case "n": review.stepDoubt(1); leaveTabs(); return true;
    case "p": review.stepDoubt(-1); leaveTabs(); return true;
    case "a": review.accept(); return true;
    case "r": review.reject(); return true;
    default: return false;
  }
}

/**
 * After N or P the arrow keys step the moment's frames: a tab in focus (Review just chosen, where
 * they would change tabs) lets go of it.
 */
function leaveTabs() {
  const at = document.activeElement;
  if (at instanceof HTMLElement && at.getAttribute("role") === "tab") at.blur();
}

/**
 * Playback, drawing and deleting.
 * @param {KeyboardEvent} e
 * @param {PageStore} store
 * @param {Picture} picture
 * @param {Editor} editor
 */
function playKeys(e, store, picture, editor) {
  if (e.key === " ") {
    e.preventDefault();
    picture.play();
  } else if (e.key === "ArrowRight" || e.key === "ArrowLeft") {
    e.preventDefault();
    picture.pause();
    const step = e.shiftKey ? Math.round(store.fps) : 1;
    picture.seekFrame(store.frame + (e.key === "ArrowRight" ? step : -step));
  } else if (e.key === "Enter") {
    editor.finish();
  } else if (e.key === "Escape") {
    // Ends a drawing tool first; with none in use, lets go of the track in focus.
    if (store.tool !== "select" || store.draft) store.toolChosen("select");
    else if (store.focus) store.focusChosen(null);
  } else if (e.key === "Delete" || e.key === "Backspace") {
    store.selectedDeleted();
  }
}
