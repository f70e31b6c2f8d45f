//! Rust source with its comments, string literals and character literals blanked out (newlines
//! kept), so that braces, `fn` and `crate::` are counted only where they are code.

/// The source with every comment, string and character literal replaced by spaces, line for line.
pub fn blank(src: &str) -> String {
    let s: Vec<char> = src.chars().collect();
    let mut out = String::with_capacity(src.len());
    let mut i = 0;
    while i < s.len() {
        let end = if s[i] == '/' && s.get(i + 1) == Some(&'/') {
            s[i..]
                .iter()
                .position(|&c| c == '\n')
                .map_or(s.len(), |n| i + n)
        } else if s[i] == '/' && s.get(i + 1) == Some(&'*') {
            block_comment_end(&s, i)
        } else if let Some(end) = raw_string_end(&s, i) {
            end
        } else if s[i] == '"' {
            string_end(&s, i)
        } else if s[i] == '\'' {
            char_literal_end(&s, i).unwrap_or(i)
        } else {
            i
        };
        if end == i {
            out.push(s[i]);
            i += 1;
        } else {
            out.extend(
                s[i..end]
                    .iter()
                    .map(|&c| if c == '\n' { '\n' } else { ' ' }),
            );
            i = end;
        }
    }
    out
}

fn is_ident(c: char) -> bool {
    c.is_alphanumeric() || c == '_'
}

/// The end (exclusive) of the block comment that opens at `i`; block comments nest.
fn block_comment_end(s: &[char], mut i: usize) -> usize {
    let mut depth = 0;
    while i < s.len() {
        if s[i] == '/' && s.get(i + 1) == Some(&'*') {
            depth += 1;
            i += 2;
        } else if s[i] == '*' && s.get(i + 1) == Some(&'/') {
            depth -= 1;
            i += 2;
            if depth == 0 {
                return i;
            }
        } else {
            i += 1;
        }
    }
    s.len()
}

/// The end of a raw string (`r"…"`, `r#"…"#`, `br#"…"#`) that starts at `i`, if one does.
fn raw_string_end(s: &[char], i: usize) -> Option<usize> {
    if i > 0 && is_ident(s[i - 1]) {
        return None;
    }
    let r = if s[i] == 'b' || s[i] == 'c' { i + 1 } else { i };
    if s.get(r) != Some(&'r') {
        return None;
    }
    let hashes = s[r + 1..].iter().take_while(|&&c| c == '#').count();
    let open = r + 1 + hashes;
    if s.get(open) != Some(&'"') {
        return None;
    }
    let mut j = open + 1;
    while j < s.len() {
        if s[j] == '"'
            && s[j + 1..]
                .iter()
                .take(hashes)
                .filter(|&&c| c == '#')
                .count()
                == hashes
        {
            return Some(j + 1 + hashes);
        }
        j += 1;
    }
    Some(s.len())
}

/// The end of the string that opens with the quote at `i` (escapes skipped).
fn string_end(s: &[char], i: usize) -> usize {
    let mut j = i + 1;
    while j < s.len() && s[j] != '"' {
        j += if s[j] == '\\' { 2 } else { 1 };
    }
    (j + 1).min(s.len())
}

/// The end of the character literal that opens at `i` (`'x'`, `'\n'`, `'\x41'`, `'\u{2192}'`),
/// or None for a lifetime or label (`'a`).
fn char_literal_end(s: &[char], i: usize) -> Option<usize> {
    let at = |k: usize| s.get(i + k).copied();
    match at(1)? {
        '\\' => {
            let close = match at(2)? {
                'u' if at(3) == Some('{') => (i + 4..s.len().min(i + 12)).find(|&k| s[k] == '}')?,
                'x' => i + 4,
                _ => i + 2,
            };
            (s.get(close + 1) == Some(&'\'')).then_some(close + 2)
        }
        '\'' => None,
        _ => (at(2) == Some('\'')).then_some(i + 3),
    }
}

#[cfg(test)]
mod tests {
    use super::blank;

    /// Each case: source, then what is left of it, `~` standing for each blanked character.
    #[test]
    fn comments_strings_and_chars_are_blanked_and_lifetimes_kept() {
        for (src, left) in [
            ("a // b {\nc", "a ~~~~~~\nc"),
            ("a /* b /* { */ } */ c", "a ~~~~~~~~~~~~~~~~~ c"),
            ("x = \"{\\\"}\"; y", "x = ~~~~~~; y"),
            ("r#\"a\"b\"# {", "~~~~~~~~ {"),
            ("br\"\\\" {", "~~~~~ {"),
            (
                "f('{', '\\'', '\\u{7b}', '\\x41')",
                "f(~~~, ~~~~, ~~~~~~~~, ~~~~~~)",
            ),
            ("fn f<'a>(x: &'a str) {", "fn f<'a>(x: &'a str) {"),
            ("b'\"' \"x\"", "b~~~ ~~~"),
            (
                "'outer: loop { break 'outer; }",
                "'outer: loop { break 'outer; }",
            ),
            ("r = 1; \"a\nb\"", "r = 1; ~~\n~~"),
        ] {
            assert_eq!(blank(src), left.replace('~', " "), "{src}");
        }
    }
}
