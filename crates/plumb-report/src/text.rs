//! Escaping, and the number formatting every surface shares.
//!
//! The one rule for numbers shown to people, on every surface (workbench, command-line text,
//! summary). Machine-readable output (JSON, CSV) never goes through it: it keeps every digit
//! ([`exact`]).
//!
//! * A measured or estimated value has six significant digits ([`num`]; fewer where a column
//!   is narrow, [`sig`]), and trailing zeros are dropped: `1`, not `1.00000`; `-0.002`, not
//!   `-0.00200000`.
//! * A value that rounds to zero prints `0`, never `-0` or `-0.00`.
//! * Outside `[1e-4, 10^(digits + 1))` the form is scientific, with the same trimmed
//!   mantissa: `1.09e-33`, `1.23457e7`.
//! * A p-value has three significant digits and a floor ([`P_FLOOR`]): below it the text
//!   says `< 0.0001` ([`p`]), and in a sentence the relation is part of the clause
//!   (`p = 0.0676`, `p < 0.0001`: [`p_clause`]), so `p = < …` cannot be written. The exact
//!   value is in the JSON and CSV output.
//! * A count of rows, points or pairs has its thousands grouped with commas ([`count`]:
//!   `1,998,069`) and the noun agrees with it ([`plural`]: `1 point`, `2 points`).
//! * An undefined value (NaN, infinite) prints as `—`.

/// Escapes `&`, `<`, `>`, `"` and `'` for HTML text and attributes.
pub fn html(s: &str) -> String {
    let mut out = String::with_capacity(s.len());
    for c in s.chars() {
        match c {
            '&' => out.push_str("&amp;"),
            '<' => out.push_str("&lt;"),
            '>' => out.push_str("&gt;"),
            '"' => out.push_str("&quot;"),
            '\'' => out.push_str("&#39;"),
            _ => out.push(c),
        }
    }
    out
}

/// A CSV field: quoted (with doubled quotes) when it holds a comma, quote or line break.
/// A text field that a spreadsheet would take for a formula (it starts with `=`, `+`, `-`,
/// `@`, a tab or a carriage return: a column name or a reason such as `=HYPERLINK(…)`) gets a
/// leading `'`, as spreadsheet-export practice neutralizes it; numbers are written with
/// [`exact`], never through here.
pub fn csv(s: &str) -> String {
    let neutral = if s.starts_with(['=', '+', '-', '@', '\t', '\r']) {
        format!("'{s}")
    } else {
        s.to_string()
    };
    if neutral.contains([',', '"', '\n', '\r']) {
        format!("\"{}\"", neutral.replace('"', "\"\""))
    } else {
        neutral
    }
}

/// Below this a p-value is written `< 0.0001`.
pub const P_FLOOR: f64 = 1e-4;

/// Six significant digits for people (see the module's policy and [`sig`]).
pub fn num(v: f64) -> String {
    sig(v, 6)
}

/// `digits` significant digits for people (at least 1), trailing zeros dropped: fixed-point
/// between 1e-4 and `10^(digits + 1)`, scientific (`1.235e5`) outside; `0` for a value that
/// rounds to zero; "—" for undefined values.
pub fn sig(v: f64, digits: u32) -> String {
    if !v.is_finite() {
        return "—".into();
    }
    if v == 0.0 {
        return "0".into();
    }
    let digits = digits.max(1) as i32;
    // The exponent after rounding to `digits` (9.9999996 to six digits is 1e1, not 9.99…e0).
    let rounded = format!("{:.*e}", (digits - 1) as usize, v);
    let (mantissa, exponent) = rounded.split_once('e').unwrap_or((&rounded, "0"));
    let magnitude: i32 = exponent.parse().unwrap_or(0);
    if magnitude < -4 || magnitude > digits {
        return format!("{}e{magnitude}", trim_zeros(mantissa));
    }
    let decimals = (digits - 1 - magnitude).max(0) as usize;
    tidy(format!("{v:.decimals$}"))
}

/// At most `decimals` digits after the point, trailing zeros dropped (`fixed(2.5, 3)` is
/// `2.5`), scientific (`3e9`, four significant digits) from 1e7 up; `0` for a value that
/// rounds to zero; "—" when undefined.
pub fn fixed(v: f64, decimals: usize) -> String {
    if !v.is_finite() {
        "—".into()
    } else if v.abs() >= 1e7 {
        sig(v, 4)
    } else {
        tidy(format!("{v:.decimals$}"))
    }
}

/// Exactly `decimals` digits after the point, for values on one fixed scale shown side by side
/// (a grid of coefficients between −1 and 1), so that their points line up; a value that
/// rounds to zero is `0.00`, never `-0.00`; "—" when undefined.
pub fn aligned(v: f64, decimals: usize) -> String {
    if !v.is_finite() {
        return "—".into();
    }
    let s = format!("{v:.decimals$}");
    match s.strip_prefix('-') {
        Some(rest) if rest.chars().all(|c| c == '0' || c == '.') => rest.to_string(),
        _ => s,
    }
}

/// A p-value for a table cell: three significant digits (`0.0676`, `0.5`, `1`), or
/// `< 0.0001` below [`P_FLOOR`] (a p of exactly 0, a tail below the smallest double, too);
/// "—" when undefined. In a sentence use [`p_clause`].
pub fn p(v: f64) -> String {
    if !v.is_finite() {
        "—".into()
    } else if v < P_FLOOR {
        format!("< {}", fixed(P_FLOOR, 4))
    } else {
        sig(v, 3)
    }
}

/// A p-value in a sentence, with its relation: `p = 0.0676`, `p < 0.0001`, or
/// `p undefined`.
pub fn p_clause(v: f64) -> String {
    if !v.is_finite() {
        "p undefined".into()
    } else if v < P_FLOOR {
        format!("p {}", p(v))
    } else {
        format!("p = {}", p(v))
    }
}

/// A count with its thousands grouped by commas: `1,998,069`.
pub fn count(n: usize) -> String {
    let digits = n.to_string();
    let mut out = String::with_capacity(digits.len() + digits.len() / 3);
    for (i, c) in digits.chars().enumerate() {
        if i > 0 && (digits.len() - i).is_multiple_of(3) {
            out.push(',');
        }
        out.push(c);
    }
    out
}

/// A count and its noun, agreeing: `1 point`, `0 points`, `1,204 points`.
pub fn plural(n: usize, one: &str, many: &str) -> String {
    format!("{} {}", count(n), if n == 1 { one } else { many })
}

/// A share (0.021) as a percentage with three significant digits (`2.1 %`); a share below 1
/// never reads `100 %` (`> 99.9 %`).
pub fn percent(share: f64) -> String {
    let shown = sig(100.0 * share, 3);
    if shown == "100" && share < 1.0 {
        "> 99.9 %".into()
    } else {
        format!("{shown} %")
    }
}

/// Drops the trailing zeros of a fixed-point number and turns a rounded `-0` into `0`.
fn tidy(s: String) -> String {
    let t = trim_zeros(&s);
    if t.trim_start_matches('-').chars().all(|c| c == '0') {
        "0".into()
    } else {
        t.to_string()
    }
}

/// `1.500` → `1.5`, `2.000` → `2`; a number without a point is left as it is.
fn trim_zeros(s: &str) -> &str {
    if s.contains('.') {
        s.trim_end_matches('0').trim_end_matches('.')
    } else {
        s
    }
}

/// Full precision (shortest round-trip) for machine-readable files; empty when undefined.
pub fn exact(v: f64) -> String {
    if v.is_finite() {
        // Debug formatting is the shortest round-trip form, with an exponent for tiny and huge values.
        format!("{v:?}")
    } else {
        String::new()
    }
}

/// The right-hand side of a fitted model as terms `b0`, `b1·dose`, … (not escaped).
pub fn equation_terms(fit: &plumb_core::regression::LinearFit) -> Vec<String> {
    fit.coefficients
        .iter()
        .enumerate()
        .map(|(j, c)| {
            if j == 0 && plumb_core::regression::is_intercept_name(&c.term) {
                format!("b{j}")
            } else {
                format!("b{j}·{}", c.term)
            }
        })
        .collect()
}

/// `a` as one word of a POSIX shell command line (quoted only when it needs to be).
pub fn shell_word(a: &str) -> String {
    if !a.is_empty()
        && a.chars()
            .all(|c| c.is_ascii_alphanumeric() || "-_./=:,+".contains(c))
    {
        a.to_string()
    } else {
        format!("'{}'", a.replace('\'', "'\\''"))
    }
}

#[cfg(test)]
mod tests {

    #[test]
    fn aligned_keeps_its_decimals_and_never_writes_minus_zero() {
        assert_eq!(aligned(0.0, 2), "0.00");
        assert_eq!(aligned(-0.001, 2), "0.00");
        assert_eq!(aligned(-0.56, 2), "-0.56");
        assert_eq!(aligned(0.1, 2), "0.10");
        assert_eq!(aligned(f64::NAN, 2), "—");
    }

    use super::*;

    #[test]
    fn escapes_markup_and_csv_delimiters() {
        assert_eq!(
            html("<b>a & 'b'</b>"),
            "&lt;b&gt;a &amp; &#39;b&#39;&lt;/b&gt;"
        );
        assert_eq!(csv("plain"), "plain");
        assert_eq!(csv("a,\"b\""), "\"a,\"\"b\"\"\"");
        // Cells a spreadsheet would run as formulas are neutralized.
        assert_eq!(csv("=HYPERLINK(\"x\")"), "\"'=HYPERLINK(\"\"x\"\")\"");
        for live in ["+1+1", "-2+3", "@SUM(A1)", "\tx"] {
            assert!(
                csv(live).trim_start_matches('"').starts_with('\''),
                "{live}"
            );
        }
        assert_eq!(exact(0.1), "0.1");
        assert_eq!(exact(1.8e-21), "1.8e-21");
        assert_eq!(exact(f64::NAN), "");
        assert_eq!(shell_word("jar-tests.csv"), "jar-tests.csv");
        assert_eq!(shell_word("it's here"), "'it'\\''s here'");
    }

    #[test]
    fn significant_digits_drop_trailing_zeros_and_switch_to_exponents_outside_their_range() {
        assert_eq!(num(0.802_402_3), "0.802402");
        assert_eq!(num(1.0), "1");
        assert_eq!(num(1.000_000_1), "1");
        assert_eq!(num(-0.002), "-0.002");
        assert_eq!(num(12_345_678.0), "1.23457e7");
        assert_eq!(num(1e-17), "1e-17");
        assert_eq!(num(-1.09e-33), "-1.09e-33");
        assert_eq!(num(9.999_999_6), "10");
        assert_eq!(sig(9.843_004, 4), "9.843");
        assert_eq!(sig(11.8435, 4), "11.84");
        assert_eq!(sig(-0.297_967, 4), "-0.298");
        assert_eq!(sig(123_456.0, 4), "1.235e5");
        assert_eq!(sig(100_000.0, 4), "1e5");
        assert_eq!(sig(f64::NAN, 4), "—");
        assert_eq!(num(f64::INFINITY), "—");
    }

    #[test]
    fn zero_is_never_negative() {
        assert_eq!(num(0.0), "0");
        assert_eq!(num(-0.0), "0");
        assert_eq!(fixed(-0.0, 2), "0");
        assert_eq!(fixed(-0.001, 2), "0");
        assert_eq!(fixed(-0.004_9, 2), "0");
        assert_eq!(fixed(-0.005_1, 2), "-0.01");
    }

    #[test]
    fn fixed_decimals_drop_trailing_zeros() {
        assert_eq!(fixed(2.5, 2), "2.5");
        assert_eq!(fixed(1.0, 4), "1");
        assert_eq!(fixed(0.123_456, 3), "0.123");
        assert_eq!(fixed(3.0e9, 2), "3e9");
        assert_eq!(fixed(f64::NAN, 2), "—");
    }

    #[test]
    fn p_values_have_a_floor_and_the_clause_carries_the_relation() {
        assert_eq!(p(0.0676), "0.0676");
        assert_eq!(p(0.067_63), "0.0676");
        assert_eq!(p(0.5), "0.5");
        assert_eq!(p(1.0), "1");
        assert_eq!(p(0.000_123_4), "0.000123");
        assert_eq!(p(2.08e-281), "< 0.0001");
        assert_eq!(p(1e-300), "< 0.0001");
        assert_eq!(p(0.0), "< 0.0001");
        assert_eq!(p(f64::NAN), "—");
        assert_eq!(p_clause(0.0676), "p = 0.0676");
        assert_eq!(p_clause(0.0), "p < 0.0001");
        assert_eq!(p_clause(1e-300), "p < 0.0001");
        assert_eq!(p_clause(f64::NAN), "p undefined");
        for v in [0.0, 1e-300, 0.0676, 1.0] {
            assert!(!p_clause(v).contains("= <"), "{}", p_clause(v));
        }
    }

    #[test]
    fn counts_group_thousands_and_nouns_agree() {
        assert_eq!(count(0), "0");
        assert_eq!(count(999), "999");
        assert_eq!(count(1000), "1,000");
        assert_eq!(count(1_998_069), "1,998,069");
        assert_eq!(plural(1, "point", "points"), "1 point");
        assert_eq!(plural(0, "point", "points"), "0 points");
        assert_eq!(plural(12_000, "row", "rows"), "12,000 rows");
    }

    #[test]
    fn shares_read_as_percentages_that_never_round_up_to_all() {
        assert_eq!(percent(0.021), "2.1 %");
        assert_eq!(percent(0.802_4), "80.2 %");
        assert_eq!(percent(0.999_87), "> 99.9 %");
        assert_eq!(percent(1.0), "100 %");
    }
}
