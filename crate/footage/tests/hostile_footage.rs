//! Footage made to break a reader: every input the fuzzer once found crashing or hanging
//! (crate/fuzz/regressions/, read as the fuzz targets read them), and hand-made files with the
//! sizes that made the container libraries we used before abort or loop. Each must end, quickly,
//! in frames or a message.

use std::io::Cursor;
use std::path::Path;
use std::time::{Duration, Instant};

use throughline_footage::demux::Demuxer;
use throughline_footage::y4m::{Next, Reader};

/// Opens and reads every frame; the error, if any. Panics if it takes more than a few seconds.
fn read_through(bytes: Vec<u8>) -> Option<String> {
    let started = Instant::now();
    let size = bytes.len() as u64;
    let result = match Demuxer::open(Cursor::new(bytes), size) {
        Ok((mut d, _)) => loop {
            match d.next_chunk() {
                Ok(Some(_)) => {}
                Ok(None) => break None,
                Err(e) => break Some(e),
            }
        },
        Err(e) => Some(e),
    };
    assert!(
        started.elapsed() < Duration::from_secs(5),
        "took {:?}",
        started.elapsed()
    );
    result
}

fn regressions(target: &str) -> Vec<(String, Vec<u8>)> {
    let dir = Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("../fuzz/regressions")
        .join(target);
    let Ok(entries) = std::fs::read_dir(&dir) else {
        return Vec::new();
    };
    entries
        .filter_map(Result::ok)
        .map(|e| {
            (
                e.file_name().to_string_lossy().into_owned(),
                std::fs::read(e.path()).unwrap(),
            )
        })
        .collect()
}

#[test]
fn the_fuzzers_old_finds_end_in_frames_or_a_message() {
    for (name, data) in regressions("webm") {
        // As the webm target reads it: after the EBML magic.
        let mut bytes = vec![0x1A, 0x45, 0xDF, 0xA3];
        bytes.extend(data);
        let _ = read_through(bytes);
        eprintln!("webm {name}: ended");
    }
    for (name, data) in regressions("mp4") {
        let mut bytes = vec![
            0, 0, 0, 16, b'f', b't', b'y', b'p', b'i', b's', b'o', b'm', 0, 0, 2, 0,
        ];
        bytes.extend(data);
        let _ = read_through(bytes);
        eprintln!("mp4 {name}: ended");
    }
    for (name, data) in regressions("y4m") {
        if let Ok(mut r) = Reader::new(Cursor::new(data)) {
            while let Ok(Next::Frame(_)) = r.next_frame() {}
        }
        eprintln!("y4m {name}: ended");
    }
}

/// An MP4 box: size, type, body.
fn mp4_box(kind: &[u8; 4], body: &[u8]) -> Vec<u8> {
    let mut b = ((body.len() + 8) as u32).to_be_bytes().to_vec();
    b.extend_from_slice(kind);
    b.extend_from_slice(body);
    b
}

#[test]
fn mp4_sizes_that_lie_are_refused_with_a_message() {
    let ftyp = mp4_box(b"ftyp", b"isom\0\0\x02\0isom");
    // A movie header declaring 2^62 bytes (a 64-bit size): refused before anything is allocated.
    let mut huge = ftyp.clone();
    huge.extend_from_slice(&1u32.to_be_bytes());
    huge.extend_from_slice(b"moov");
    huge.extend_from_slice(&(1u64 << 62).to_be_bytes());
    let e = read_through(huge).unwrap();
    assert!(e.contains("ends early") || e.contains("larger than"), "{e}");
    // A box that says it is smaller than its header.
    let mut small = ftyp.clone();
    small.extend_from_slice(&4u32.to_be_bytes());
    small.extend_from_slice(b"free");
    let e = read_through(small).unwrap();
    assert!(e.contains("smaller than its own header"), "{e}");
    // Forty thousand empty boxes and no movie: stepped over, then a message.
    let mut empty = ftyp.clone();
    for _ in 0..40_000 {
        empty.extend_from_slice(&mp4_box(b"free", b""));
    }
    let e = read_through(empty).unwrap();
    assert!(e.contains("no movie header"), "{e}");
    // A sample table claiming four billion frames in a few bytes.
    let stsz = mp4_box(b"stsz", &[0, 0, 0, 0, 0, 0, 0, 0, 0xFF, 0xFF, 0xFF, 0xFF]);
    let e = read_through([ftyp.clone(), movie_with(&stsz)].concat()).unwrap();
    assert!(e.contains("more than") || e.contains("ends early"), "{e}");
    // One size for every frame (a few bytes) and five million frames of 100 bytes: more than the
    // file holds, refused before five million frames are listed (a fuzzing find: 0.7 s and 120 MB).
    let mut same = vec![0u8; 4];
    same.extend_from_slice(&100u32.to_be_bytes());
    same.extend_from_slice(&5_000_000u32.to_be_bytes());
    let e = read_through([ftyp.clone(), movie_with(&mp4_box(b"stsz", &same))].concat()).unwrap();
    assert!(
        e.contains("claims 5000000 frames of 100 bytes, more than its"),
        "{e}"
    );
}

/// A movie header with one video track whose sample table holds `table`.
fn movie_with(table: &[u8]) -> Vec<u8> {
    let mut entry = [0u8; 78];
    entry[24..26].copy_from_slice(&64u16.to_be_bytes());
    entry[26..28].copy_from_slice(&48u16.to_be_bytes());
    let avc = [&entry[..], &mp4_box(b"avcC", &[1, 0x64, 0, 0x1F, 0xFF])].concat();
    let stsd = mp4_box(
        b"stsd",
        &[&[0u8; 4][..], &1u32.to_be_bytes(), &mp4_box(b"avc1", &avc)].concat(),
    );
    let stbl = mp4_box(b"stbl", &[stsd, table.to_vec()].concat());
    let minf = mp4_box(b"minf", &stbl);
    let mut mdhd = vec![0u8; 12];
    mdhd.extend_from_slice(&1000u32.to_be_bytes());
    mdhd.extend_from_slice(&[0; 8]);
    let hdlr = [&[0u8; 8][..], b"vide", &[0; 12]].concat();
    let mdia = mp4_box(
        b"mdia",
        &[mp4_box(b"mdhd", &mdhd), mp4_box(b"hdlr", &hdlr), minf].concat(),
    );
    let tkhd = mp4_box(b"tkhd", &[0u8; 84]);
    let trak = mp4_box(b"trak", &[tkhd, mdia].concat());
    let mvhd = mp4_box(
        b"mvhd",
        &[&[0u8; 12][..], &1000u32.to_be_bytes(), &[0; 84]].concat(),
    );
    mp4_box(b"moov", &[mvhd, trak].concat())
}

#[test]
fn webm_sizes_that_lie_are_refused_with_a_message() {
    // The EBML header: its DocType is "webm".
    let doc = vec![
        0x1A, 0x45, 0xDF, 0xA3, 0x87, 0x42, 0x82, 0x84, b'w', b'e', b'b', b'm',
    ];
    // A segment holding only a seek head that points at itself: the old library went round for
    // ever; this reader never follows it.
    let mut looping = doc.clone();
    looping.extend_from_slice(&[
        0x18, 0x53, 0x80, 0x67, 0x01, 0xFF, 0xFF, 0xFF, 0xFF, 0xFF, 0xFF, 0xFF,
    ]);
    looping.extend_from_slice(&[
        0x11, 0x4D, 0x9B, 0x74, 0x8E, 0x4D, 0xBB, 0x8B, 0x53, 0xAB, 0x84,
    ]);
    looping.extend_from_slice(&[0x11, 0x4D, 0x9B, 0x74, 0x53, 0xAC, 0x81, 0x00]);
    let e = read_through(looping).unwrap();
    assert!(
        e.contains("before its first frame") || e.contains("track list"),
        "{e}"
    );
    // A cluster element declared 2^56 bytes long inside a segment: stepped over by its size (no
    // allocation), then the file has ended.
    let mut huge = doc.clone();
    huge.extend_from_slice(&[
        0x18, 0x53, 0x80, 0x67, 0x01, 0xFF, 0xFF, 0xFF, 0xFF, 0xFF, 0xFF, 0xFF,
    ]);
    huge.extend_from_slice(&[0xEC, 0x01, 0x00, 0xFF, 0xFF, 0xFF, 0xFF, 0xFF, 0xFE]);
    let e = read_through(huge).unwrap();
    assert!(e.contains("before its first frame"), "{e}");
    // Bytes that are no element at all.
    let mut junk = doc;
    junk.extend_from_slice(&[0x18, 0x53, 0x80, 0x67, 0x80, 0x00, 0x00, 0x00]);
    let e = read_through(junk).unwrap();
    assert!(e.contains("damaged") || e.contains("no segment"), "{e}");
}
