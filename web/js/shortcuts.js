// @ts-check
// Keys on the page (not while typing in a field or on a control): Ctrl+Z undoes, Space plays or
// pauses, the arrows step a frame (Shift: a second), Enter ends the line or zone being drawn, Escape
// drops it and ends the tool (or, with no tool in use, lets go of the track in focus), Delete or
// Backspace removes the selected line or zone.

/** @typedef {import("./store.js").PageStore} PageStore */
/** @typedef {import("./picture.js").Picture} Picture */
/** @typedef {import("./editor.js").Editor} Editor */

/**
 * @param {PageStore} store
 * @param {Picture} picture
 * @param {Editor} editor
 */
export function bindShortcuts(store, picture, editor) {
  document.addEventListener("keydown", (e) => {
    if (e.defaultPrevented) return; // taken already (the arrow keys on a tab list move between tabs)
    const target = e.target instanceof Element ? e.target : null;
    if (target && target.closest("input, select, textarea")) return;
    // On a button, Enter and Space press it; Delete and Backspace there are no reason to delete a
    // line (Tab from a line's name lands on its Flip button).
    if (target && target.closest("button") && ["Enter", " ", "Delete", "Backspace"].includes(e.key)) return;
    if ((e.ctrlKey || e.metaKey) && e.key.toLowerCase() === "z") {
      e.preventDefault();
      store.planUndone();
    } else if (e.key === " ") {
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
  });
}
