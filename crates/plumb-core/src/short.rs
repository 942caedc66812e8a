//! Numbers in the library's own messages (a term's coefficient in a combination, a λ in a
//! label): `decimals` after the point with trailing zeros dropped and never `-0`. The people-
//! facing number policy lives in `plumb-report`'s `text`, above this layer.

/// `v` with at most `decimals` decimals, trailing zeros and a bare point dropped, `-0` as `0`.
pub(crate) fn trimmed(v: f64, decimals: usize) -> String {
    let s = format!("{v:.decimals$}");
    let s = if s.contains('.') {
        s.trim_end_matches('0').trim_end_matches('.')
    } else {
        s.as_str()
    };
    if s == "-0" {
        "0".into()
    } else {
        s.to_string()
    }
}

#[cfg(test)]
mod tests {
    use super::trimmed;

    #[test]
    fn trailing_zeros_and_negative_zero_go() {
        assert_eq!(trimmed(0.5, 4), "0.5");
        assert_eq!(trimmed(1.0, 6), "1");
        assert_eq!(trimmed(-0.00001, 4), "0");
        assert_eq!(trimmed(-2.25, 6), "-2.25");
        assert_eq!(trimmed(120.0, 0), "120");
    }
}
