//! Escaping and number formatting shared by the HTML and CSV writers.

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

/// Six significant digits for people; "—" for undefined values (see [`sig`]).
pub fn num(v: f64) -> String {
    sig(v, 6)
}

/// `digits` significant digits for people (at least 1): fixed-point between 1e-4 and
/// `10^(digits + 1)`, scientific (`1.235e5`) outside; "—" for undefined values.
pub fn sig(v: f64, digits: u32) -> String {
    if !v.is_finite() {
        return "—".into();
    }
    let digits = digits.max(1) as i32;
    let a = v.abs();
    if a != 0.0 && !(1e-4..10f64.powi(digits + 1)).contains(&a) {
        let mantissa = (digits - 1) as usize;
        format!("{v:.mantissa$e}")
    } else {
        let magnitude = if a == 0.0 {
            0
        } else {
            a.log10().floor() as i32
        };
        let decimals = (digits - 1 - magnitude).clamp(0, 10) as usize;
        format!("{v:.decimals$}")
    }
}

/// `decimals` digits after the point, scientific (`3.000e9`) from 1e7 up; "—" when undefined.
pub fn fixed(v: f64, decimals: usize) -> String {
    if !v.is_finite() {
        "—".into()
    } else if v.abs() >= 1e7 {
        format!("{v:.3e}")
    } else {
        format!("{v:.decimals$}")
    }
}

/// A p-value for people.
pub fn p(v: f64) -> String {
    if !v.is_finite() {
        "—".into()
    } else if v == 0.0 {
        // Below the smallest positive double: the tail is too small to represent.
        "< 1e-300".into()
    } else if v < 1e-4 {
        format!("{v:.2e}")
    } else {
        format!("{v:.4}")
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
    fn significant_digits_switch_to_exponents_outside_their_range() {
        assert_eq!(num(0.802_402_3), "0.802402");
        assert_eq!(num(12_345_678.0), "1.23457e7");
        assert_eq!(sig(9.843_004, 4), "9.843");
        assert_eq!(sig(11.8435, 4), "11.84");
        assert_eq!(sig(-0.297_967, 4), "-0.2980");
        assert_eq!(sig(123_456.0, 4), "1.235e5");
        assert_eq!(sig(f64::NAN, 4), "—");
        assert_eq!(fixed(2.5, 2), "2.50");
        assert_eq!(fixed(3.0e9, 2), "3.000e9");
    }
}
