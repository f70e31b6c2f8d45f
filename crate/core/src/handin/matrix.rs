//! Movements as an origin–destination matrix: rows are where tracks first met a line or zone, columns
//! where they last met one, with row and column totals; all classes together, then each class.

use super::table::{header, row, Separator};
use super::{header_block, Context};
use crate::report::{Movement, Report};
use std::collections::BTreeSet;

/// The matrix as CSV or tab-separated text, headed like the interval grid.
pub fn movement_matrix(report: &Report, ctx: &Context, sep: Separator) -> String {
    let mut out = String::new();
    header(&mut out, sep, &header_block(report, ctx));
    // One line or zone alone: a path from it to itself is no movement (a newcomer's re-trial
    // read "walkway → walkway" as noise).
    if report.screenlines.len() + report.zones.len() == 1 {
        row(
            &mut out,
            sep,
            &[
                "Movements from one line or zone to another (as in a turning count) need two or \
               more in the plan; this plan has one"
                    .into(),
            ],
        );
        return out;
    }
    let places: BTreeSet<&str> = report
        .movements
        .iter()
        .flat_map(|m| [m.origin.as_str(), m.destination.as_str()])
        .collect();
    let places: Vec<&str> = places.into_iter().collect();
    let classes: BTreeSet<&str> = report.movements.iter().map(|m| m.class.as_str()).collect();
    one(
        &mut out,
        sep,
        "All classes",
        &places,
        &report.movements.iter().collect::<Vec<_>>(),
    );
    if classes.len() > 1 {
        for class in classes {
            let mine: Vec<&Movement> = report
                .movements
                .iter()
                .filter(|m| m.class == class)
                .collect();
            one(&mut out, sep, &format!("Class: {class}"), &places, &mine);
        }
    }
    row(
        &mut out,
        sep,
        &[
            "Tracks that met one line or zone only (no destination)".into(),
            report.single_feature_tracks.to_string(),
        ],
    );
    out
}

/// One matrix, titled, then an empty row.
fn one(out: &mut String, sep: Separator, title: &str, places: &[&str], moves: &[&Movement]) {
    let count = |from: &str, to: &str| -> u64 {
        moves
            .iter()
            .filter(|m| m.origin == from && m.destination == to)
            .map(|m| m.count)
            .sum()
    };
    row(out, sep, &[title.to_string()]);
    let mut head = vec!["From \\ To".to_string()];
    head.extend(places.iter().map(|p| p.to_string()));
    head.push("Total".into());
    row(out, sep, &head);
    for from in places {
        let cells: Vec<u64> = places.iter().map(|to| count(from, to)).collect();
        let mut line = vec![from.to_string()];
        line.extend(cells.iter().map(u64::to_string));
        line.push(cells.iter().sum::<u64>().to_string());
        row(out, sep, &line);
    }
    let mut sums = vec!["Total".to_string()];
    let col: Vec<u64> = places
        .iter()
        .map(|to| places.iter().map(|from| count(from, to)).sum())
        .collect();
    sums.extend(col.iter().map(u64::to_string));
    sums.push(col.iter().sum::<u64>().to_string());
    row(out, sep, &sums);
    out.push('\n');
}
