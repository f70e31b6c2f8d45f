//! Writing outputs so that nothing the user made is lost. Each file is written beside its target
//! under a temporary name and renamed into place only once every output of the command is
//! written: a failure (a full disk, a bad input found late, Ctrl-C) leaves the previous files as
//! they were. Outputs that are not regular files (a pipe, a device such as /dev/null) are written
//! straight through. An output that is one of the inputs, or the same file as another output, is
//! refused before any work is done.

use crate::files::Failure;
use std::io::Write;
use std::path::{Path, PathBuf};

/// A command's outputs while it runs: written, not yet in place.
#[derive(Default)]
pub struct Outputs {
    /// Temporary file → target, in the order written.
    staged: Vec<(PathBuf, PathBuf)>,
}

fn cannot_write(path: &Path, e: impl std::fmt::Display) -> Failure {
    Failure {
        message: format!("{}: cannot write the file: {e}", path.display()),
        code: 1,
    }
}

/// Whether a path names something other than a regular file (a device, a pipe).
fn is_special(path: &Path) -> bool {
    std::fs::metadata(path).is_ok_and(|m| !m.is_file())
}

impl Outputs {
    pub fn new() -> Self {
        Outputs::default()
    }

    /// Writes `text` for `path`: to a temporary file beside it (a special file: straight).
    pub fn write(&mut self, path: &Path, text: &str) -> Result<(), Failure> {
        self.write_with(path, |f| f.write_all(text.as_bytes()))
    }

    /// Like [`Outputs::write`], the content written by `fill` (for large outputs written in parts).
    pub fn write_with(
        &mut self,
        path: &Path,
        fill: impl FnOnce(&mut dyn Write) -> std::io::Result<()>,
    ) -> Result<(), Failure> {
        self.write_from_any_thread(path, |w| fill(w))
    }

    /// Like [`Outputs::write_with`], with a writer that `fill` may hand to another thread.
    pub fn write_from_any_thread(
        &mut self,
        path: &Path,
        fill: impl FnOnce(&mut (dyn Write + Send)) -> std::io::Result<()>,
    ) -> Result<(), Failure> {
        if is_special(path) {
            let mut f = std::fs::OpenOptions::new()
                .write(true)
                .open(path)
                .map_err(|e| cannot_write(path, e))?;
            return fill(&mut f)
                .and_then(|()| f.flush())
                .map_err(|e| cannot_write(path, e));
        }
        let temp = temporary(path);
        let mut file = std::fs::File::create(&temp).map_err(|e| cannot_write(path, e))?;
        // Recorded first, so the temporary file goes away however the writing ends.
        self.staged.push((temp, path.to_path_buf()));
        let mut buffered = std::io::BufWriter::new(&mut file);
        fill(&mut buffered)
            .and_then(|()| buffered.flush())
            .map_err(|e| cannot_write(path, e))?;
        drop(buffered);
        file.sync_all().map_err(|e| cannot_write(path, e))
    }

    /// Puts every output in place.
    pub fn commit(mut self) -> Result<(), Failure> {
        for (temp, target) in std::mem::take(&mut self.staged) {
            std::fs::rename(&temp, &target).map_err(|e| {
                let _ = std::fs::remove_file(&temp);
                cannot_write(&target, e)
            })?;
        }
        Ok(())
    }
}

impl Drop for Outputs {
    /// Outputs not committed are let go: the previous files stay.
    fn drop(&mut self) {
        for (temp, _) in &self.staged {
            let _ = std::fs::remove_file(temp);
        }
    }
}

/// `.NAME.PID.partial` beside `path`.
fn temporary(path: &Path) -> PathBuf {
    let name = path
        .file_name()
        .map_or_else(|| "output".into(), |n| n.to_string_lossy().into_owned());
    path.with_file_name(format!(".{name}.{}.partial", std::process::id()))
}

/// A path as the file system resolves it: the file itself when it exists, else its folder's
/// resolved path with its name.
fn resolved(path: &Path) -> PathBuf {
    if let Ok(p) = std::fs::canonicalize(path) {
        return p;
    }
    let parent = path
        .parent()
        .filter(|p| !p.as_os_str().is_empty())
        .unwrap_or(Path::new("."));
    match (std::fs::canonicalize(parent), path.file_name()) {
        (Ok(dir), Some(name)) => dir.join(name),
        _ => path.to_path_buf(),
    }
}

/// Refuses an output that is an input or the same file as another output, or whose folder does
/// not exist (usage errors, exit 2: before any work is done).
/// Standard input and output (`-`) and special files (such as /dev/null) are not compared.
pub fn check_paths(inputs: &[Option<&Path>], outputs: &[Option<&Path>]) -> Result<(), Failure> {
    let real = |p: &&Path| *p != Path::new("-") && !is_special(p);
    let inputs: Vec<&Path> = inputs.iter().flatten().copied().filter(real).collect();
    let outputs: Vec<&Path> = outputs.iter().flatten().copied().filter(real).collect();
    for (k, out) in outputs.iter().enumerate() {
        let folder = out
            .parent()
            .filter(|p| !p.as_os_str().is_empty())
            .unwrap_or(Path::new("."));
        if !folder.is_dir() {
            return Err(Failure {
                message: format!(
                    "{}: the folder {} does not exist: create it first, or write the output \
                     elsewhere",
                    out.display(),
                    folder.display()
                ),
                code: 2,
            });
        }
        let r = resolved(out);
        if let Some(input) = inputs.iter().find(|i| resolved(i) == r) {
            return Err(Failure {
                message: format!(
                    "{} is an input ({}) and an output: writing it would lose it; choose another \
                     output file",
                    out.display(),
                    input.display()
                ),
                code: 2,
            });
        }
        if let Some(other) = outputs[..k].iter().find(|o| resolved(o) == r) {
            return Err(Failure {
                message: format!(
                    "{} and {} are the same file: give each output its own file",
                    other.display(),
                    out.display()
                ),
                code: 2,
            });
        }
    }
    Ok(())
}
