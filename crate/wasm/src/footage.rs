//! [`FootageReader`]: the page's handle on [`throughline_footage::demux`]. The footage stays a `File` in the page;
//! the reader asks for byte ranges through a JS function (in a worker, `FileReaderSync` over
//! `File.slice`), so an hour of footage never has to fit in memory.

use std::io::{BufReader, Read, Seek, SeekFrom};

use js_sys::{Function, Object, Reflect, Uint8Array};
use wasm_bindgen::prelude::*;

use throughline_footage::demux::{Demuxer, VideoTrack};

/// Bytes asked of the page at a time.
const READ_AHEAD: usize = 256 * 1024;

/// A file in the page as `Read + Seek`: `read(offset, length)` returns a `Uint8Array` of at most
/// `length` bytes (fewer only at the end).
struct PageFile {
    read: Function,
    size: u64,
    position: u64,
}

impl Read for PageFile {
    fn read(&mut self, buf: &mut [u8]) -> std::io::Result<usize> {
        let left = self.size.saturating_sub(self.position);
        let want = (buf.len() as u64).min(left);
        if want == 0 {
            return Ok(0);
        }
        let got = self
            .read
            .call2(
                &JsValue::NULL,
                &JsValue::from_f64(self.position as f64),
                &JsValue::from_f64(want as f64),
            )
            .map_err(|e| {
                std::io::Error::other(format!("the page could not read the file: {e:?}"))
            })?;
        let bytes = Uint8Array::new(&got);
        let n = (bytes.length() as usize).min(buf.len());
        if n == 0 {
            return Err(std::io::Error::new(
                std::io::ErrorKind::UnexpectedEof,
                "the file ended early",
            ));
        }
        bytes.subarray(0, n as u32).copy_to(&mut buf[..n]);
        self.position += n as u64;
        Ok(n)
    }
}

impl Seek for PageFile {
    fn seek(&mut self, to: SeekFrom) -> std::io::Result<u64> {
        let target = match to {
            SeekFrom::Start(p) => Some(p),
            SeekFrom::End(d) => self.size.checked_add_signed(d),
            SeekFrom::Current(d) => self.position.checked_add_signed(d),
        };
        self.position = target.ok_or_else(|| {
            std::io::Error::new(std::io::ErrorKind::InvalidInput, "seek before the start")
        })?;
        Ok(self.position)
    }
}

/// The video track of a WebM or MP4 file, frame by frame, for WebCodecs' `VideoDecoder`.
#[wasm_bindgen]
pub struct FootageReader {
    demuxer: Demuxer<BufReader<PageFile>>,
    track: VideoTrack,
}

#[wasm_bindgen]
impl FootageReader {
    /// Opens footage of `size` bytes read through `read(offset, length) -> Uint8Array`. Fails with
    /// a message saying why when the file is not WebM or MP4 or its video codec is unknown.
    #[wasm_bindgen(constructor)]
    pub fn new(read: Function, size: f64) -> Result<FootageReader, JsError> {
        let file = PageFile {
            read,
            size: size as u64,
            position: 0,
        };
        let (demuxer, track) =
            Demuxer::open(BufReader::with_capacity(READ_AHEAD, file), size as u64)
                .map_err(|e| JsError::new(&e))?;
        Ok(FootageReader { demuxer, track })
    }

    /// `{container, codec, description, codedWidth, codedHeight, frames}`: `codec`, `description`
    /// (a `Uint8Array` or undefined), `codedWidth` and `codedHeight` go to `VideoDecoder.configure`
    /// as they are; `frames` is the number of frames where the container says it, else undefined.
    pub fn info(&self) -> Result<JsValue, JsError> {
        let t = &self.track;
        let o = Object::new();
        let set = |k: &str, v: JsValue| Reflect::set(&o, &k.into(), &v).map(|_| ());
        let done = (|| {
            set("container", t.container.into())?;
            set("codec", t.codec.as_str().into())?;
            if let Some(d) = &t.description {
                set("description", Uint8Array::from(d.as_slice()).into())?;
            }
            set("codedWidth", t.coded_width.into())?;
            set("codedHeight", t.coded_height.into())?;
            if let Some(n) = t.frames {
                set("frames", n.into())?;
            }
            Ok::<_, JsValue>(())
        })();
        done.map_err(|e| JsError::new(&format!("{e:?}")))?;
        Ok(o.into())
    }

    /// Why the file is cut short, where its container says so before any frame is read, or
    /// undefined ([`Demuxer::cut_short`]).
    #[wasm_bindgen(js_name = cutShort)]
    pub fn cut_short(&self) -> Option<String> {
        self.demuxer.cut_short()
    }

    /// The next coded frame as `{data: Uint8Array, timestamp (µs), key}`, or null at the end.
    #[wasm_bindgen(js_name = next)]
    pub fn next_chunk(&mut self) -> Result<JsValue, JsError> {
        let Some(chunk) = self.demuxer.next_chunk().map_err(|e| JsError::new(&e))? else {
            return Ok(JsValue::NULL);
        };
        let o = Object::new();
        let data = Uint8Array::from(chunk.data.as_slice());
        for (k, v) in [
            ("data", JsValue::from(data)),
            ("timestamp", JsValue::from_f64(chunk.timestamp_us as f64)),
            ("key", JsValue::from_bool(chunk.key)),
        ] {
            Reflect::set(&o, &k.into(), &v).map_err(|e| JsError::new(&format!("{e:?}")))?;
        }
        Ok(o.into())
    }
}
