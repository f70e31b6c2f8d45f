//! Reading footage: [`y4m`] parses a YUV4MPEG2 stream (what `ffmpeg -f yuv4mpegpipe` writes) into
//! frames for the fixed-camera detector; [`demux`] reads the coded frames of WebM and MP4 files for
//! the browser's own video decoder. Both read from any `Read` (and `Seek`), never a path, so the
//! command line and the page share them.

mod bytes;
mod codec;
pub mod demux;
mod mp4;
mod webm;
pub mod y4m;
