//! `batch --emit-slurm`: the job scripts that spread a batch over a cluster run by the Slurm
//! scheduler: an array job with one task per entry (each `throughline batch --only K`), and a
//! merge job that starts when the array has ended and runs the batch once more (every entry done
//! is skipped; one whose task failed or was stopped is counted again; then each site is merged).

use crate::files::{bad_input, Failure};
use crate::output::Outputs;
use std::path::Path;

/// Tasks in one array job: below Slurm's default MaxArraySize (1001).
const MAX_TASKS: usize = 1000;

/// Writes `OUT/slurm/count.sbatch`, `merge.sbatch` and `submit.sh` (paths in them absolute, so
/// they run from any folder).
pub fn emit(manifest: &Path, out: &Path, entries: usize) -> Result<(), Failure> {
    let absolute = |p: &Path| {
        std::fs::canonicalize(p)
            .map(|p| p.display().to_string())
            .map_err(|e| bad_input(p, format!("cannot resolve the path: {e}")))
    };
    let paths = Paths {
        manifest: absolute(manifest)?,
        out: absolute(out)?,
        exe: std::env::current_exe()
            .map_err(|e| {
                bad_input(
                    Path::new("throughline"),
                    format!("cannot find the program itself: {e}"),
                )
            })?
            .display()
            .to_string(),
    };
    let dir = Path::new(&paths.out).join("slurm");
    std::fs::create_dir_all(&dir)
        .map_err(|e| bad_input(&dir, format!("cannot make the folder: {e}")))?;
    let (how_many, [count, merge, submit]) = scripts(&paths, &dir, entries);
    let mut files = Outputs::new();
    for (name, text) in [
        ("count.sbatch", &count),
        ("merge.sbatch", &merge),
        ("submit.sh", &submit),
    ] {
        files.write(&dir.join(name), text)?;
    }
    files.commit()?;
    make_executable(&dir.join("submit.sh"));
    eprintln!(
        "written: {0}/count.sbatch ({how_many}), {0}/merge.sbatch, {0}/submit.sh\n\
         on the cluster's login node: sh {0}/submit.sh",
        dir.display()
    );
    Ok(())
}

/// The program, the manifest and the output folder, as absolute paths.
struct Paths {
    exe: String,
    manifest: String,
    out: String,
}

/// The array job, the merge job and the submitting script, with how the entries are spread
/// ("12 entries in 12 tasks").
fn scripts(paths: &Paths, dir: &Path, entries: usize) -> (String, [String; 3]) {
    let (exe, manifest, out) = (&paths.exe, &paths.manifest, &paths.out);
    let quoted = |s: &str| format!("'{}'", s.replace('\'', "'\\''"));
    // Slurm's default MaxArraySize is 1001: past 1000 entries, task K counts entries K, K+1000, …
    let tasks = entries.min(MAX_TASKS);
    let count_of =
        |n: usize, one: &str, many: &str| format!("{n} {}", if n == 1 { one } else { many });
    let how_many = format!(
        "{} in {}",
        count_of(entries, "entry", "entries"),
        count_of(tasks, "task", "tasks")
    );
    let count = format!(
        "#!/bin/bash\n\
         # {how_many} of {manifest}, written by throughline batch --emit-slurm.\n\
         # Needs the program, the manifest, its files and the output folder on storage every node sees.\n\
         #SBATCH --job-name=throughline-count\n\
         #SBATCH --array=1-{tasks}\n\
         #SBATCH --ntasks=1\n\
         #SBATCH --cpus-per-task=1\n\
         #SBATCH --output=count-%A_%a.log\n\
         status=0\n\
         for k in $(seq \"$SLURM_ARRAY_TASK_ID\" {MAX_TASKS} {entries}); do\n\
         \x20 {exe} batch {m} --out {o} --only \"$k\" --jobs 1 --quiet || status=1\n\
         done\n\
         exit $status\n",
        exe = quoted(exe),
        m = quoted(manifest),
        o = quoted(out),
    );
    let merge = format!(
        "#!/bin/bash\n\
         # After the array job: the batch once more (done entries skipped, failed ones tried again), then each site merged.\n\
         #SBATCH --job-name=throughline-merge\n\
         #SBATCH --ntasks=1\n\
         #SBATCH --output=merge-%j.log\n\
         exec {exe} batch {m} --out {o} --quiet\n",
        exe = quoted(exe),
        m = quoted(manifest),
        o = quoted(out),
    );
    let submit = format!(
        "#!/bin/sh\n\
         # Submits the array job, then the merge job to start when every task has ended. The jobs\n\
         # start in this folder, where their logs go.\n\
         set -e\n\
         cd {dir}\n\
         count=$(sbatch --parsable count.sbatch)\n\
         count=${{count%%;*}}\n\
         merge=$(sbatch --parsable --dependency=afterany:\"$count\" merge.sbatch)\n\
         echo \"array job $count ({how_many}), merge job ${{merge%%;*}}\"\n",
        dir = quoted(&dir.display().to_string()),
    );
    (how_many, [count, merge, submit])
}

#[cfg(unix)]
fn make_executable(path: &Path) {
    use std::os::unix::fs::PermissionsExt;
    let _ = std::fs::set_permissions(path, std::fs::Permissions::from_mode(0o755));
}

#[cfg(not(unix))]
fn make_executable(_: &Path) {}
