//! Footage other than YUV4MPEG2 (WebM, MP4, and whatever else it reads), decoded by `ffmpeg` in a
//! child process into a YUV4MPEG2 stream read from its output, so every command that takes
//! footage reads a phone's or a camera's video as it is. The decoders are the standard ones (the
//! page's WebCodecs decode the same pixels for VP8, VP9 and H.264), so the boxes found are the
//! page's. The child is stopped when the reading stops; a failure to decode is ffmpeg's own words.

use crate::files::{bad_input, Failure};
use std::io::{self, Read};
use std::path::{Path, PathBuf};
use std::process::{Child, ChildStderr, ChildStdout, Command, Stdio};
use std::sync::Mutex;
use std::thread::JoinHandle;

/// How much of ffmpeg's error output is kept to say why it failed (its last bytes).
const KEPT_MESSAGE: usize = 2048;

/// A video decoded by ffmpeg, read as YUV4MPEG2.
pub struct Decoded {
    child: Child,
    out: ChildStdout,
    /// Collects ffmpeg's error output (so it never fills its pipe); joined at the end.
    messages: Option<JoinHandle<String>>,
    ended: bool,
    path: PathBuf,
}

/// Starts decoding `footage` (its first video stream, as 8-bit 4:2:0). ffmpeg missing is an error
/// that says how to convert the footage instead.
pub fn decode(footage: &Path) -> Result<Decoded, Failure> {
    let mut child = Command::new("ffmpeg")
        // `-stats`: its last line says how many frames were repeated or dropped.
        .args(["-nostdin", "-hide_banner", "-v", "error", "-stats", "-i"])
        .arg(footage)
        // At a constant frame rate, the footage's own: frames missing from it (a variable frame
        // rate, frames dropped in recording) are filled, so frame numbers follow its clock, as
        // converting it to YUV4MPEG2 with ffmpeg gives them; the page fills them alike
        // (web/decoding.js, FrameGaps).
        .args(["-map", "0:v:0", "-vsync", "cfr", "-pix_fmt", "yuv420p"])
        .args(["-f", "yuv4mpegpipe", "-"])
        .stdin(Stdio::null())
        .stdout(Stdio::piped())
        .stderr(Stdio::piped())
        .spawn()
        .map_err(|e| {
            let why = match e.kind() {
                io::ErrorKind::NotFound => "ffmpeg, which decodes it, is not installed".to_string(),
                _ => format!("ffmpeg, which decodes it, could not be started: {e}"),
            };
            bad_input(
                footage,
                format!(
                    "not YUV4MPEG2, and {why}: install ffmpeg (it decodes WebM, MP4 and most \
                     video), or convert the footage where it is: ffmpeg -i {} -pix_fmt yuv420p -f \
                     yuv4mpegpipe footage.y4m",
                    footage.display()
                ),
            )
        })?;
    let (Some(out), Some(err)) = (child.stdout.take(), child.stderr.take()) else {
        let _ = child.kill();
        let _ = child.wait();
        return Err(bad_input(footage, "ffmpeg was started without its pipes"));
    };
    Ok(Decoded {
        child,
        out,
        messages: Some(std::thread::spawn(move || last_words(err))),
        ended: false,
        path: footage.to_path_buf(),
    })
}

/// ffmpeg's error output to its end, keeping the last [`KEPT_MESSAGE`] bytes.
fn last_words(mut err: ChildStderr) -> String {
    let mut kept: Vec<u8> = Vec::new();
    let mut buf = [0u8; 4096];
    while let Ok(n) = err.read(&mut buf) {
        if n == 0 {
            break;
        }
        kept.extend_from_slice(&buf[..n]);
        if kept.len() > KEPT_MESSAGE {
            // Whole lines only: a line's tail (of a progress line, say) is not a message.
            let cut = kept.len() - KEPT_MESSAGE;
            let start = kept[cut..]
                .iter()
                .position(|&b| b == b'\n' || b == b'\r')
                .map_or(kept.len(), |p| cut + p + 1);
            kept.drain(..start);
        }
    }
    String::from_utf8_lossy(&kept).trim().to_string()
}

impl Decoded {
    /// At the end of the output: an error carrying ffmpeg's words when it failed.
    fn finish(&mut self) -> io::Result<()> {
        self.ended = true;
        let status = self.child.wait()?;
        let words = self
            .messages
            .take()
            .and_then(|h| h.join().ok())
            .unwrap_or_default();
        let lines: Vec<&str> = words
            .split(['\r', '\n'])
            .map(str::trim)
            .filter(|l| !l.is_empty())
            .collect();
        // ffmpeg's progress lines (`-stats`): `frame=  750 fps=… speed=…`.
        let progress = |l: &&&str| l.starts_with("frame=") || l.contains(" speed=");
        if let Some(note) = lines.iter().rfind(progress).and_then(|l| gaps_note(l)) {
            say_once(&self.path, "gaps", &note);
        }
        let said = lines.iter().rfind(|l| !progress(l)).map(|l| plain(l));
        match (status.success(), said) {
            (true, None) => Ok(()),
            // Decoded, with a complaint (a file cut short): the frames before it are used.
            (true, Some(said)) => {
                let said =
                    format!("ffmpeg, decoding it, said: {said} (the frames it decoded are used)");
                say_once(&self.path, "said", &said);
                Ok(())
            }
            (false, said) => Err(io::Error::other(format!(
                "ffmpeg could not decode it ({}): is it a whole video file?",
                said.unwrap_or("no message")
            ))),
        }
    }
}

impl Read for Decoded {
    fn read(&mut self, buf: &mut [u8]) -> io::Result<usize> {
        if self.ended {
            return Ok(0);
        }
        let n = self.out.read(buf)?;
        if n == 0 && !buf.is_empty() {
            self.finish()?;
        }
        Ok(n)
    }
}

impl Drop for Decoded {
    fn drop(&mut self) {
        if !self.ended {
            // The reading stopped early (an error, or only the first frames were wanted).
            let _ = self.child.kill();
            let _ = self.child.wait();
        }
    }
}

/// One line of ffmpeg's without the part naming its inner workings (`[matroska,webm @ 0x…] `).
fn plain(line: &str) -> &str {
    match (line.starts_with('['), line.find("] ")) {
        (true, Some(end)) => line[end + 2..].trim(),
        _ => line.trim(),
    }
}

/// A warning of one kind about a file decoded, said once however often the file is read (the
/// detector reads it twice).
fn say_once(footage: &Path, kind: &'static str, said: &str) {
    static SAID: Mutex<Vec<(PathBuf, &'static str)>> = Mutex::new(Vec::new());
    let mut said_for = SAID.lock().unwrap_or_else(|e| e.into_inner());
    if !said_for.iter().any(|(p, k)| p == footage && *k == kind) {
        said_for.push((footage.to_path_buf(), kind));
        crate::warnings::warn(format!("{}: {said}", crate::files::file_name(footage)));
    }
}

/// What ffmpeg's last progress line (`frame=  750 … dup=50 drop=0 …`) says of frames it repeated
/// to fill gaps, or left out, to keep a constant frame rate; `None` when neither.
fn gaps_note(line: &str) -> Option<String> {
    let count = |key: &str| -> u64 {
        line.split_whitespace()
            .find_map(|w| w.strip_prefix(key))
            .and_then(|n| n.parse().ok())
            .unwrap_or(0)
    };
    let (filled, dropped) = (count("dup="), count("drop="));
    if filled == 0 && dropped == 0 {
        return None;
    }
    let mut parts = Vec::new();
    if filled > 0 {
        parts.push(format!(
            "{filled} frame{} missing from it {} filled with the pictures either side",
            if filled == 1 { "" } else { "s" },
            if filled == 1 { "was" } else { "were" }
        ));
    }
    if dropped > 0 {
        parts.push(format!(
            "{dropped} frame{} coming sooner than its frame rate allows {} left out",
            if dropped == 1 { "" } else { "s" },
            if dropped == 1 { "was" } else { "were" }
        ));
    }
    Some(format!(
        "{} (it was recorded at a variable frame rate, or the camera or recorder dropped frames), \
         so that frame numbers and times follow its clock",
        parts.join(", and ")
    ))
}

/// Whether a footage file is YUV4MPEG2 (its first bytes), else other video to decode.
pub fn is_y4m(footage: &Path) -> Result<bool, Failure> {
    let mut file = std::fs::File::open(footage)
        .map_err(|e| bad_input(footage, format!("cannot read the file: {e}")))?;
    let mut magic = [0u8; 10];
    let mut got = 0;
    while got < magic.len() {
        match file.read(&mut magic[got..]) {
            Ok(0) => break,
            Ok(n) => got += n,
            Err(e) if e.kind() == io::ErrorKind::Interrupted => {}
            Err(e) => return Err(bad_input(footage, format!("cannot read the file: {e}"))),
        }
    }
    Ok(&magic[..got] == b"YUV4MPEG2 ")
}
