//! Drawings for the summary, as SVG: the plan's lines and zones over a still of the footage (or a
//! plain ground when there is none), and each line's counts per interval as bars (forward solid
//! orange, backward hatched blue, as in the page).

use super::Context;
use crate::report::{Report, ScreenlineReport};
use std::fmt::Write as _;

/// Text made safe inside HTML.
pub(super) fn esc(text: &str) -> String {
    text.replace('&', "&amp;")
        .replace('<', "&lt;")
        .replace('>', "&gt;")
        .replace('"', "&quot;")
}

const FORWARD: &str = "#E69F00";
const BACKWARD: &str = "#0072B2";
/// Key colours of lines and zones, in the plan's order (lines, then zones).
const KEYS: [&str; 7] = [
    "#CC79A7", "#009E73", "#A99BE0", "#9CCB6B", "#F0E442", "#D55E00", "#56B4E9",
];

/// The picture's size: the context's, else as far as the plan reaches.
fn size(report: &Report, ctx: &Context) -> (f64, f64) {
    if let Some(s) = ctx.picture() {
        return s;
    }
    let points = report
        .plan
        .screenlines
        .iter()
        .flat_map(|l| &l.points)
        .chain(report.plan.zones.iter().flat_map(|z| &z.polygon));
    let (w, h) = points.fold((0.0f64, 0.0f64), |(w, h), p| (w.max(p[0]), h.max(p[1])));
    ((w * 1.1).max(320.0), (h * 1.1).max(180.0))
}

/// The plan over the still.
pub(super) fn plan_sketch(report: &Report, ctx: &Context) -> String {
    let (w, h) = size(report, ctx);
    let mut s = format!("<svg xmlns=\"http://www.w3.org/2000/svg\" viewBox=\"0 0 {w} {h}\" role=\"img\" aria-label=\"the counting plan\">");
    match &ctx.still {
        Some(url) => {
            let _ = write!(
                s,
                "<image href=\"{}\" x=\"0\" y=\"0\" width=\"{w}\" height=\"{h}\"/>",
                esc(url)
            );
        }
        None => {
            let _ = write!(s, "<rect width=\"{w}\" height=\"{h}\" fill=\"#6b6f73\"/>");
        }
    }
    let lines = report.plan.screenlines.len();
    for (k, z) in report.plan.zones.iter().enumerate() {
        let key = KEYS[(lines + k) % KEYS.len()];
        let pts: Vec<String> = z
            .polygon
            .iter()
            .map(|p| format!("{},{}", p[0], p[1]))
            .collect();
        let _ = write!(
            s,
            "<polygon points=\"{}\" fill=\"{key}\" fill-opacity=\"0.18\" stroke=\"{key}\" stroke-width=\"2\"/>{}",
            pts.join(" "),
            tag(z.polygon[0], &z.name, key, (w, h))
        );
    }
    for (k, l) in report.plan.screenlines.iter().enumerate() {
        let pts: Vec<String> = l
            .points
            .iter()
            .map(|p| format!("{},{}", p[0], p[1]))
            .collect();
        let _ = write!(
            s,
            "<polyline points=\"{0}\" fill=\"none\" stroke=\"#111\" stroke-width=\"5\"/><polyline points=\"{0}\" fill=\"none\" stroke=\"#fff\" stroke-width=\"2.5\"/>",
            pts.join(" ")
        );
        s.push_str(&teeth(&l.points));
        // Which way is which, named as the counts name it (a newcomer's trial: the teeth alone
        // did not tell a manager which way was IN).
        if let Some(r) = report.screenlines.get(k) {
            s.push_str(&ways(
                &l.points,
                (&r.forward_label, &r.backward_label),
                (w, h),
            ));
        }
        if let Some(end) = l.points.last() {
            s.push_str(&tag(*end, &l.name, KEYS[k % KEYS.len()], (w, h)));
        }
    }
    s.push_str("</svg>");
    s
}

/// Orange teeth on the forward side of each segment, one per 90 px, pointing the way a forward
/// crossing goes (the page's gate).
fn teeth(points: &[[f64; 2]]) -> String {
    let mut s = String::new();
    for w in points.windows(2) {
        let (dx, dy) = (w[1][0] - w[0][0], w[1][1] - w[0][1]);
        let len = dx.hypot(dy);
        if len == 0.0 {
            continue;
        }
        // Forward is the right-hand side looking along the segment, with y down: (−dy, dx).
        let (nx, ny) = (-dy / len, dx / len);
        let (ux, uy) = (dx / len, dy / len);
        let n = (len / 90.0).floor().max(1.0) as usize;
        for i in 0..n {
            let t = (i as f64 + 0.5) / n as f64;
            let (cx, cy) = (w[0][0] + dx * t, w[0][1] + dy * t);
            let _ = write!(
                s,
                "<polygon points=\"{:.1},{:.1} {:.1},{:.1} {:.1},{:.1}\" fill=\"{FORWARD}\" stroke=\"#111\" stroke-width=\"0.8\"/>",
                cx - ux * 4.0,
                cy - uy * 4.0,
                cx + ux * 4.0,
                cy + uy * 4.0,
                cx + nx * 8.0,
                cy + ny * 8.0
            );
        }
    }
    s
}

/// The two directions' labels on either side of a line's first segment, a quarter of the way along
/// it (lines often cross at their middles) and 26 px off it, each reaching away from the line: the
/// forward one on the side its teeth point to, with the forward colour, the backward one opposite.
fn ways(points: &[[f64; 2]], (forward, backward): (&str, &str), size: (f64, f64)) -> String {
    let [a, b] = match points {
        [a, b, ..] => [*a, *b],
        _ => return String::new(),
    };
    let (dx, dy) = (b[0] - a[0], b[1] - a[1]);
    let len = dx.hypot(dy);
    if len == 0.0 {
        return String::new();
    }
    let (nx, ny) = (-dy / len * 26.0, dx / len * 26.0);
    let (mx, my) = (a[0] + dx / 4.0, a[1] + dy / 4.0);
    let side = |sign: f64, label: &str, key: &str| {
        let (x, y) = (mx + sign * nx, my + sign * ny);
        // A tag starts at its point and reaches right: on the line's left, it ends there instead.
        let width = label.chars().count() as f64 * 7.0 + 14.0;
        let x = if sign * nx < -1.0 {
            x - width - 12.0
        } else {
            x
        };
        tag([x, y + 8.0], label, key, size)
    };
    format!(
        "{}{}",
        side(1.0, forward, FORWARD),
        side(-1.0, backward, BACKWARD)
    )
}

/// A name on a dark tag near a point, kept inside the picture (`w` × `h`).
fn tag(p: [f64; 2], name: &str, key: &str, (w, h): (f64, f64)) -> String {
    let width = name.chars().count() as f64 * 7.0 + 14.0;
    let x = if p[0] + 6.0 + width > w {
        (p[0] - 6.0 - width).max(0.0)
    } else {
        p[0] + 6.0
    };
    let y = (p[1] - 20.0).clamp(0.0, (h - 16.0).max(0.0));
    let p = [x - 6.0, y + 20.0];
    format!(
        "<g font-family=\"sans-serif\" font-size=\"12\"><rect x=\"{:.1}\" y=\"{:.1}\" width=\"{:.1}\" height=\"16\" rx=\"3\" fill=\"#111\" fill-opacity=\"0.85\"/><rect x=\"{:.1}\" y=\"{:.1}\" width=\"4\" height=\"16\" fill=\"{key}\"/><text x=\"{:.1}\" y=\"{:.1}\" fill=\"#fff\">{}</text></g>",
        p[0] + 6.0,
        p[1] - 20.0,
        width,
        p[0] + 6.0,
        p[1] - 20.0,
        p[0] + 14.0,
        p[1] - 8.0,
        esc(name)
    )
}

/// A step for whole-number gridlines: 1, 2 or 5 times a power of ten, about four of them.
fn nice_step(max: u64) -> u64 {
    let mut step = 1;
    loop {
        for m in [1, 2, 5] {
            if max <= step * m * 4 {
                return step * m;
            }
        }
        step *= 10;
    }
}

/// One line's counts per interval as bars, with whole-number gridlines and a legend.
pub(super) fn interval_chart(line: &ScreenlineReport) -> String {
    let n = line.intervals.len().max(1);
    let max = line
        .intervals
        .iter()
        .map(|i| i.forward.max(i.backward))
        .max()
        .unwrap_or(0)
        .max(1);
    let step = nice_step(max);
    let top = max.div_ceil(step) * step;
    let (w, h, left, base) = (640.0, 200.0, 40.0, 170.0);
    let slot = (w - left - 10.0) / n as f64;
    let y = |v: u64| base - (base - 20.0) * v as f64 / top as f64;
    let mut s = format!(
        "<figure><svg xmlns=\"http://www.w3.org/2000/svg\" viewBox=\"0 0 {w} {h}\" role=\"img\" aria-label=\"{} per interval\" font-family=\"sans-serif\" font-size=\"11\">\
         <defs><pattern id=\"hatch\" width=\"6\" height=\"6\" patternUnits=\"userSpaceOnUse\" patternTransform=\"rotate(45)\"><rect width=\"6\" height=\"6\" fill=\"#fff\"/><rect width=\"3\" height=\"6\" fill=\"{BACKWARD}\"/></pattern></defs>",
        esc(&line.name)
    );
    let mut v = 0;
    while v <= top {
        let _ = write!(s, "<line x1=\"{left}\" x2=\"{w}\" y1=\"{0:.1}\" y2=\"{0:.1}\" stroke=\"#ddd\"/><text x=\"{1}\" y=\"{2:.1}\" text-anchor=\"end\">{v}</text>", y(v), left - 4.0, y(v) + 4.0);
        v += step;
    }
    for (i, iv) in line.intervals.iter().enumerate() {
        let x = left + slot * i as f64;
        let bar = (slot * 0.4).min(30.0);
        let _ = write!(
            s,
            "<rect x=\"{:.1}\" y=\"{:.1}\" width=\"{bar:.1}\" height=\"{:.1}\" fill=\"{FORWARD}\"/><rect x=\"{:.1}\" y=\"{:.1}\" width=\"{bar:.1}\" height=\"{:.1}\" fill=\"url(#hatch)\" stroke=\"{BACKWARD}\"/>",
            x + slot * 0.1,
            y(iv.forward),
            base - y(iv.forward),
            x + slot * 0.1 + bar,
            y(iv.backward),
            base - y(iv.backward)
        );
        if n <= 12 || i % n.div_ceil(12) == 0 {
            let label = iv.start.get(11..16).unwrap_or(&iv.start);
            let _ = write!(
                s,
                "<text x=\"{:.1}\" y=\"{}\">{}</text>",
                x + slot * 0.1,
                base + 14.0,
                esc(label)
            );
        }
    }
    let _ = writeln!(
        s,
        "</svg><figcaption>{}: <svg class=\"key\" width=\"12\" height=\"12\" aria-hidden=\"true\"><rect width=\"12\" height=\"12\" fill=\"{FORWARD}\"/></svg> {} (solid), <svg class=\"key\" width=\"12\" height=\"12\" aria-hidden=\"true\"><rect x=\"0.5\" y=\"0.5\" width=\"11\" height=\"11\" fill=\"url(#hatch)\" stroke=\"{BACKWARD}\"/></svg> {} (hatched), counts per interval.</figcaption></figure>",
        esc(&line.name),
        esc(&line.forward_label),
        esc(&line.backward_label)
    );
    s
}
