//! The page's WebM and MP4 reader against ffprobe (FFmpeg, Debian's package, installed by
//! `cargo xtask test`): on footage ffmpeg encodes from the demo, every video frame comes out with
//! ffprobe's size, key-frame flag and presentation time, in ffprobe's order (file order), and the
//! codec string names ffprobe's profile and level. Native: the reader is generic over `Read + Seek`.
//! Without ffmpeg the checks that need it print a line saying they were skipped, unless
//! `THROUGHLINE_REQUIRE_FFMPEG=1` (`cargo xtask test` sets it), when a missing ffmpeg fails them.
#![cfg(not(target_arch = "wasm32"))]

use std::fs::File;
use std::io::{BufReader, Write};
use std::path::{Path, PathBuf};
use std::process::Command;

use throughline_footage::demux::{Chunk, Demuxer};

const DEMO_FOOTAGE: &str = concat!(
    env!("CARGO_MANIFEST_DIR"),
    "/../../demo-site/demo/footage.webm"
);

fn scratch(name: &str) -> PathBuf {
    let dir = Path::new(env!("CARGO_TARGET_TMPDIR")).join("demux");
    std::fs::create_dir_all(&dir).unwrap();
    dir.join(name)
}

/// Whether ffmpeg and ffprobe run. When they do not, the test `name` says it is skipped (on the
/// terminal itself: the test harness keeps back what `eprintln!` prints from a passing test), or
/// fails when `THROUGHLINE_REQUIRE_FFMPEG` is `1`.
fn ffmpeg_or_skip(name: &str) -> bool {
    let runs = |program: &str| {
        Command::new(program)
            .arg("-version")
            .output()
            .is_ok_and(|o| o.status.success())
    };
    if runs("ffmpeg") && runs("ffprobe") {
        return true;
    }
    let required = std::env::var("THROUGHLINE_REQUIRE_FFMPEG").is_ok_and(|v| v == "1");
    assert!(
        !required,
        "{name}: ffmpeg is not installed and THROUGHLINE_REQUIRE_FFMPEG=1 (apt-get install ffmpeg)"
    );
    let _ = writeln!(
        std::io::stderr(),
        "skipped {name}: ffmpeg is not installed (apt-get install ffmpeg; `cargo xtask test` does)"
    );
    false
}

/// The first `frames` frames of the demo footage re-encoded by ffmpeg with `codec_args`.
fn encode(name: &str, frames: u32, codec_args: &[&str]) -> PathBuf {
    let out = scratch(name);
    let status = Command::new("ffmpeg")
        .args(["-v", "error", "-y", "-i", DEMO_FOOTAGE, "-frames:v"])
        .arg(frames.to_string())
        .args(codec_args)
        .arg(&out)
        .status()
        .expect("ffmpeg runs (cargo xtask test installs it)");
    assert!(status.success());
    out
}

/// ffprobe's packets of the video stream: (size, key, presentation time in µs), file order.
fn probe_packets(path: &Path) -> Vec<(usize, bool, i64)> {
    let out = Command::new("ffprobe")
        .args(["-v", "error", "-select_streams", "v:0", "-show_entries"])
        .args(["packet=size,flags,pts_time", "-of", "csv=p=0"])
        .arg(path)
        .output()
        .expect("ffprobe runs");
    assert!(out.status.success());
    String::from_utf8(out.stdout)
        .unwrap()
        .lines()
        .map(|line| {
            let f: Vec<&str> = line.split(',').collect();
            let pts: f64 = f[0].parse().unwrap();
            (
                f[1].parse().unwrap(),
                f[2].starts_with('K'),
                (pts * 1e6).round() as i64,
            )
        })
        .collect()
}

fn probe_stream(path: &Path, entries: &str) -> String {
    let out = Command::new("ffprobe")
        .args(["-v", "error", "-select_streams", "v:0", "-show_entries"])
        .arg(format!("stream={entries}"))
        .args(["-of", "csv=p=0"])
        .arg(path)
        .output()
        .expect("ffprobe runs");
    String::from_utf8(out.stdout).unwrap().trim().to_string()
}

fn read_all(path: &Path) -> (throughline_footage::demux::VideoTrack, Vec<Chunk>) {
    let size = std::fs::metadata(path).unwrap().len();
    let file = BufReader::new(File::open(path).unwrap());
    let (mut demuxer, track) = Demuxer::open(file, size).expect("opens");
    let mut chunks = Vec::new();
    while let Some(c) = demuxer.next_chunk().expect("reads") {
        chunks.push(c);
    }
    (track, chunks)
}

fn assert_same_frames(chunks: &[Chunk], packets: &[(usize, bool, i64)]) {
    assert_eq!(chunks.len(), packets.len(), "frame count");
    for (i, (c, p)) in chunks.iter().zip(packets).enumerate() {
        assert_eq!((c.data.len(), c.key), (p.0, p.1), "frame {i}: size, key");
        // ffprobe prints times to the microsecond; WebM stores milliseconds.
        assert!(
            (c.timestamp_us - p.2).abs() <= 1,
            "frame {i}: {} vs {} µs",
            c.timestamp_us,
            p.2
        );
    }
}

#[test]
fn mp4_h264_with_b_frames_matches_ffprobe() {
    if !ffmpeg_or_skip("mp4_h264_with_b_frames_matches_ffprobe") {
        return;
    }
    let path = encode(
        "clip.mp4",
        90,
        &["-c:v", "libx264", "-bf", "2", "-g", "30", "-an"],
    );
    let (track, chunks) = read_all(&path);
    let packets = probe_packets(&path);
    assert_same_frames(&chunks, &packets);
    // B-frames: presentation times are not in file order.
    assert!(chunks
        .windows(2)
        .any(|w| w[1].timestamp_us < w[0].timestamp_us));
    assert_eq!(track.container, "mp4");
    assert_eq!(track.frames, Some(90));
    let (w, h) = (track.coded_width, track.coded_height);
    assert_eq!(probe_stream(&path, "width,height"), format!("{w},{h}"));
    // ffprobe's profile 100 is High (0x64); its level is the record's level as a number.
    let level: u32 = probe_stream(&path, "level").parse().unwrap();
    assert!(track.codec.starts_with("avc1.64"), "{}", track.codec);
    assert_eq!(u32::from_str_radix(&track.codec[9..11], 16).unwrap(), level);
    let description = track.description.expect("H.264 needs its avcC record");
    assert_eq!(description[0], 1, "configurationVersion of an avcC record");
}

#[test]
fn webm_vp9_and_vp8_match_ffprobe() {
    if !ffmpeg_or_skip("webm_vp9_and_vp8_match_ffprobe") {
        return;
    }
    for (name, args, codec) in [
        (
            "clip-vp9.webm",
            ["-c:v", "libvpx-vp9", "-g", "30"],
            "vp09.00.10.08",
        ),
        ("clip-vp8.webm", ["-c:v", "libvpx", "-g", "30"], "vp8"),
    ] {
        let path = encode(name, 60, &[&args[..], &["-b:v", "300k", "-an"]].concat());
        let (track, chunks) = read_all(&path);
        assert_same_frames(&chunks, &probe_packets(&path));
        assert_eq!((track.container, track.codec.as_str()), ("webm", codec));
        assert_eq!(track.description, None);
        assert_eq!(track.frames, None);
        assert!(
            chunks[0].key && chunks[30].key,
            "key frames every 30 (-g 30)"
        );
    }
}

#[test]
fn fragmented_mp4_and_vp9_in_mp4_match_ffprobe() {
    if !ffmpeg_or_skip("fragmented_mp4_and_vp9_in_mp4_match_ffprobe") {
        return;
    }
    // Fragmented MP4 (as streaming cameras and browsers record): the frames are in moof boxes.
    let frag = encode(
        "frag.mp4",
        60,
        &[
            "-c:v",
            "libx264",
            "-movflags",
            "frag_keyframe+empty_moov",
            "-an",
        ],
    );
    let (track, chunks) = read_all(&frag);
    assert_same_frames(&chunks, &probe_packets(&frag));
    assert!(track.codec.starts_with("avc1."), "{}", track.codec);
    let vp9 = encode(
        "vp9.mp4",
        40,
        &["-c:v", "libvpx-vp9", "-b:v", "300k", "-an"],
    );
    let (track, chunks) = read_all(&vp9);
    assert_same_frames(&chunks, &probe_packets(&vp9));
    assert!(track.codec.starts_with("vp09.00."), "{}", track.codec);
    assert_eq!(
        track.description, None,
        "VP9 takes no description in WebCodecs"
    );
}

#[test]
fn hevc_mp4_matches_ffprobe() {
    if !ffmpeg_or_skip("hevc_mp4_matches_ffprobe") {
        return;
    }
    let path = encode(
        "clip-hevc.mp4",
        30,
        &["-c:v", "libx265", "-tag:v", "hvc1", "-an"],
    );
    let (track, chunks) = read_all(&path);
    assert_same_frames(&chunks, &probe_packets(&path));
    // hvc1.<profile>.<compatibility flags reversed>.<tier><level>.<constraints> (ISO/IEC 14496-15
    // annex E): ffprobe's Main is profile 1, its level is general_level_idc.
    assert_eq!(probe_stream(&path, "profile"), "Main");
    let level = probe_stream(&path, "level");
    assert!(
        track.codec.starts_with(&format!("hvc1.1.6.L{level}")),
        "{} (level {level})",
        track.codec
    );
    assert_eq!(track.description.as_deref().map(|d| d[0]), Some(1));
}

#[test]
fn a_webm_of_unknown_sizes_as_browsers_record_reads_whole() {
    if !ffmpeg_or_skip("a_webm_of_unknown_sizes_as_browsers_record_reads_whole") {
        return;
    }
    // Written to a pipe, ffmpeg cannot go back to write the segment's size: it stays unknown (all
    // value bits set, RFC 8794 section 6.2). Browsers recording live also leave each cluster's
    // size unknown: the first cluster's is set so here, in place.
    let path = scratch("live.webm");
    let out = Command::new("ffmpeg")
        .args(["-v", "error", "-i", DEMO_FOOTAGE, "-frames:v", "60"])
        .args([
            "-c:v", "libvpx", "-b:v", "300k", "-an", "-f", "webm", "pipe:1",
        ])
        .output()
        .expect("ffmpeg runs");
    assert!(out.status.success());
    let mut bytes = out.stdout;
    let at = bytes
        .windows(4)
        .position(|w| w == [0x1F, 0x43, 0xB6, 0x75])
        .expect("a cluster");
    let size_len = bytes[at + 4].leading_zeros() as usize + 1;
    bytes[at + 4] = 0xFF >> (size_len - 1) | (0x80 >> (size_len - 1));
    for b in &mut bytes[at + 5..at + 4 + size_len] {
        *b = 0xFF;
    }
    std::fs::write(&path, &bytes).unwrap();
    let (track, chunks) = read_all(&path);
    assert_eq!(track.codec, "vp8");
    assert_same_frames(&chunks, &probe_packets(&path));
    assert_eq!(chunks.len(), 60);
}

#[test]
fn av1_webm_matches_ffprobe() {
    if !ffmpeg_or_skip("av1_webm_matches_ffprobe") {
        return;
    }
    let path = encode(
        "clip-av1.webm",
        20,
        &["-c:v", "libaom-av1", "-cpu-used", "8", "-an"],
    );
    let (track, chunks) = read_all(&path);
    assert_same_frames(&chunks, &probe_packets(&path));
    // av01.profile.levelTier.depth from the av1C record the WebM carries; ffprobe's profile 0 is Main.
    assert!(track.codec.starts_with("av01.0."), "{}", track.codec);
    assert!(track.codec.ends_with(".08"), "8-bit: {}", track.codec);
    assert_eq!(probe_stream(&path, "profile"), "Main");
    assert!(track.description.is_some(), "AV1 takes its av1C record");
}

#[test]
fn the_demo_footage_reads_whole() {
    let (track, chunks) = read_all(Path::new(DEMO_FOOTAGE));
    assert_eq!(chunks.len(), 750);
    if !ffmpeg_or_skip("the_demo_footage_reads_whole") {
        return;
    }
    assert_same_frames(&chunks, &probe_packets(Path::new(DEMO_FOOTAGE)));
    assert_eq!(
        probe_stream(Path::new(DEMO_FOOTAGE), "width,height"),
        format!("{},{}", track.coded_width, track.coded_height)
    );
}

#[test]
fn damaged_footage_is_refused_or_stops_with_a_message() {
    let whole = std::fs::read(DEMO_FOOTAGE).unwrap();
    // Cut in half (a copy that stopped half-way): the reader needs no index, so the frames of
    // the first half come out, then a message that the file ends early.
    let half = &whole[..whole.len() / 2];
    let (mut demuxer, _) = Demuxer::open(std::io::Cursor::new(half), half.len() as u64).unwrap();
    let mut n = 0;
    let err = loop {
        match demuxer.next_chunk() {
            Ok(Some(_)) => n += 1,
            Ok(None) => panic!("a file cut short ends with a message, not silently"),
            Err(e) => break e,
        }
    };
    assert!(
        (300..450).contains(&n),
        "{n} of the 750 frames before the cut"
    );
    assert!(err.contains("ends early"), "{err}");
    // Damaged after a good start: the frames before the damage, then a message.
    let mut broken = whole.clone();
    let from = whole.len() / 2;
    broken[from..from + 4096].fill(0xFF);
    let (mut demuxer, _) =
        Demuxer::open(std::io::Cursor::new(&broken), broken.len() as u64).unwrap();
    let mut n = 0;
    let stopped = loop {
        match demuxer.next_chunk() {
            Ok(Some(_)) => n += 1,
            Ok(None) => break None,
            Err(e) => break Some(e),
        }
    };
    assert!(n > 100, "{n} frames before the damage");
    if let Some(e) = stopped {
        assert!(e.contains("damaged"), "{e}");
    }
    // Only the first bytes: no track list yet.
    let start = &whole[..40];
    let err = Demuxer::open(std::io::Cursor::new(start), 40)
        .err()
        .unwrap();
    assert!(err.contains("WebM"), "{err}");
    if !ffmpeg_or_skip("damaged_footage_is_refused_or_stops_with_a_message") {
        return;
    }
    // An MP4 whose chunk offset table (stco, ISO/IEC 14496-12) points its last chunk (here the
    // only one: ffmpeg put all 60 frames in one) far past the end of the file: the frames before
    // it, then a message; nothing is allocated for frames the file does not hold.
    let mut bad = std::fs::read(encode(
        "fast.mp4",
        60,
        &["-c:v", "libx264", "-movflags", "+faststart", "-an"],
    ))
    .unwrap();
    let at = bad
        .windows(4)
        .position(|w| w == b"stco")
        .expect("an stco box");
    let entries = u32::from_be_bytes(bad[at + 8..at + 12].try_into().unwrap()) as usize;
    let last = at + 12 + 4 * (entries - 1);
    bad[last..last + 4].copy_from_slice(&0xFFFF_FF00u32.to_be_bytes());
    let (mut demuxer, _) = Demuxer::open(std::io::Cursor::new(&bad), bad.len() as u64).unwrap();
    let mut n = 0;
    let err = loop {
        match demuxer.next_chunk() {
            Ok(Some(_)) => n += 1,
            Ok(None) => panic!("a frame outside the file ends with a message, not silently"),
            Err(e) => break e,
        }
    };
    assert!(n < 60, "{n} frames before the bad chunk");
    assert!(err.contains("lies outside the file"), "{err}");
    // An MP4 whose sample table is gone.
    let mp4 = std::fs::read(encode("cut.mp4", 10, &["-c:v", "libx264", "-an"])).unwrap();
    let cut = &mp4[..mp4.len().min(600)];
    assert!(Demuxer::open(std::io::Cursor::new(cut), cut.len() as u64).is_err());
}

/// A file cut short (an interrupted copy) is said to be so when it opens, before any frame is
/// read, where its container says how long it is: a WebM's segment size (Matroska's element
/// sizes, RFC 9559), an MP4 whose sample table reaches past the file's end (its `moov` at the
/// front, ISO/IEC 14496-12). Whole files are not.
#[test]
fn footage_cut_short_is_known_when_it_opens() {
    let open = |bytes: &[u8]| {
        Demuxer::open(std::io::Cursor::new(bytes.to_vec()), bytes.len() as u64)
            .unwrap()
            .0
    };
    let whole = std::fs::read(DEMO_FOOTAGE).unwrap();
    assert_eq!(open(&whole).cut_short(), None);
    let half = &whole[..whole.len() / 2];
    let said = open(half).cut_short().expect("a WebM cut in half");
    assert!(
        said == "it says it is 1.1 MB long, but the file holds 0.6 MB (about 50% of it)",
        "{said}"
    );
    if !ffmpeg_or_skip("footage_cut_short_is_known_when_it_opens") {
        return;
    }
    let mp4 = std::fs::read(encode(
        "front.mp4",
        60,
        &["-c:v", "libx264", "-movflags", "+faststart", "-an"],
    ))
    .unwrap();
    assert_eq!(open(&mp4).cut_short(), None);
    let cut = &mp4[..mp4.len() * 2 / 3];
    let said = open(cut).cut_short().expect("an MP4 cut at two thirds");
    assert!(
        said.starts_with("it says it holds 60 frames, but only the first "),
        "{said}"
    );
}
