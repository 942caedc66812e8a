//! One cell of a table, and how text becomes a number or a missing value.

/// Cell values that always mean "missing" (compared after trimming spaces).
pub const DEFAULT_MISSING_TOKENS: [&str; 8] = ["", "NA", "N/A", "NaN", "nan", ".", "n/a", "na"];

/// The decimal mark of numbers written as text.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum DecimalMark {
    /// `3.14`, with `,` as an optional thousands separator (`1,234.5`).
    Point,
    /// `3,14`, with `.` as an optional thousands separator (`1.234,5`).
    Comma,
}

/// A typed cell.
#[derive(Debug, Clone, PartialEq)]
pub enum Cell {
    /// Empty, or one of the missing tokens.
    Missing,
    /// A number (possibly ±∞, e.g. `1e400` or `Inf`; analyses drop such rows and say so).
    Number(f64),
    /// Anything else.
    Text(String),
}

/// Classifies cell text: missing token, number, or text.
pub(crate) fn classify(raw: &str, decimal: DecimalMark, extra_missing: &[String]) -> Cell {
    match read_cell(raw, decimal, extra_missing) {
        Ok(None) => Cell::Missing,
        Ok(Some(v)) => Cell::Number(v),
        Err(text) => Cell::Text(text.to_string()),
    }
}

/// Reads cell text without copying it: `Ok(None)` when missing (a token, or NaN), `Ok(Some)`
/// for a number, `Err` with the trimmed text otherwise.
pub(crate) fn read_cell<'a>(
    raw: &'a str,
    decimal: DecimalMark,
    extra_missing: &[String],
) -> Result<Option<f64>, &'a str> {
    let s = raw.trim();
    if is_missing(s, extra_missing) {
        return Ok(None);
    }
    match parse_number(s, decimal) {
        Some(v) if v.is_nan() => Ok(None),
        Some(v) => Ok(Some(v)),
        None => Err(s),
    }
}

pub(crate) fn is_missing(trimmed: &str, extra_missing: &[String]) -> bool {
    DEFAULT_MISSING_TOKENS.contains(&trimmed) || extra_missing.iter().any(|t| t.trim() == trimmed)
}

/// Parses a number in either decimal convention; thousands separators are accepted only in
/// well-formed groups of three (`12,345.6`, `12.345,6`), so `1,5` is never read as 15.
pub(crate) fn parse_number(s: &str, decimal: DecimalMark) -> Option<f64> {
    let (sep, mark) = match decimal {
        DecimalMark::Point => (',', '.'),
        DecimalMark::Comma => ('.', ','),
    };
    if !s.contains(sep) && mark == '.' {
        return plain(s);
    }
    let (int_part, frac_part) = match s.rfind(mark) {
        Some(i) => (&s[..i], Some(&s[i + 1..])),
        None => (s, None),
    };
    if frac_part.is_some_and(|f| f.contains(sep)) {
        return None;
    }
    let int_digits = if int_part.contains(sep) {
        ungroup(int_part, sep)?
    } else {
        int_part.to_string()
    };
    let text = match frac_part {
        Some(f) => format!("{int_digits}.{f}"),
        None => int_digits,
    };
    plain(&text)
}

fn plain(s: &str) -> Option<f64> {
    let bytes = s.as_bytes();
    // Rust accepts "inf", "infinity" and "nan" in any case; those are fine. Reject the empty
    // string and lone signs, which it also refuses, and hexadecimal-looking text, which it does too.
    if bytes.is_empty() {
        return None;
    }
    s.parse::<f64>().ok()
}

/// `1,234,567` → `1234567` when every group after the first has exactly three digits.
fn ungroup(int_part: &str, sep: char) -> Option<String> {
    let (sign, digits) = match int_part.strip_prefix(['-', '+']) {
        Some(rest) => (&int_part[..1], rest),
        None => ("", int_part),
    };
    let groups: Vec<&str> = digits.split(sep).collect();
    let first_ok = (1..=3).contains(&groups[0].len());
    let rest_ok = groups[1..].iter().all(|g| g.len() == 3);
    let all_digits = groups.iter().all(|g| g.bytes().all(|b| b.is_ascii_digit()));
    (first_ok && rest_ok && all_digits).then(|| format!("{sign}{}", groups.concat()))
}

#[cfg(test)]
mod tests {
    use super::*;

    fn num(s: &str, d: DecimalMark) -> Option<f64> {
        match classify(s, d, &[]) {
            Cell::Number(v) => Some(v),
            _ => None,
        }
    }

    #[test]
    fn reads_both_decimal_conventions() {
        assert_eq!(num("3.25", DecimalMark::Point), Some(3.25));
        assert_eq!(num("3,25", DecimalMark::Comma), Some(3.25));
        assert_eq!(num("-1.234,5", DecimalMark::Comma), Some(-1234.5));
        assert_eq!(num("1,234.5", DecimalMark::Point), Some(1234.5));
        assert_eq!(num(" 7 ", DecimalMark::Point), Some(7.0));
        assert_eq!(num("1e-3", DecimalMark::Comma), Some(0.001));
    }

    #[test]
    fn refuses_malformed_grouping() {
        assert_eq!(num("1,5", DecimalMark::Point), None);
        assert_eq!(num("12,34.5", DecimalMark::Point), None);
        assert_eq!(num("1.5", DecimalMark::Comma), None);
    }

    #[test]
    fn missing_tokens_and_text() {
        for s in ["", "NA", "N/A", "NaN", ".", " "] {
            assert_eq!(classify(s, DecimalMark::Point, &[]), Cell::Missing, "{s:?}");
        }
        assert_eq!(
            classify("-999", DecimalMark::Point, &["-999".into()]),
            Cell::Missing
        );
        assert_eq!(
            classify("n.d.", DecimalMark::Point, &[]),
            Cell::Text("n.d.".into())
        );
        assert_eq!(num("-Inf", DecimalMark::Point), Some(f64::NEG_INFINITY));
        assert_eq!(num("1e400", DecimalMark::Point), Some(f64::INFINITY));
    }
}
