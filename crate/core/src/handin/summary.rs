//! The client summary: one printable page (HTML, self-contained: no script, nothing fetched) with
//! the site, the recording, a still with the lines and zones drawn, the totals, the peak hour and its
//! factor, the interval chart, how the count was checked, the caution, and what reproduces it.
//! Marks follow the visual language in DEVELOPERS.md (forward orange, backward blue hatched).

use super::sketch::{esc, interval_chart, plan_sketch};
use super::{command_line, detections_unnamed, file_stem, recording, short_hashes, Context};
use crate::report::{PeakHour, Report};
use std::fmt::Write as _;

const STYLE: &str = "body{font:14px/1.45 system-ui,sans-serif;color:#1a1a1a;max-width:60rem;margin:2rem auto;padding:0 1rem}\
h1{font-size:1.6rem;margin:0}h2{font-size:1.1rem;margin:1.6rem 0 .4rem;border-bottom:1px solid #ccc}\
table{border-collapse:collapse;margin:.4rem 0}td,th{border:1px solid #bbb;padding:.2rem .5rem;text-align:right}\
th:first-child,td:first-child{text-align:left}figure{margin:.8rem 0}svg{max-width:100%;height:auto}\
.caution{border-left:4px solid #E69F00;padding:.3rem .8rem;background:#fff8e6}code{font-size:12px}\
@media print{body{margin:0;max-width:none}h2{break-after:avoid}figure,table{break-inside:avoid}}";

/// The summary page.
pub fn summary_html(report: &Report, ctx: &Context) -> String {
    let site = ctx.site.as_deref().unwrap_or("an unnamed site");
    let mut h = String::new();
    let _ = writeln!(
        h,
        "<!doctype html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n\
         <meta http-equiv=\"Content-Security-Policy\" content=\"default-src 'none'; img-src data:; style-src 'unsafe-inline'\">\n\
         <title>Counts at {} ({})</title>\n<style>{STYLE}</style>\n</head>\n<body>\n\
         <h1>Counts at {}</h1>\n<p>Recorded {}.</p>",
        esc(site),
        esc(&file_stem(report, ctx)),
        esc(site),
        esc(&recording(report, true))
    );
    let _ = writeln!(
        h,
        "<figure>{}<figcaption>The lines and zones counted{}; each line's two directions are \
         written on the side people going that way cross to (orange, the teeth's side: \
         forward).</figcaption></figure>",
        plan_sketch(report, ctx),
        if ctx.still.is_some() {
            ", drawn on a still of the footage"
        } else {
            ""
        }
    );
    totals(&mut h, report);
    peaks(&mut h, report);
    h.push_str("<h2>Per interval</h2>\n");
    for line in &report.screenlines {
        h.push_str(&interval_chart(line));
    }
    checks(&mut h, report);
    warnings(&mut h, report, ctx);
    let _ = writeln!(
        h,
        "<h2>A word of caution</h2>\n<p class=\"caution\">{}</p>",
        esc(&report.caution)
    );
    reproduce(&mut h, report, ctx);
    h.push_str("</body>\n</html>\n");
    h
}

/// What was said about the inputs while counting, and a last interval the footage covers only in
/// part: a list a person reads before relying on the counts (nothing when there is none).
fn warnings(h: &mut String, report: &Report, ctx: &Context) {
    let items: Vec<String> = super::partial_note(report)
        .map(|n| format!("The last interval, {n}."))
        .into_iter()
        .chain(ctx.warnings.iter().cloned())
        .collect();
    if items.is_empty() {
        return;
    }
    h.push_str("<h2>Before relying on these counts</h2>\n<ul class=\"caution\">\n");
    for item in items {
        let _ = writeln!(h, "<li>{}</li>", esc(&item));
    }
    h.push_str("</ul>\n");
}

fn totals(h: &mut String, report: &Report) {
    h.push_str("<h2>Totals</h2>\n<table>\n<tr><th>Line</th><th>Forward</th><th>Backward</th><th>Total</th><th>Counted while hidden</th></tr>\n");
    for l in &report.screenlines {
        let _ = writeln!(
            h,
            "<tr><td>{}</td><td>{} {}</td><td>{} {}</td><td>{}</td><td>{}</td></tr>",
            esc(&l.name),
            l.forward,
            esc(&l.forward_label),
            l.backward,
            esc(&l.backward_label),
            l.forward + l.backward,
            l.inferred
        );
    }
    h.push_str("</table>\n");
    for z in &report.zones {
        // Tracks first seen inside are not people there at the start: a person hidden and found
        // again inside is one too (a newcomer's trial: "31 inside when the footage starts" where
        // two were, and never more than six at once).
        let most = z
            .intervals
            .iter()
            .map(|i| i.max_occupancy)
            .max()
            .unwrap_or(0);
        let _ = writeln!(
            h,
            "<p>Zone {}: {} {}, {} {}; at most {most} inside at once. {} {} first seen inside \
             (there when the footage starts, or found inside after being hidden: no entry counted), \
             {} last seen inside (no exit counted).</p>",
            esc(&z.name),
            z.entries,
            if z.entries == 1 { "entry" } else { "entries" },
            z.exits,
            if z.exits == 1 { "exit" } else { "exits" },
            z.present_at_start,
            if z.present_at_start == 1 { "track was" } else { "tracks were" },
            z.present_at_end
        );
    }
}

fn peak_text(p: &Option<PeakHour>) -> String {
    match p {
        Some(p) => format!(
            "{} to {}: {} (peak hour factor {:.3}, busiest interval {})",
            esc(&p.start),
            esc(&p.end),
            p.volume,
            p.phf,
            p.peak_interval_volume
        ),
        None => "none: the footage holds less than one hour of whole intervals".into(),
    }
}

fn peaks(h: &mut String, report: &Report) {
    h.push_str("<h2>Peak hour</h2>\n<table>\n<tr><th>Line</th><th>Both directions</th></tr>\n");
    for l in &report.screenlines {
        let _ = writeln!(
            h,
            "<tr><td>{}</td><td>{}</td></tr>",
            esc(&l.name),
            peak_text(&l.peak_hour)
        );
    }
    h.push_str("</table>\n");
}

fn checks(h: &mut String, report: &Report) {
    h.push_str("<h2>How the count was checked</h2>\n");
    if report.checks.is_empty() {
        h.push_str("<p>Not checked against a hand count of a sample: the counts are the tool's alone.</p>\n");
    }
    for c in &report.checks {
        let _ = writeln!(
            h,
            "<p>Counted by hand by {} ({}): {} to {} ({:.1} minutes).</p>\n<table>\n<tr><th>Line, direction, class</th><th>By hand</th><th>Automated</th><th>WAPD</th><th>Factor</th></tr>",
            esc(&c.who),
            esc(&c.made),
            esc(&c.from),
            esc(&c.to),
            c.seconds / 60.0
        );
        for g in &c.groups {
            let pct = |v: Option<f64>| v.map_or("n/a".into(), |x| format!("{:.1}%", 100.0 * x));
            let factor = g
                .measures
                .correction_factor
                .map_or("n/a".into(), |f| format!("{f:.3}"));
            let _ = writeln!(
                h,
                "<tr><td>{} {} {}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td></tr>",
                esc(&g.screenline),
                esc(&g.direction),
                esc(&g.class),
                g.manual,
                g.automated,
                pct(g.measures.wapd),
                factor
            );
        }
        let _ = writeln!(h, "</table>\n<p class=\"caution\">{}</p>", esc(&c.caution));
    }
    let applied = report.edits.iter().filter(|e| e.applied).count();
    let rejected: u64 = report.screenlines.iter().map(|l| l.rejected).sum();
    let added: u64 = report.screenlines.iter().map(|l| l.added).sum();
    let crossings = if rejected == 1 {
        "crossing"
    } else {
        "crossings"
    };
    let zone_rejected: u64 = report.zones.iter().map(|z| z.rejected).sum();
    let zone_added: u64 = report.zones.iter().map(|z| z.added).sum();
    let zones = if zone_rejected + zone_added > 0 {
        format!(
            "; {zone_rejected} counted zone entries or exits rejected, {zone_added} added by hand"
        )
    } else {
        String::new()
    };
    let _ = writeln!(
        h,
        "<p>Corrections after looking at the footage: {applied} applied ({} not applicable); {rejected} counted {crossings} rejected, {added} added by hand{zones}.</p>",
        report.edits.len() - applied
    );
    match &report.correction {
        None => h.push_str("<p>No correction factor applied: the counts are as counted.</p>\n"),
        Some(c) => {
            let _ = writeln!(
                h,
                "<p>A correction factor of {:.3} was chosen{}. Adjusted totals, beside the counted ones above:</p>\n<table>\n<tr><th>Line</th><th>Forward</th><th>Backward</th></tr>",
                c.factor,
                c.reason.as_deref().map(|r| format!(" ({})", esc(r))).unwrap_or_default()
            );
            for a in &c.adjusted {
                let _ = writeln!(
                    h,
                    "<tr><td>{}</td><td>{:.1}</td><td>{:.1}</td></tr>",
                    esc(&a.screenline),
                    a.forward,
                    a.backward
                );
            }
            h.push_str("</table>\n");
        }
    }
}

fn reproduce(h: &mut String, report: &Report, ctx: &Context) {
    let _ = writeln!(
        h,
        "<h2>What reproduces these numbers</h2>\n<p>Counted with {}. SHA-256 of the inputs (first twelve digits):</p>\n<ul>",
        esc(&report.generator)
    );
    for (what, hash) in short_hashes(report, ctx) {
        let _ = writeln!(h, "<li>{what}: <code>{hash}</code></li>");
    }
    let project = match &ctx.project_name {
        Some(p) => format!(
            " (<code>{}</code>: the project file the page's Save project writes, with the \
             corrections and hand counts; keep it with these files)",
            esc(p)
        ),
        None => String::new(),
    };
    let command = command_line(report, ctx);
    let placeholder = match (detections_unnamed(ctx), ctx.found_in_page) {
        (true, true) => {
            " DETECTIONS is the boxes found in the page, as its Export detections saves them."
        }
        (true, false) => " DETECTIONS is the detections file the counts were made from.",
        _ => "",
    };
    let _ = writeln!(
        h,
        "</ul>\n<p>The same numbers from those files: make a folder <code>check</code> beside \
         them (the command writes its files there, with the names of these), then, where the \
         files are: <code>{}</code>{project}.{placeholder}</p>",
        esc(&command)
    );
}
