//! Reading a container's header bytes held in memory: big-endian numbers, each read checked
//! against what is left, so a short or lying header is an error and never a panic.

use std::io::{Read, Seek, SeekFrom};

/// A position in a slice of bytes.
pub(crate) struct Bytes<'a> {
    data: &'a [u8],
    pos: usize,
}

/// What a reader says when a header ends before its fields do.
pub(crate) fn too_short(what: &str) -> String {
    format!("its {what} ends early (damaged?)")
}

impl<'a> Bytes<'a> {
    pub(crate) fn new(data: &'a [u8]) -> Self {
        Bytes { data, pos: 0 }
    }

    pub(crate) fn left(&self) -> usize {
        self.data.len() - self.pos
    }

    /// The next `n` bytes, or `None` (and nothing read) if fewer are left.
    pub(crate) fn take(&mut self, n: usize) -> Option<&'a [u8]> {
        let end = self.pos.checked_add(n).filter(|&e| e <= self.data.len())?;
        let out = &self.data[self.pos..end];
        self.pos = end;
        Some(out)
    }

    pub(crate) fn skip(&mut self, n: usize) -> Option<()> {
        self.take(n).map(|_| ())
    }

    pub(crate) fn u8(&mut self) -> Option<u8> {
        self.take(1).map(|b| b[0])
    }

    pub(crate) fn u16(&mut self) -> Option<u16> {
        self.take(2).map(|b| u16::from_be_bytes([b[0], b[1]]))
    }

    pub(crate) fn u24(&mut self) -> Option<u32> {
        self.take(3)
            .map(|b| u32::from_be_bytes([0, b[0], b[1], b[2]]))
    }

    pub(crate) fn u32(&mut self) -> Option<u32> {
        self.take(4)
            .map(|b| u32::from_be_bytes([b[0], b[1], b[2], b[3]]))
    }

    pub(crate) fn u64(&mut self) -> Option<u64> {
        let b = self.take(8)?;
        let mut a = [0u8; 8];
        a.copy_from_slice(b);
        Some(u64::from_be_bytes(a))
    }

    /// An unsigned number of `len` bytes (0 to 8), as EBML stores them.
    pub(crate) fn uint(&mut self, len: usize) -> Option<u64> {
        if len > 8 {
            return None;
        }
        let b = self.take(len)?;
        Some(b.iter().fold(0u64, |v, &x| (v << 8) | u64::from(x)))
    }
}

/// Reads exactly `len` bytes at the reader's position into a new buffer; `len` must already be
/// checked against a limit. A short read is "the file ends early".
pub(crate) fn read_exact_vec(reader: &mut impl Read, len: u64) -> Result<Vec<u8>, String> {
    let len = usize::try_from(len).map_err(|_| "a part too large to read".to_string())?;
    let mut data = vec![0u8; len];
    reader.read_exact(&mut data).map_err(io_message)?;
    Ok(data)
}

/// Moves the reader to `pos`.
pub(crate) fn seek_to(reader: &mut impl Seek, pos: u64) -> Result<(), String> {
    reader
        .seek(SeekFrom::Start(pos))
        .map(|_| ())
        .map_err(io_message)
}

/// An input error in words: a short read is a file cut short.
pub(crate) fn io_message(e: std::io::Error) -> String {
    if e.kind() == std::io::ErrorKind::UnexpectedEof {
        "the file ends early (cut short?)".into()
    } else {
        format!("cannot read: {e}")
    }
}

/// Fills `buf` as far as the input goes; how many bytes were read.
pub(crate) fn read_up_to(reader: &mut impl Read, buf: &mut [u8]) -> std::io::Result<usize> {
    let mut filled = 0;
    while filled < buf.len() {
        match reader.read(&mut buf[filled..]) {
            Ok(0) => break,
            Ok(n) => filled += n,
            Err(e) if e.kind() == std::io::ErrorKind::Interrupted => {}
            Err(e) => return Err(e),
        }
    }
    Ok(filled)
}
