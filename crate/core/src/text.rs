//! Reading text files of rows: the UTF-8 check, comma-separated fields, and numbers that report the
//! line and column of a mistake. Shared by every reader of detections, tracks and counts files.

use crate::error::{Error, ErrorKind};

/// The file as text: a UTF-8 byte-order mark dropped; binary files and bad UTF-8 refused with the
/// line of the first bad byte.
pub fn as_text(bytes: &[u8]) -> Result<&str, Error> {
    if looks_binary(bytes) {
        return Err(Error::new(
            ErrorKind::Binary,
            "this is a binary file, not a detections file: expected text (benchmark text, CSV) or JSON; \
             a video goes in as footage, not as detections",
        ));
    }
    part_as_text(without_bom(bytes), 1)
}

/// The bytes without a UTF-8 byte-order mark at their start.
pub fn without_bom(bytes: &[u8]) -> &[u8] {
    bytes.strip_prefix(b"\xEF\xBB\xBF").unwrap_or(bytes)
}

/// Whether a file is not text: a NUL byte in its first 64 KiB (after a byte-order mark).
pub fn looks_binary(bytes: &[u8]) -> bool {
    without_bom(bytes).iter().take(1 << 16).any(|&b| b == 0)
}

/// A part of a file, from its line `first_line` on, as text: bad UTF-8 refused with the line of
/// the first bad byte, as [`as_text`] does for a whole file.
pub fn part_as_text(bytes: &[u8], first_line: usize) -> Result<&str, Error> {
    std::str::from_utf8(bytes).map_err(|e| {
        let line = bytes[..e.valid_up_to()]
            .iter()
            .filter(|&&b| b == b'\n')
            .count()
            + first_line;
        Error::new(
            ErrorKind::Binary,
            "the file is not UTF-8 text: save it as UTF-8 (plain ASCII digits and commas are fine)",
        )
        .at(line, None)
    })
}

/// The line of `text` that starts at byte `at` as `str::lines` gives it (without its `\n` or
/// `\r\n`), and the bytes it takes with its line end.
pub fn line_at(text: &str, at: usize) -> (&str, usize) {
    let rest = text.as_bytes().get(at..).unwrap_or_default();
    let taken = rest
        .iter()
        .position(|&b| b == b'\n')
        .map_or(rest.len(), |i| i + 1);
    // Cut on bytes: a line end is always a character boundary (and a start that is not one
    // gives an empty line, not a panic).
    let raw = text.get(at..at + taken).unwrap_or_default();
    let line = raw
        .strip_suffix('\n')
        .map_or(raw, |l| l.strip_suffix('\r').unwrap_or(l));
    (line, taken)
}

/// What a line read as one field may have got wrong: another separator (a spreadsheet set to
/// another language saves `;`); "" when it holds neither `;` nor a tab.
pub fn separator_hint(line: &str) -> &'static str {
    if line.contains(';') {
        " (the file seems to use `;` between fields: save it with commas, and `.` as the decimal point)"
    } else if line.contains('\t') {
        " (the file seems to use tabs between fields: save it with commas)"
    } else {
        ""
    }
}

/// A CSV line `text` (line `line`) with `found` fields where its header names `want` columns; when
/// the line has semicolons or tabs, says that the fields must be separated by commas.
pub fn wrong_field_count(found: usize, want: usize, text: &str, line: usize) -> Error {
    let fields = if found == 1 { "field" } else { "fields" };
    let other = [(';', "semicolons"), ('\t', "tabs")]
        .into_iter()
        .find(|(c, _)| text.contains(*c));
    let hint = match other {
        Some((_, name)) => format!(
            "; fields are separated by commas, and this line has {name} (a spreadsheet set to \
             another language may save them so)"
        ),
        None if found < want => "; give a value for each column the header names, in its order \
             (an optional value, such as a class, may be left empty between two commas)"
            .to_string(),
        None if has_decimal_comma(text) => "; numbers are written with a full stop (0.9, not \
             0,9), and a value holding a comma must be in double quotes"
            .to_string(),
        None => "; a value holding a comma must be in double quotes".to_string(),
    };
    Error::new(
        ErrorKind::WrongColumnCount,
        format!("{found} {fields}, but the header names {want} columns{hint}"),
    )
    .at(line, None)
}

/// Whether a line with too many fields looks written with decimal commas: a field `0` then a
/// field of one to three digits (`…,0,9,` where the score `0.9` was meant).
fn has_decimal_comma(text: &str) -> bool {
    let fields: Vec<&str> = text.split(',').map(str::trim).collect();
    fields.windows(2).any(|w| {
        w[0] == "0" && (1..=3).contains(&w[1].len()) && w[1].bytes().all(|b| b.is_ascii_digit())
    })
}

/// The last key (`"name":`) written on line `line` (1-based) before column `column` (1-based, in
/// bytes, as serde_json counts), if there is one: the field of a value serde_json found wrong.
/// Strings are followed from the line's start, so a colon inside a value (`"0:9"`) is not taken
/// for the one after a key.
pub fn key_before(text: &str, line: usize, column: usize) -> Option<&str> {
    let row = text.lines().nth(line.checked_sub(1)?)?;
    let before = row.get(..column.min(row.len()))?;
    let bytes = before.as_bytes();
    // The last string closed (its bounds), and the key found so far.
    let (mut last, mut key) = (None, None);
    let mut i = 0;
    while i < bytes.len() {
        match bytes[i] {
            b'"' => {
                let start = i + 1;
                i = start;
                while i < bytes.len() && bytes[i] != b'"' {
                    i += if bytes[i] == b'\\' { 2 } else { 1 };
                }
                last = (i < bytes.len()).then_some((start, i));
            }
            b':' => key = last.take().or(key),
            b' ' | b'\t' => {}
            _ => last = None,
        }
        i += 1;
    }
    let (start, end) = key?;
    before.get(start..end).filter(|k| !k.is_empty())
}

/// Items as words of a sentence, the last two joined by `word`: `a`, `a and b`, `a, b and c`.
pub fn listed<S: AsRef<str>>(items: &[S], word: &str) -> String {
    match items.split_last() {
        None => String::new(),
        Some((last, [])) => last.as_ref().to_string(),
        Some((last, rest)) => {
            let rest: Vec<&str> = rest.iter().map(AsRef::as_ref).collect();
            format!("{} {word} {}", rest.join(", "), last.as_ref())
        }
    }
}

/// Splits a CSV line on commas, honouring double quotes around a field.
pub fn split_fields(line: &str) -> Vec<&str> {
    let mut fields = Vec::new();
    split_fields_into(line, &mut fields);
    fields
}

/// [`split_fields`] into a list kept from line to line (cleared first). Commas and quotes are
/// ASCII, so the bytes are looked at, not decoded: no other character's bytes can be taken for
/// them.
pub fn split_fields_into<'a>(line: &'a str, fields: &mut Vec<&'a str>) {
    fields.clear();
    let mut start = 0;
    let mut in_quotes = false;
    for (i, &b) in line.as_bytes().iter().enumerate() {
        match b {
            b'"' => in_quotes = !in_quotes,
            b',' if !in_quotes => {
                fields.push(unquote(&line[start..i]));
                start = i + 1;
            }
            _ => {}
        }
    }
    fields.push(unquote(&line[start..]));
}

/// [`str::trim`], quicker for the usual field that starts and ends with a visible ASCII
/// character: such a field has no white space to trim at either end (every other white space
/// character is a control character or space below `!`, or begins with a byte above ASCII).
pub fn trim(field: &str) -> &str {
    let visible = |b: &u8| (b'!'..=b'~').contains(b);
    let b = field.as_bytes();
    if b.first().is_some_and(visible) && b.last().is_some_and(visible) {
        field
    } else {
        field.trim()
    }
}

fn unquote(field: &str) -> &str {
    let f = trim(field);
    f.strip_prefix('"')
        .and_then(|f| f.strip_suffix('"'))
        .unwrap_or(f)
}

/// Parses the common plain form `[-]digits[.digits]` with at most 15 significant digits exactly:
/// the digits form an integer below 2^53 (exact in f64) and one division by an exact power of ten
/// rounds correctly (Clinger's fast path). Anything else returns `None` and goes to `str::parse`.
fn parse_plain_decimal(field: &str) -> Option<f64> {
    match plain_decimal_prefix(field.as_bytes()) {
        Some((v, taken)) if taken == field.len() => Some(v),
        _ => None,
    }
}

/// The plain decimal `[-]digits[.digits]` that `bytes` start with, and how many bytes it takes:
/// what [`number`] reads from a field of exactly those bytes, for a reader that cuts fields and
/// reads numbers in one pass. `None` when there are no digits, more than 15 of them, or more
/// than 16 characters after the sign (the longer forms are left to `str::parse`).
pub fn plain_decimal_prefix(bytes: &[u8]) -> Option<(f64, usize)> {
    const POW10: [f64; 16] = [
        1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11, 1e12, 1e13, 1e14, 1e15,
    ];
    let negative = bytes.first() == Some(&b'-');
    let start = usize::from(negative);
    let mut mantissa: u64 = 0;
    let mut count = 0;
    let mut point = None;
    let mut end = start;
    while let Some(&b) = bytes.get(end) {
        match b {
            b'0'..=b'9' => {
                mantissa = mantissa * 10 + u64::from(b - b'0');
                count += 1;
            }
            b'.' if point.is_none() => point = Some(end),
            _ => break,
        }
        end += 1;
        // Sixteen characters at most: the mantissa stays below 10^16, far from overflowing.
        if end - start > 16 {
            return None;
        }
    }
    let decimals = point.map_or(0, |p| end - p - 1);
    if count == 0 || count > 15 || decimals >= POW10.len() {
        return None;
    }
    let v = mantissa as f64 / POW10[decimals];
    Some((if negative { -v } else { v }, end))
}

pub fn number(field: &str, name: &str, line: usize, column: usize) -> Result<f64, Error> {
    let parsed = match parse_plain_decimal(field) {
        Some(v) => Ok(v),
        None => field.parse::<f64>(),
    };
    let v: f64 = parsed.map_err(|_| {
        let message = if field.is_empty() {
            format!("column `{name}` is empty: every row needs a number there")
        } else if field.replace(',', ".").parse::<f64>().is_ok() {
            let dotted = field.replace(',', ".");
            let after = field.rsplit(',').next().unwrap_or("");
            let lead = field.trim_start_matches('-');
            // Three digits after the comma may be a thousands separator as well as decimals
            // (not after a leading 0: `0,958`).
            let thousands = after.len() == 3
                && after.bytes().all(|b| b.is_ascii_digit())
                && !lead.starts_with('0');
            let which = if thousands {
                format!(
                    "write decimals with a full stop (`{dotted}`), and thousands without a \
                     separator (`{}`)",
                    field.replace(',', "")
                )
            } else {
                format!("write decimals with a full stop (`{dotted}`)")
            };
            format!("`{field}` in column `{name}` is not a number: {which}")
        } else {
            format!("`{field}` in column `{name}` is not a number")
        };
        Error::new(ErrorKind::BadNumber, message).at(line, Some(column))
    })?;
    if !v.is_finite() {
        return Err(Error::new(
            ErrorKind::NotFinite,
            format!("column `{name}` is `{field}`: every value must be a finite number"),
        )
        .at(line, Some(column)));
    }
    if !crate::limits::in_range(v) {
        return Err(Error::new(
            ErrorKind::BadNumber,
            format!(
                "column `{name}` is `{field}`: values beyond ±1,000,000,000,000 are not taken \
                 (no coordinate, score or frame is that large)"
            ),
        )
        .at(line, Some(column)));
    }
    Ok(v)
}

pub fn frame_number(v: f64, line: usize, column: usize) -> Result<u32, Error> {
    if v.fract() != 0.0 || v < 0.0 || v > u32::MAX as f64 {
        return Err(Error::new(
            ErrorKind::BadFrame,
            format!("frame `{v}` is not a whole number of 1 or more"),
        )
        .at(line, Some(column)));
    }
    if v == 0.0 {
        return Err(Error::new(
            ErrorKind::BadFrame,
            "frame 0 found, but frames are numbered from 1: if the file counts from 0, add 1 to every frame",
        )
        .at(line, Some(column)));
    }
    Ok(v as u32)
}

#[cfg(test)]
mod tests {
    use super::{key_before, trim};

    #[test]
    fn the_key_before_a_value_is_found_on_its_line_or_not_at_all() {
        let text = "{\n  \"frame_rate\": \"25\",\n  \"start\": \"07:30\", \"anchor\": 7\n}";
        assert_eq!(key_before(text, 2, 20), Some("frame_rate"));
        assert_eq!(key_before(text, 3, 30), Some("anchor"));
        // A colon inside a value is not a key's (a review found `"score": "0:9"` named no field);
        // a line with no key, or out of range, gives none.
        assert_eq!(key_before(text, 3, 16), Some("start"));
        assert_eq!(key_before("{\"score\": \"0:9\"}", 1, 16), Some("score"));
        assert_eq!(key_before("{\"a\\\":b\": \"x\"}", 1, 16), Some("a\\\":b"));
        assert_eq!(key_before(text, 1, 1), None);
        assert_eq!(key_before(text, 9, 1), None);
        assert_eq!(key_before(text, 0, 1), None);
    }

    #[test]
    fn items_are_listed_as_a_sentence() {
        assert_eq!(super::listed::<&str>(&[], "and"), "");
        assert_eq!(super::listed(&["7"], "and"), "7");
        assert_eq!(super::listed(&["7", "11"], "and"), "7 and 11");
        assert_eq!(super::listed(&["14", "34", "36"], "or"), "14, 34 or 36");
    }

    #[test]
    fn trim_is_str_trim() {
        // Against the standard library's own `str::trim`, on every character Unicode calls
        // white space (found by `char::is_whitespace` over all of Unicode), a control character,
        // nothing, and visible text, at either end or both.
        let mut spaces: Vec<String> = (0..=0x10FFFF)
            .filter_map(char::from_u32)
            .filter(|c| c.is_whitespace())
            .map(String::from)
            .collect();
        assert!(
            spaces.len() >= 25,
            "{} white space characters",
            spaces.len()
        );
        spaces.extend(["\u{1}".to_string(), String::new()]);
        let middles = ["", "1", "-2.5", "a b", "é", "x\u{a0}y", "1e3", "\u{feff}7"];
        for l in &spaces {
            for m in middles {
                for r in &spaces {
                    let s = format!("{l}{m}{r}");
                    assert_eq!(trim(&s), s.trim(), "{s:?}");
                }
            }
        }
    }
}
