//! Writing what a command produced: control characters from the data (a cell or a column name
//! holding a terminal escape sequence) shown escaped, never sent raw to a terminal; and a
//! reader that went away (`plumb columns big.csv | head`) ends the program quietly.

use std::io::Write;

/// `text` with every control character but line feed and tab shown as `\u{1b}` (text) or, in
/// JSON (which escapes C0 controls itself), DEL and the C1 controls as `\u007f`-style escapes,
/// valid inside the strings they can only occur in.
pub fn safe(text: &str) -> String {
    let json = text.starts_with('{') || text.starts_with('[');
    let mut out = String::with_capacity(text.len());
    for c in text.chars() {
        let control = c.is_control() && c != '\n' && c != '\t';
        match (control, json) {
            (false, _) => out.push(c),
            (true, true) => out.push_str(&format!("\\u{:04x}", u32::from(c))),
            (true, false) => out.push_str(&format!("\\u{{{:x}}}", u32::from(c))),
        }
    }
    out
}

/// Writes `text` to standard output. A closed pipe is not an error (the reader had enough);
/// any other failure is.
///
/// # Errors
/// A write failure other than a broken pipe.
pub fn print(text: &str) -> std::io::Result<()> {
    let mut out = std::io::stdout().lock();
    match out
        .write_all(safe(text).as_bytes())
        .and_then(|()| out.flush())
    {
        Err(e) if e.kind() == std::io::ErrorKind::BrokenPipe => Ok(()),
        other => other,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn escapes_are_shown_not_obeyed() {
        assert_eq!(safe("a\u{1b}[31mred\n"), "a\\u{1b}[31mred\n");
        assert_eq!(safe("col\tx\u{9b}2J"), "col\tx\\u{9b}2J");
        // JSON: serde_json escapes C0 itself; DEL and C1 become \u escapes inside strings.
        let json = safe("{\"name\": \"a\u{7f}b\u{9b}\"}");
        assert_eq!(json, "{\"name\": \"a\\u007fb\\u009b\"}");
        let back: serde_json::Value = serde_json::from_str(&json).expect("still JSON");
        assert_eq!(back["name"], "a\u{7f}b\u{9b}");
    }
}
