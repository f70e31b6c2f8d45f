//! Visual bridging of missed detections, after the V-IOU tracker (Bochinski, Senst and Sikora,
//! "Extending IOU Based Multi-Object Tracking by Visual Information", AVSS 2018): where a track
//! ends and another starts a few frames later near where the first would be, the object is
//! followed in the footage itself, forward from the first track's last box and backward from the
//! second's first box; when the two followings meet (IoU at least the tracker's `min_iou` in some
//! frame of the gap) the second track is joined to the first, its id dropped, and the gap filled
//! with the followed boxes (forward up to the frame they met, backward after).
//!
//! The visual tracker is template matching by normalised cross-correlation (NCC) in a search
//! window ([`follow`]): deterministic, a few hundred thousand multiply-adds a frame at most, and
//! needing nothing learnt. A correlation filter (MOSSE, KCF) adapts to slow changes of appearance,
//! which over a gap of a second or less matters less than never drifting onto the paving.
//!
//! The footage is given frame by frame ([`Bridger::feed`]), as a second pass after tracking: only
//! the frames of the gaps are looked at, and of them only a crop around each gap, so the memory
//! held is bounded by [`MAX_BRIDGE_HELD_BYTES`]. Boxes are pixels, top-left x/y + width/height;
//! frames are 1-based. Bridged boxes are kept as predicted boxes (not observed, score 0): no
//! detection was there.

mod follow;
mod gaps;
mod join;

pub use join::Join;

use crate::geometry::BBox;
use crate::limits::MAX_BRIDGE_HELD_BYTES;
use crate::track::Tracks;
use gaps::Gap;

/// What bridging did.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct BridgeSummary {
    /// Gaps followed in the footage: a track's end and a later track's start, plausible by class,
    /// size and place.
    pub followed: usize,
    /// Gaps whose forward and backward followings met.
    pub met: usize,
    /// Gaps not followed: their crops would have held more than [`MAX_BRIDGE_HELD_BYTES`] with
    /// the others, or the footage did not hold their frames.
    pub not_followed: usize,
    /// The joins made, in order of the bridged frames.
    pub joins: Vec<Join>,
}

/// Bridges the gaps of one set of tracks, given the footage's luma planes frame by frame.
pub struct Bridger {
    width: usize,
    min_iou: f64,
    gaps: Vec<Gap>,
    /// The first gap not yet started.
    next: usize,
    /// Gaps collecting crops: the gap's index and its crops so far.
    active: Vec<(usize, Vec<Vec<u8>>)>,
    held: usize,
    last_fed: u32,
    met: Vec<join::Met>,
    summary: BridgeSummary,
}

impl Bridger {
    /// The gaps of `tracks` to bridge in footage of `width × height` pixels, as its settings ask
    /// (`bridge_frames`; none when 0).
    pub fn new(tracks: &Tracks, width: usize, height: usize) -> Bridger {
        let gaps = gaps::find(&tracks.tracks, tracks.config.bridge_frames, width, height);
        Bridger {
            width,
            min_iou: tracks.config.min_iou,
            gaps,
            next: 0,
            active: Vec::new(),
            held: 0,
            last_fed: 0,
            met: Vec::new(),
            summary: BridgeSummary::default(),
        }
    }

    /// The last frame the bridger needs (0 when it needs none): reading may stop after it.
    pub fn last_frame_needed(&self) -> u32 {
        self.gaps.iter().map(|g| g.to).max().unwrap_or(0)
    }

    /// Gives frame `frame` (1-based; frames in order, none skipped) as its luma plane, `width`
    /// pixels a row from the top-left. A gap whose frames are not all given is not followed.
    pub fn feed(&mut self, frame: u32, luma: &[u8]) {
        if frame != self.last_fed + 1 {
            // A frame skipped: the gaps being collected lack it.
            self.summary.not_followed += self.active.len();
            self.active.clear();
            self.held = 0;
        }
        self.last_fed = frame;
        self.start_gaps(frame);
        for (k, crops) in &mut self.active {
            crops.push(self.gaps[*k].region.crop(luma, self.width));
        }
        let (done, open): (Vec<_>, Vec<_>) = std::mem::take(&mut self.active)
            .into_iter()
            .partition(|(k, _)| self.gaps[*k].to == frame);
        self.active = open;
        for (k, crops) in done {
            self.held -= need(&self.gaps[k]);
            self.try_gap(k, &crops);
        }
    }

    /// The gaps that begin at `frame` start collecting crops while the memory allows.
    fn start_gaps(&mut self, frame: u32) {
        while let Some(g) = self.gaps.get(self.next) {
            if g.from > frame {
                break;
            }
            if g.from == frame && self.held + need(g) <= MAX_BRIDGE_HELD_BYTES {
                self.held += need(g);
                self.active.push((self.next, Vec::new()));
            } else {
                self.summary.not_followed += 1;
            }
            self.next += 1;
        }
    }

    /// Follows gap `k` forward and backward over its crops; keeps the bridge when the two meet.
    fn try_gap(&mut self, k: usize, crops: &[Vec<u8>]) {
        let g = &self.gaps[k];
        self.summary.followed += 1;
        let (w, h) = (g.region.w, g.region.h);
        let frames: Vec<&[u8]> = crops.iter().map(Vec::as_slice).collect();
        let back: Vec<&[u8]> = frames.iter().rev().copied().collect();
        let forward = follow::follow(&frames, w, h, &g.forward_start());
        let backward = follow::follow(&back, w, h, &g.backward_start());
        let s = g.region.scale as f64;
        let shifted = |b: &BBox, d: (i32, i32)| {
            BBox::new(b.x + f64::from(d.0) * s, b.y + f64::from(d.1) * s, b.w, b.h)
        };
        let unseen = (g.to - g.from - 1) as usize;
        // Frame `from + j` (j from 1): forward[j - 1], backward[unseen - j].
        let pairs: Vec<(Option<BBox>, Option<BBox>)> = (1..=unseen)
            .map(|j| {
                (
                    forward[j - 1].map(|d| shifted(&g.a_box, d)),
                    backward[unseen - j].map(|d| shifted(&g.b_box, d)),
                )
            })
            .collect();
        let mut best: Option<(usize, f64)> = None;
        for (j, pair) in pairs.iter().enumerate() {
            if let (Some(f), Some(b)) = pair {
                let iou = f.iou(b);
                if best.is_none_or(|(_, v)| iou > v) {
                    best = Some((j, iou));
                }
            }
        }
        let Some((meet, iou)) = best.filter(|&(_, iou)| iou >= self.min_iou) else {
            return;
        };
        // Forward up to the meeting frame, backward after: each a prefix of its following, so
        // every frame has its box.
        let boxes: Vec<BBox> = pairs
            .iter()
            .enumerate()
            .filter_map(|(j, (f, b))| if j <= meet { *f } else { *b })
            .collect();
        if boxes.len() != unseen {
            return;
        }
        self.summary.met += 1;
        self.met.push(join::Met { gap: k, boxes, iou });
    }

    /// The tracks with every bridge kept (a track's end and a track's start each used once, the
    /// earliest gap first), and what was done.
    pub fn finish(mut self, tracks: &Tracks) -> (Tracks, BridgeSummary) {
        self.summary.not_followed += self.active.len() + (self.gaps.len() - self.next);
        self.met.sort_by_key(|m| m.gap);
        let (mut out, joins) = join::apply(tracks, &self.gaps, &self.met);
        // The bridged boxes are rounded as the tracks files write them, like the tracker's.
        crate::track::files::round_as_written(&mut out);
        self.summary.joins = joins;
        (out, self.summary)
    }
}

/// Bytes of crops a gap holds while it is collected.
fn need(g: &Gap) -> usize {
    g.region.bytes() * (g.to - g.from + 1) as usize
}
