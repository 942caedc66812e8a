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
pub fn csv(s: &str) -> String {
    if s.contains([',', '"', '\n', '\r']) {
        format!("\"{}\"", s.replace('"', "\"\""))
    } else {
        s.to_string()
    }
}

/// Six significant digits for people; "—" for undefined values.
pub fn num(v: f64) -> String {
    if !v.is_finite() {
        return "—".into();
    }
    let a = v.abs();
    if a != 0.0 && !(1e-4..1e7).contains(&a) {
        format!("{v:.4e}")
    } else {
        let digits = if a == 0.0 {
            0
        } else {
            a.log10().floor() as i32
        };
        let decimals = (5 - digits).clamp(0, 10) as usize;
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
            if c.term == "intercept" {
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
        assert_eq!(exact(0.1), "0.1");
        assert_eq!(exact(1.8e-21), "1.8e-21");
        assert_eq!(exact(f64::NAN), "");
        assert_eq!(shell_word("jar-tests.csv"), "jar-tests.csv");
        assert_eq!(shell_word("it's here"), "'it'\\''s here'");
    }
}
