//! One entry of a batch: its inputs resolved, whether it is done already, and its run.

use crate::output::Outputs;
use std::path::{Path, PathBuf};
use std::process::{Command, Stdio};
use std::time::Instant;
use throughline_core::fingerprint::{sha256_hex, HEAD_BYTES};
use throughline_core::manifest::Entry;

/// The columns that name files, and the `throughline run` option each becomes (`""`: the
/// detections, given without an option).
const FILE_COLUMNS: [(&str, &str); 7] = [
    ("detections", ""),
    ("footage", "--y4m"),
    ("plan", "--plan"),
    ("settings", "--config"),
    ("detector", "--detector-config"),
    ("edits", "--edits"),
    ("still", "--still"),
];

/// The columns that are values, and their `throughline run` option (`""`: recorded only).
const VALUE_COLUMNS: [(&str, &str); 5] = [
    ("site", "--site"),
    ("start", "--start"),
    ("frames", "--frames"),
    ("method", "--method"),
    ("camera", ""),
];

/// How an entry ended.
#[derive(Debug, Clone)]
pub enum Outcome {
    /// Counted now, in this many seconds.
    Done(f64),
    /// Done before with the same inputs and settings.
    Skipped,
    /// Why it could not be counted.
    Failed(String),
}

/// One entry, ready to run.
pub struct Job {
    pub name: String,
    line: usize,
    /// `OUT/NAME`.
    dir: PathBuf,
    files: Vec<(&'static str, PathBuf)>,
    values: Vec<(&'static str, String)>,
}

impl Job {
    pub fn new(entry: &Entry, base: &Path, out: &Path) -> Job {
        let files = FILE_COLUMNS
            .iter()
            .filter_map(|&(column, _)| entry.get(column).map(|v| (column, base.join(v))))
            .collect();
        let values = VALUE_COLUMNS
            .iter()
            .filter_map(|&(column, _)| entry.get(column).map(|v| (column, v.to_string())))
            .collect();
        Job {
            name: entry.name().to_string(),
            line: entry.line,
            dir: out.join(entry.name()),
            files,
            values,
        }
    }

    /// The value of a column that is not a file (`site`, `camera`, ...).
    pub fn value(&self, column: &str) -> Option<&str> {
        self.values
            .iter()
            .find(|(c, _)| *c == column)
            .map(|(_, v)| v.as_str())
    }

    /// The entry's report, once counted.
    pub fn report_path(&self) -> PathBuf {
        self.dir.join("report.json")
    }

    /// Counts the entry unless it is done already; never panics, whatever the files hold.
    pub fn run(&self) -> Outcome {
        let started = Instant::now();
        let fingerprint = match self.fingerprint() {
            Ok(f) => f,
            Err(why) => return self.failed(why),
        };
        let done_before = self.recorded_fingerprint().as_deref() == Some(fingerprint.as_str());
        if done_before && self.report_path().is_file() {
            let _ = std::fs::remove_file(self.dir.join("failed.txt"));
            return Outcome::Skipped;
        }
        if let Err(e) = std::fs::create_dir_all(&self.dir) {
            return self.failed(format!("cannot make {}: {e}", self.dir.display()));
        }
        // The record goes first: outputs put in place by a run stopped before its record is
        // written must not pass for those of the inputs recorded before.
        let _ = std::fs::remove_file(self.dir.join("entry.json"));
        let output = match self.command().output() {
            Ok(o) => o,
            Err(e) => return self.failed(format!("cannot start throughline run: {e}")),
        };
        if !output.status.success() {
            let said = String::from_utf8_lossy(&output.stderr);
            let why = said
                .lines()
                .filter(|l| !l.trim().is_empty())
                .map(|l| l.trim_start_matches("error: "))
                .collect::<Vec<_>>()
                .join(" ");
            return self.failed(if why.is_empty() {
                format!("throughline run ended with {}", output.status)
            } else {
                why
            });
        }
        self.keep_warnings(&output.stderr);
        let seconds = started.elapsed().as_secs_f64();
        match self.record(&fingerprint, seconds) {
            Ok(()) => Outcome::Done(seconds),
            Err(why) => self.failed(why),
        }
    }

    /// A counted clip's warnings (footage cut short, a frame rate other than the plan's…) are
    /// said with its name and kept in its folder (`warnings.txt`): a newcomer's re-trial handed in
    /// a cut clip as done, the run's warning lost.
    fn keep_warnings(&self, stderr: &[u8]) {
        let said = String::from_utf8_lossy(stderr);
        let warnings: Vec<&str> = said
            .lines()
            .filter(|l| l.starts_with("warning: "))
            .collect();
        let path = self.dir.join("warnings.txt");
        if warnings.is_empty() {
            let _ = std::fs::remove_file(&path);
            return;
        }
        for w in &warnings {
            eprintln!(
                "warning: {}: {}",
                self.name,
                w.trim_start_matches("warning: ")
            );
        }
        // Written beside, then renamed into place, as every output.
        let mut files = Outputs::new();
        if files.write(&path, &(warnings.join("\n") + "\n")).is_ok() {
            let _ = files.commit();
        }
    }

    /// The `throughline run` of this entry, quiet, its outputs in the entry's folder.
    fn command(&self) -> Command {
        let exe = std::env::current_exe().unwrap_or_else(|_| PathBuf::from("throughline"));
        let mut c = Command::new(exe);
        c.arg("run");
        for (column, path) in &self.files {
            let option = FILE_COLUMNS.iter().find(|(c, _)| c == column).map(|f| f.1);
            match option.filter(|o| !o.is_empty()) {
                Some(option) => {
                    let mut joined = std::ffi::OsString::from(format!("{option}="));
                    joined.push(path);
                    c.arg(joined);
                }
                // The detections, given alone: a path that starts with a dash is not an option.
                None if path.to_string_lossy().starts_with('-') => {
                    c.arg(Path::new(".").join(path));
                }
                None => {
                    c.arg(path);
                }
            }
        }
        for (column, value) in &self.values {
            let option = VALUE_COLUMNS.iter().find(|(c, _)| c == column).map(|v| v.1);
            if let Some(option) = option.filter(|o| !o.is_empty()) {
                // `--site=-North`: a value that starts with a dash stays a value.
                c.arg(format!("{option}={value}"));
            }
        }
        c.arg("-o")
            .arg(self.report_path())
            .arg("--csv")
            .arg(self.dir.join("counts.csv"))
            .arg("-q")
            .stdin(Stdio::null())
            .stdout(Stdio::null())
            .stderr(Stdio::piped());
        c
    }

    /// SHA-256 over the version of throughline, every value of the row and the content of every
    /// file it names (footage: its size and first MiB, as reading gigabytes again would cost
    /// minutes).
    fn fingerprint(&self) -> Result<String, String> {
        let mut text = format!("throughline {}\n", throughline_core::VERSION);
        for (column, value) in &self.values {
            text.push_str(&format!("{column}={value}\n"));
        }
        for (column, path) in &self.files {
            let digest = if *column == "footage" {
                head_digest(path)
            } else {
                std::fs::read(path).map(|b| sha256_hex(&b))
            };
            let digest = digest
                .map_err(|e| format!("{column} {}: cannot read the file: {e}", path.display()))?;
            text.push_str(&format!("{column}={digest}\n"));
        }
        Ok(sha256_hex(text.as_bytes()))
    }

    /// The fingerprint in the entry's record, if it was done before.
    fn recorded_fingerprint(&self) -> Option<String> {
        let bytes = std::fs::read(self.dir.join("entry.json")).ok()?;
        let record: serde_json::Value = serde_json::from_slice(&bytes).ok()?;
        record.get("fingerprint")?.as_str().map(str::to_string)
    }

    /// `entry.json`, written last: the entry is done, with these inputs.
    fn record(&self, fingerprint: &str, seconds: f64) -> Result<(), String> {
        let mut files = Outputs::new();
        let failed = self.dir.join("failed.txt");
        let record = serde_json::json!({
            "name": self.name,
            "manifest_line": self.line,
            "fingerprint": fingerprint,
            "throughline": throughline_core::VERSION,
            "seconds": (seconds * 10.0).round() / 10.0,
            "values": self.values.iter().map(|(c, v)| (c.to_string(), serde_json::Value::from(v.as_str()))).collect::<serde_json::Map<_, _>>(),
            "files": self.files.iter().map(|(c, p)| (c.to_string(), serde_json::Value::from(p.display().to_string()))).collect::<serde_json::Map<_, _>>(),
        });
        let text = format!("{record:#}\n");
        files
            .write(&self.dir.join("entry.json"), &text)
            .and_then(|()| files.commit())
            .map_err(|f| f.message)?;
        let _ = std::fs::remove_file(failed);
        Ok(())
    }

    /// Records why the entry failed (`failed.txt`), leaving its earlier outputs as they were.
    fn failed(&self, why: String) -> Outcome {
        let why = format!("line {} of the manifest: {why}", self.line);
        if std::fs::create_dir_all(&self.dir).is_ok() {
            let mut files = Outputs::new();
            let _ = files
                .write(&self.dir.join("failed.txt"), &format!("{why}\n"))
                .and_then(|()| files.commit());
        }
        Outcome::Failed(why)
    }
}

/// The size and the SHA-256 of the first MiB of a file.
fn head_digest(path: &Path) -> std::io::Result<String> {
    use std::io::Read;
    let file = std::fs::File::open(path)?;
    let size = file.metadata()?.len();
    let mut head = Vec::new();
    file.take(HEAD_BYTES as u64).read_to_end(&mut head)?;
    Ok(format!("{size}:{}", sha256_hex(&head)))
}
