//! Every limit on outside input, in one place. Each is generous for real work and small enough that
//! no number read from a file can make the program allocate without bound or work for ever; the
//! error that enforces a limit names the limit and what to do.

/// The largest magnitude of any number read from a file (a coordinate, score, frame, id, ground
/// distance): a trillion is beyond any picture or count, and products of two such numbers stay
/// exact enough in floating point and never overflow.
pub const MAX_MAGNITUDE: f64 = 1e12;

/// A finite number within [`MAX_MAGNITUDE`].
pub fn in_range(v: f64) -> bool {
    v.is_finite() && v.abs() <= MAX_MAGNITUDE
}

/// Frames per second a plan may give: from a time-lapse of a frame a minute to a high-speed camera.
pub const MIN_FRAME_RATE: f64 = 1.0 / 60.0;
pub const MAX_FRAME_RATE: f64 = 1000.0;

/// Widest crossing margin a plan may ask for (`rules.hysteresis`, `rules.zone_hysteresis`), in box
/// heights.
pub const MAX_HYSTERESIS: f64 = 2.0;

/// Longest span a plan may average paths over before counting (`rules.smooth_seconds`).
pub const MAX_SMOOTH_SECONDS: f64 = 10.0;

/// Interval length in minutes: from a quarter of a minute to a day.
pub const MIN_INTERVAL_MINUTES: f64 = 0.25;
pub const MAX_INTERVAL_MINUTES: f64 = 1440.0;

/// Intervals one report may hold: about three years of 15-minute intervals.
pub const MAX_INTERVALS: usize = 100_000;

/// Screenlines and zones together in one plan, and points in one line or zone.
pub const MAX_PLAN_ITEMS: usize = 1_000;
pub const MAX_POINTS: usize = 1_000;

/// Years a recording's start may name (the clock arithmetic stays exact far beyond).
pub const MIN_YEAR: i64 = 1900;
pub const MAX_YEAR: i64 = 9999;

/// Different classes in one detections file.
pub const MAX_CLASSES: usize = 65_535;

/// Values in one appearance vector.
pub const MAX_EMBEDDING_DIM: usize = 4_096;

/// Warnings kept in full from one file (the rest are counted, and said in one more warning); the
/// one about the file's end comes on top.
pub const MAX_WARNINGS: usize = 20;

/// A count in a manual count file (a trillion is not a count of anything in view).
pub const MAX_COUNT: u64 = 1_000_000_000_000;

/// Width or height of a picture, in pixels (8K footage is 7680 × 4320).
pub const MAX_PICTURE_SIDE: usize = 8_192;

/// Bytes of the pictures the detector keeps from the whole clip to form its background (fewer
/// pictures are kept when they are large; at least a few whatever their size).
pub const MAX_BACKGROUND_SAMPLE_BYTES: usize = 128 << 20;

/// Length of a YUV4MPEG2 header or frame line, in bytes.
pub const MAX_Y4M_LINE: u64 = 4_096;

/// Steps of the exact assignment of one association (one step is one candidate pair looked at;
/// about 5 ns each): beyond them the tracks not yet placed are matched greedily, cheapest pairs
/// first, and the frame is reported as crowded. A frame of 10,000 heavily overlapping boxes takes
/// about 300,000 steps, 100,000 such boxes about 3 million, and 30,000 boxes all on top of each
/// other about 33 million; the budget, about a second's work, is there so that no arrangement of
/// boxes, however contrived, can stall a run.
pub const MAX_ASSIGNMENT_STEPS: u64 = 200_000_000;

/// Detections a track is compared with in one frame: the closest this many (a person overlaps a
/// handful of boxes; thousands means a detector gone wrong).
pub const MAX_CANDIDATES: usize = 32;

/// Frames a track may coast unseen (`max_age`), and embeddings kept per track (`gallery_size`):
/// every coasting frame adds a predicted box, so these bound a track's memory.
pub const MAX_AGE_FRAMES: u32 = 10_000;
pub const MAX_GALLERY: u32 = 10_000;

/// Coded frames one WebM or MP4 file may hold: two days at 25 frames a second, 23 hours at 60.
/// The page keeps a small record per frame (about 32 bytes), so this bounds that list.
pub const MAX_FOOTAGE_FRAMES: usize = 5_000_000;

/// Bytes of one coded frame (an 8K key frame is a few MB).
pub const MAX_CODED_FRAME_BYTES: u64 = 64 << 20;

/// Bytes of a container's header read whole: an MP4 `moov` or `moof` box, a WebM track list or
/// block group. A movie header holding five million frames' tables is about 80 MB.
pub const MAX_CONTAINER_HEADER_BYTES: u64 = 128 << 20;

/// Boxes (MP4) or elements (WebM) stepped over in one file: a file cannot make the reader step for
/// ever, however its sizes are set. (Nesting needs no limit: the readers descend only along the
/// fixed paths to the boxes they use, never recursively.)
pub const MAX_CONTAINER_ELEMENTS: usize = 20_000_000;

/// A box narrower or lower than this many pixels is passed over as empty: a hundredth of a pixel,
/// the precision detections are written back with, so what is read, written and read again keeps
/// the same boxes.
pub const MIN_BOX_SIDE: f64 = 0.01;

/// Bytes of a text input (detections, tracks, plan, settings, counts): a day of one camera's
/// detections at 30 boxes a frame is about 2 GB.
pub const MAX_TEXT_INPUT_BYTES: u64 = 4 << 30;

/// Bytes of the still picture put in the client summary (a PNG or JPEG of one frame).
pub const MAX_STILL_BYTES: u64 = 64 << 20;

/// Entries in one batch manifest: a year of 15-minute clips from one camera is 35,040.
pub const MAX_MANIFEST_ENTRIES: usize = 100_000;

/// Bytes of a batch manifest: 100,000 rows of 160 characters.
pub const MAX_MANIFEST_BYTES: u64 = 16 << 20;

/// Characters in an entry's name (its output folder's name).
pub const MAX_ENTRY_NAME: usize = 100;

/// Frames a lost track may be followed in the footage to bridge a gap (`bridge_frames`): ten
/// seconds at 25 frames a second. The crops kept while following grow with it.
pub const MAX_BRIDGE_FRAMES: u32 = 250;

/// Tracks that start after one track ends that are tried as its continuation (the closest first):
/// each try costs two visual followings over the gap.
pub const MAX_BRIDGE_PAIRS_PER_END: usize = 4;

/// Side of the search region of one gap, in working pixels (the picture reduced so that the lost
/// box is at most 32 pixels long): a gap whose two ends lie further apart is not tried.
pub const MAX_BRIDGE_REGION_SIDE: usize = 256;

/// Bytes of footage crops held at once while bridging gaps: a gap that would need more, while
/// others are being followed, is not tried (counted in the summary), so a crowd cannot fill the
/// memory.
pub const MAX_BRIDGE_HELD_BYTES: usize = 256 << 20;
