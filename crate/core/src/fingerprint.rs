//! What a file was, to tell whether a piece of work is opened against the same one, and to name
//! exactly the inputs that reproduce a result: SHA-256 of small inputs whole, and of the first
//! megabyte of footage (reading gigabytes to say "the same footage" would cost minutes).

use schemars::JsonSchema;
use serde::{Deserialize, Serialize};
use sha2::{Digest, Sha256};

/// How much of a file the head hash covers.
pub const HEAD_BYTES: usize = 1 << 20;

/// SHA-256 of bytes, lowercase hex.
pub fn sha256_hex(bytes: &[u8]) -> String {
    Sha256::digest(bytes)
        .iter()
        .map(|b| format!("{b:02x}"))
        .collect()
}

/// A file: its name, size, the SHA-256 of its first MiB, and for footage its duration.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize, JsonSchema)]
pub struct Fingerprint {
    /// File name as it was opened (no folder: the work travels).
    pub name: String,
    /// Size in bytes.
    pub size: u64,
    /// SHA-256 of the first MiB (or the whole file when smaller), lowercase hex.
    pub head_sha256: String,
    /// Duration in seconds, for footage.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub duration_seconds: Option<f64>,
    /// Picture size in pixels, for footage.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub width: Option<u32>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub height: Option<u32>,
}

impl Fingerprint {
    /// The fingerprint of a file named `name` of `size` bytes whose first bytes are `head` (at
    /// least its first MiB, or the whole file).
    pub fn of(name: &str, size: u64, head: &[u8], duration_seconds: Option<f64>) -> Fingerprint {
        let head = &head[..head.len().min(HEAD_BYTES)];
        Fingerprint {
            name: name.to_string(),
            size,
            head_sha256: sha256_hex(head),
            duration_seconds: duration_seconds.map(|d| (d * 1000.0).round() / 1000.0),
            width: None,
            height: None,
        }
    }

    /// The first twelve hex digits of the head hash, as summaries print it.
    pub fn short(&self) -> &str {
        &self.head_sha256[..self.head_sha256.len().min(12)]
    }

    /// Why `other` is not the file this fingerprint was taken of, or `None` when it is.
    pub fn differs(&self, other: &Fingerprint) -> Option<String> {
        if self.size != other.size || self.head_sha256 != other.head_sha256 {
            return Some(format!(
                "{} is not the file this work was made with ({}, {} bytes)",
                other.name, self.name, self.size
            ));
        }
        match (self.duration_seconds, other.duration_seconds) {
            (Some(a), Some(b)) if (a - b).abs() > 0.5 => Some(format!(
                "{} lasts {b:.1} s, but the footage this work was made with lasted {a:.1} s",
                other.name
            )),
            _ => None,
        }
    }
}
