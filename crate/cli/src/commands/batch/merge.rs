//! After a batch: the counts of each site's entries merged on the real clock
//! (`OUT/SITE_merged-counts.csv`), the zones' entries and exits (`OUT/SITE_merged-zones.csv`, when
//! the plans have zones) and the events behind them (`OUT/SITE_merged-events.csv`), when
//! every entry of the site was counted. A site that cannot be merged is said why, and leaves the
//! merged files of an earlier batch as they were.

use super::entry::{Job, Outcome};
use crate::files::Failure;
use crate::output::Outputs;
use std::path::{Path, PathBuf};
use throughline_core::handin::slug;
use throughline_core::report::{
    merged_counts_csv, merged_events_csv, merged_zones_csv, Part, Report,
};

/// What the merge did: the files written, and each site left unmerged with the reason.
pub struct Merged {
    pub written: Vec<PathBuf>,
    pub unmerged: Vec<String>,
}

/// Writes each site's merged counts and events.
pub fn merge_sites(jobs: &[Job], outcomes: &[Outcome], out: &Path) -> Result<Merged, Failure> {
    let mut sites: Vec<&str> = Vec::new();
    for job in jobs {
        if let Some(site) = job.value("site") {
            if !sites.contains(&site) {
                sites.push(site);
            }
        }
    }
    let stems = file_stems(&sites);
    let mut merged = Merged {
        written: Vec::new(),
        unmerged: Vec::new(),
    };
    let mut files = Outputs::new();
    let mut stale = Vec::new();
    for (site, stem) in sites.iter().zip(&stems) {
        let members: Vec<(&Job, &Outcome)> = jobs
            .iter()
            .zip(outcomes)
            .filter(|(j, _)| j.value("site") == Some(site))
            .collect();
        match site_tables(site, &members) {
            Ok(tables) => {
                // An earlier batch's zones file, when the site's plans have no zone now, would
                // look current beside the new counts: it goes once these are written.
                if !tables.iter().any(|(what, _)| *what == "zones") {
                    stale.push(out.join(format!("{stem}_merged-zones.csv")));
                }
                for (what, csv) in tables {
                    let path = out.join(format!("{stem}_merged-{what}.csv"));
                    files.write(&path, &csv)?;
                    merged.written.push(path);
                }
            }
            Err(why) => merged.unmerged.push(format!("{site}: not merged: {why}")),
        }
    }
    files.commit()?;
    for path in stale.iter().filter(|p| p.exists()) {
        std::fs::remove_file(path).map_err(|e| {
            crate::files::bad_input(path, format!("cannot remove this earlier file: {e}"))
        })?;
    }
    Ok(merged)
}

/// A site's merged counts, events and (when its plans have zones) zones' entries and exits, or
/// why they cannot be made.
fn site_tables(
    site: &str,
    members: &[(&Job, &Outcome)],
) -> Result<Vec<(&'static str, String)>, String> {
    let failed: Vec<&str> = members
        .iter()
        .filter(|(_, o)| matches!(o, Outcome::Failed(_)))
        .map(|(job, _)| job.name.as_str())
        .collect();
    if !failed.is_empty() {
        // What else keeps the site from being merged is said now too, not after the fix (a
        // newcomer's trial: clips that overlap were named only once the failed one was mended).
        let done: Vec<(&Job, &Outcome)> = members
            .iter()
            .filter(|(_, o)| !matches!(o, Outcome::Failed(_)))
            .copied()
            .collect();
        let also = match merge_done(site, &done) {
            Err(why) => format!("; and {why}"),
            Ok(_) => String::new(),
        };
        return Err(format!("{} failed{also}", failed.join(", ")));
    }
    merge_done(site, members)
}

/// [`site_tables`] of clips that were counted.
fn merge_done(
    site: &str,
    members: &[(&Job, &Outcome)],
) -> Result<Vec<(&'static str, String)>, String> {
    let mut reports = Vec::new();
    for (job, _) in members {
        let path = job.report_path();
        let text = std::fs::read_to_string(&path)
            .map_err(|e| format!("{}: cannot read the file: {e}", path.display()))?;
        reports.push(Report::from_json(&text).map_err(|e| format!("{}: {e}", path.display()))?);
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
    let counts = merged_counts_csv(site, &parts).map_err(|e| e.to_string())?;
    let events = merged_events_csv(site, &parts).map_err(|e| e.to_string())?;
    let zones = merged_zones_csv(site, &parts).map_err(|e| e.to_string())?;
    let mut tables = vec![("counts", counts), ("events", events)];
    if !zones.is_empty() {
        tables.push(("zones", zones));
    }
    Ok(tables)
}

/// A file name stem for each site: its slug (`site-N` where nothing of the name is left), made
/// unique with `-2`, `-3`… where two sites' slugs are the same.
fn file_stems(sites: &[&str]) -> Vec<String> {
    let mut stems: Vec<String> = Vec::new();
    for (k, site) in sites.iter().enumerate() {
        let base = Some(slug(site))
            .filter(|s| !s.is_empty())
            .unwrap_or_else(|| format!("site-{}", k + 1));
        let mut stem = base.clone();
        let mut n = 1;
        while stems.contains(&stem) {
            n += 1;
            stem = format!("{base}-{n}");
        }
        stems.push(stem);
    }
    stems
}

#[cfg(test)]
mod tests {
    #[test]
    fn every_site_gets_a_file_name_of_its_own() {
        assert_eq!(
            super::file_stems(&["Elm St.", "Elm St", "北", "Ñandú", "?!"]),
            ["elm-st", "elm-st-2", "北", "ñandú", "site-5"]
        );
    }
}
