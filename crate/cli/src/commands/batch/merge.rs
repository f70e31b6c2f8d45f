//! After a batch: the counts of each site's entries merged on the real clock
//! (`OUT/SITE_merged-counts.csv`) and the events behind them (`OUT/SITE_merged-events.csv`), when
//! every entry of the site was counted.

use super::entry::{Job, Outcome};
use crate::files::{bad_input, Failure};
use crate::output::Outputs;
use std::path::{Path, PathBuf};
use throughline_core::handin::slug;
use throughline_core::report::{merged_counts_csv, merged_events_csv, Part, Report};

/// Writes each site's merged counts; the files written, and a line for each site left unmerged.
pub fn merge_sites(
    jobs: &[Job],
    outcomes: &[Outcome],
    out: &Path,
) -> Result<(Vec<PathBuf>, Vec<String>), Failure> {
    let mut sites: Vec<&str> = Vec::new();
    for job in jobs {
        if let Some(site) = job.value("site") {
            if !sites.contains(&site) {
                sites.push(site);
            }
        }
    }
    let mut written = Vec::new();
    let mut unmerged = Vec::new();
    let mut files = Outputs::new();
    for site in sites {
        let members: Vec<(&Job, &Outcome)> = jobs
            .iter()
            .zip(outcomes)
            .filter(|(j, _)| j.value("site") == Some(site))
            .collect();
        if let Some((failed, _)) = members
            .iter()
            .find(|(_, o)| matches!(o, Outcome::Failed(_)))
        {
            unmerged.push(format!("{site}: not merged, as {} failed", failed.name));
            continue;
        }
        let mut reports = Vec::new();
        for (job, _) in &members {
            let path = job.report_path();
            let text = std::fs::read_to_string(&path)
                .map_err(|e| bad_input(&path, format!("cannot read the file: {e}")))?;
            reports.push(Report::from_json(&text).map_err(|e| bad_input(&path, e))?);
        }
        let parts: Vec<Part> = members
            .iter()
            .zip(&reports)
            .map(|((job, _), report)| Part {
                entry: &job.name,
                camera: job.value("camera").unwrap_or(""),
                report,
            })
            .collect();
        let merged = merged_counts_csv(site, &parts).and_then(|counts| {
            merged_events_csv(site, &parts).map(|events| [("counts", counts), ("events", events)])
        });
        match merged {
            Ok(tables) => {
                for (what, csv) in tables {
                    let path = out.join(format!("{}_merged-{what}.csv", slug(site)));
                    files.write(&path, &csv)?;
                    written.push(path);
                }
            }
            Err(e) => unmerged.push(format!("{site}: not merged: {e}")),
        }
    }
    files.commit()?;
    Ok((written, unmerged))
}
