//! Warnings about the inputs (footage from a camera that moved, frames missing, a frame rate other
//! than the plan's, boxes past the footage's end, rows passed over…): said on standard error as
//! they come, and kept, so that the hand-in files a run writes say them too (they were said only
//! on the terminal, and the grid and summary handed in looked clean).

use std::sync::Mutex;

static KEPT: Mutex<Vec<String>> = Mutex::new(Vec::new());

/// Says `text` as a warning ("warning: …") and keeps it for the hand-in files.
pub fn warn(text: impl Into<String>) {
    let text = text.into();
    eprintln!("warning: {text}");
    KEPT.lock().unwrap_or_else(|e| e.into_inner()).push(text);
}

/// Every warning said so far in this run, in order.
pub fn kept() -> Vec<String> {
    KEPT.lock().unwrap_or_else(|e| e.into_inner()).clone()
}
