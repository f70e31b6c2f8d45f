//! Count accuracy measures on hand-worked tables. Formulas as in NCHRP Report 797 (2014), from
//! memory (see the module notes of `accuracy.rs`): APD = mean (A-M)/M, AAPD = mean |A-M|/M,
//! WAPD = sum|A-M| / sum M, correction factor = sum M / sum A.

use throughline_core::accuracy::{compare, read_counts_csv};

fn rows(text: &str) -> Vec<throughline_core::accuracy::CountRow> {
    read_counts_csv(text.as_bytes()).expect("valid counts CSV")
}

const HEADER: &str = "screenline,direction,class,interval_start,interval_end,count\n";

#[test]
fn measures_worked_by_hand() {
    // Automated 90, 110, 50 against manual 100, 100, 50:
    // APD = (-0.1 + 0.1 + 0) / 3 = 0; AAPD = (0.1 + 0.1 + 0) / 3 = 0.0667;
    // WAPD = (10 + 10 + 0) / 250 = 0.08; factor = 250 / 250 = 1.
    let auto = rows(&format!(
        "{HEADER}deck,in,pedestrian,07:00,07:15,90\ndeck,in,pedestrian,07:15,07:30,110\ndeck,in,pedestrian,07:30,07:45,50\n"
    ));
    let manual = rows(&format!(
        "{HEADER}deck,in,,07:00,07:15,100\ndeck,in,all,07:15,07:30,100\ndeck,in,*,07:30,07:45,50\n"
    ));
    let a = compare(&auto, &manual);
    assert_eq!(a.groups.len(), 1);
    let m = &a.groups[0].measures;
    assert_eq!(
        (m.intervals, m.automated_total, m.reference_total),
        (3, 250, 250)
    );
    assert!(m.apd.unwrap().abs() < 1e-12);
    assert!((m.aapd.unwrap() - 0.2 / 3.0).abs() < 1e-12);
    assert!((m.wapd.unwrap() - 0.08).abs() < 1e-12);
    assert!((m.correction_factor.unwrap() - 1.0).abs() < 1e-12);
}

#[test]
fn a_consistent_undercount_has_negative_bias_and_a_factor_above_one() {
    // Automated 80 and 40 against 100 and 50: APD = AAPD = -0.2 / 0.2, WAPD = 30/150 = 0.2,
    // factor = 150/120 = 1.25.
    let auto = rows(&format!(
        "{HEADER}gate,out,car,a,b,80\ngate,out,car,b,c,40\n"
    ));
    let manual = rows(&format!(
        "{HEADER}gate,out,car,a,b,100\ngate,out,car,b,c,50\n"
    ));
    let m = compare(&auto, &manual).overall;
    assert!((m.apd.unwrap() + 0.2).abs() < 1e-12 && (m.aapd.unwrap() - 0.2).abs() < 1e-12);
    assert!((m.wapd.unwrap() - 0.2).abs() < 1e-12);
    assert!((m.correction_factor.unwrap() - 1.25).abs() < 1e-12);
}

#[test]
fn zero_reference_intervals_are_kept_out_of_apd_but_not_wapd() {
    let auto = rows(&format!(
        "{HEADER}gate,out,car,a,b,3\ngate,out,car,b,c,10\n"
    ));
    let manual = rows(&format!(
        "{HEADER}gate,out,car,a,b,0\ngate,out,car,b,c,10\n"
    ));
    let m = compare(&auto, &manual).overall;
    assert_eq!(m.zero_reference_intervals, 1);
    assert_eq!(m.apd, Some(0.0));
    assert!((m.wapd.unwrap() - 0.3).abs() < 1e-12);
    // A reference of none gives no factor (was 0.000, which would scale counts away).
    let none = rows(&format!("{HEADER}gate,out,car,a,b,0\n"));
    let m = compare(&auto, &none).overall;
    assert_eq!(m.correction_factor, None);
}

/// Counts of a class the reference does not name for their line are counted as left out (a
/// newcomer's trial: unclassified counts against a manual count by class gave −100% silently);
/// a reference row for all classes compares them, and lines the reference lacks are not blamed.
#[test]
fn counts_of_classes_the_reference_lacks_are_counted_as_left_out() {
    let auto = rows(&format!(
        "{HEADER}gate,out,unclassified,a,b,7\ngate,out,car,a,b,2\ndoor,in,unclassified,a,b,5\n"
    ));
    let by_class = rows(&format!("{HEADER}gate,out,car,a,b,3\ngate,out,bus,a,b,4\n"));
    assert_eq!(compare(&auto, &by_class).automated_not_compared, 7);
    let all = rows(&format!("{HEADER}gate,out,all,a,b,9\n"));
    assert_eq!(compare(&auto, &all).automated_not_compared, 0);
}

#[test]
fn unknown_lines_are_counted_and_bad_rows_named() {
    let auto = rows(&format!("{HEADER}gate,out,car,a,b,3\n"));
    let manual = rows(&format!("{HEADER}door,in,car,a,b,3\n"));
    assert_eq!(compare(&auto, &manual).unmatched_reference_rows, 1);
    let e = read_counts_csv(format!("{HEADER}gate,out,car,a,b,three\n").as_bytes()).unwrap_err();
    assert!(
        e.to_string().contains("line 2") && e.to_string().contains("three"),
        "{e}"
    );
    let e = read_counts_csv(b"line,direction,count\n").unwrap_err();
    assert!(e.to_string().contains("screenline"), "{e}");
}

/// A manual count with the same line, direction, class and interval on two rows would compare the
/// same automated count twice (10 against 11 with a factor of 1.1, for one interval of 5 and 5;
/// a newcomer's trial): it is refused, naming both lines. `7:00` and `07:00:00` are one interval.
#[test]
fn a_repeated_row_is_refused_naming_both_lines() {
    let e = read_counts_csv(
        format!("{HEADER}deck,in,all,07:00,07:15,5\ndeck,out,all,07:00,07:15,4\ndeck,in,,07:00:00,07:15:00,6\n").as_bytes(),
    )
    .unwrap_err()
    .to_string();
    assert!(
        e.contains("line 4") && e.contains("as line 2 does") && e.contains("add the two counts"),
        "{e}"
    );
    // Another class of the same interval is another row.
    assert_eq!(
        rows(&format!(
            "{HEADER}deck,in,car,07:00,07:15,5\ndeck,in,bus,07:00,07:15,1\n"
        ))
        .len(),
        2
    );
}

/// A counts file saved with `;` (a spreadsheet set to another language) says so.
#[test]
fn a_semicolon_separated_counts_file_is_named() {
    let e = read_counts_csv(b"screenline;direction;class;interval_start;interval_end;count\n")
        .unwrap_err()
        .to_string();
    assert!(e.contains("seems to use `;`"), "{e}");
}

/// A manual count may name directions `forward` and `backward`, as edits files and plans do, or by
/// the plan's labels, as the report's counts CSV does (a newcomer's trial: `forward` matched
/// nothing); both compare with the report, and a repeat across the two ways is refused. A row of
/// all classes beside a row of one class of the same interval is refused too (they would add up).
#[test]
fn forward_and_backward_are_the_reports_labels() {
    use throughline_core::accuracy::read_counts_csv_for;
    let report = serde_json::json!({"screenlines": [
        {"name": "deck", "forward_label": "in", "backward_label": "out"}]});
    let manual = read_counts_csv_for(
        format!(
            "{HEADER}deck,forward,,07:00,07:15,5\ndeck,out,,07:00,07:15,4\ngate,backward,,07:00,07:15,1\n"
        )
        .as_bytes(),
        Some(&report),
    )
    .unwrap();
    let ways: Vec<&str> = manual.iter().map(|r| r.direction.as_str()).collect();
    assert_eq!(
        ways,
        ["in", "out", "backward"],
        "a line the report lacks is left as written"
    );
    let e = read_counts_csv_for(
        format!("{HEADER}deck,forward,,07:00,07:15,5\ndeck,in,,07:00,07:15,10\n").as_bytes(),
        Some(&report),
    )
    .unwrap_err()
    .to_string();
    assert!(e.contains("line 3") && e.contains("as line 2 does"), "{e}");
    let e = read_counts_csv(
        format!("{HEADER}deck,in,car,07:00,07:15,5\ndeck,in,,07:00,07:15,9\n").as_bytes(),
    )
    .unwrap_err()
    .to_string();
    assert!(
        e.contains("line 3") && e.contains("line 2 counts car of the same interval"),
        "{e}"
    );
}
