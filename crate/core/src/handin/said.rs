//! Warnings about the inputs put into words once, here, for both adapters: the command line says
//! them as it meets them (and keeps them for the hand-in files), the page gives the facts
//! ([`InputNote`]) and the core words them, so the grid and the summary each writes are the same
//! bytes.

/// A warning about the inputs as the page gives it: already in the core's words (the detections'
/// own, a camera that moved, frames filled), or the facts of one the core words here.
#[derive(Debug, Clone, PartialEq, serde::Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum InputNote {
    /// A sentence already written (by the core's readers or the detector).
    Said(String),
    /// The footage's own frame rate, measured, against the plan's.
    FrameRate {
        footage: String,
        rate: f64,
        planned: f64,
    },
    /// The last frame with boxes, against the footage's length in frames.
    PastFootage {
        last_frame: u32,
        footage_frames: u32,
    },
}

impl InputNote {
    /// The warning in words, or `None` when the facts give no cause for one.
    pub fn words(&self) -> Option<String> {
        match self {
            InputNote::Said(text) => Some(text.clone()),
            InputNote::FrameRate {
                footage,
                rate,
                planned,
            } => frame_rate_warning(footage, *rate, *planned),
            InputNote::PastFootage {
                last_frame,
                footage_frames,
            } => past_footage_warning(*last_frame, *footage_frames),
        }
    }
}

/// When the footage (named `footage`) runs at a rate other than the plan's (by more than one part
/// in a thousand): what follows which, and what to do.
pub fn frame_rate_warning(footage: &str, rate: f64, planned: f64) -> Option<String> {
    if (rate - planned).abs() <= 0.001 * planned {
        return None;
    }
    Some(format!(
        "{footage}: the footage runs at {} frames a second, the plan says {planned} \
         (`frame_rate`): times, intervals, speeds and the footage's length in frames follow \
         the plan's; if the footage's is right, set the plan's frame_rate to it",
        (rate * 1000.0).round() / 1000.0
    ))
}

/// When boxes go on past the footage's last frame: another clip's detections, or a frame mistyped.
pub fn past_footage_warning(last_frame: u32, footage_frames: u32) -> Option<String> {
    (footage_frames < last_frame).then(|| {
        format!(
            "the boxes go on to frame {last_frame}, past the footage's {footage_frames} frames: \
             are these the detections of this footage? (the count reaches frame {last_frame})"
        )
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_rate_within_a_thousandth_of_the_plans_is_not_warned_of() {
        assert_eq!(frame_rate_warning("a.webm", 25.02, 25.0), None);
        let said = frame_rate_warning("a.webm", 29.97003, 25.0).unwrap();
        assert!(said
            .starts_with("a.webm: the footage runs at 29.97 frames a second, the plan says 25 "));
    }

    #[test]
    fn boxes_past_the_footage_are_warned_of_and_not_within_it() {
        assert_eq!(past_footage_warning(750, 750), None);
        let said = past_footage_warning(751, 750).unwrap();
        assert!(said.starts_with("the boxes go on to frame 751, past the footage's 750 frames"));
    }

    #[test]
    fn the_page_gives_facts_as_the_core_reads_them() {
        let notes: Vec<InputNote> = serde_json::from_str(
            r#"[{"said": "x"}, {"frame_rate": {"footage": "f", "rate": 10, "planned": 10}},
                {"past_footage": {"last_frame": 9, "footage_frames": 3}}]"#,
        )
        .unwrap();
        let words: Vec<String> = notes.iter().filter_map(InputNote::words).collect();
        assert_eq!(words.len(), 2);
        assert_eq!(words[0], "x");
    }
}
