//! Writing tables as a spreadsheet reads them: CSV (commas, fields quoted where needed) or
//! tab-separated text (what a spreadsheet pastes into cells from the clipboard).

/// How the cells of a row are separated.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Separator {
    /// CSV, quoting fields that hold a comma, a quote or a line break.
    Comma,
    /// Tab-separated: tabs and line breaks inside a field become spaces.
    Tab,
}

/// One row of cells, ended by a newline.
pub(super) fn row(out: &mut String, sep: Separator, cells: &[String]) {
    for (i, cell) in cells.iter().enumerate() {
        if i > 0 {
            out.push(match sep {
                Separator::Comma => ',',
                Separator::Tab => '\t',
            });
        }
        match sep {
            Separator::Comma if cell.contains([',', '"', '\n', '\r']) => {
                out.push('"');
                out.push_str(&cell.replace('"', "\"\""));
                out.push('"');
            }
            Separator::Comma => out.push_str(cell),
            Separator::Tab => out.push_str(&cell.replace(['\t', '\n', '\r'], " ")),
        }
    }
    out.push('\n');
}

/// The header block, then an empty row.
pub(super) fn header(out: &mut String, sep: Separator, block: &[(String, String)]) {
    for (name, value) in block {
        row(out, sep, &[name.clone(), value.clone()]);
    }
    out.push('\n');
}
