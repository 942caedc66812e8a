//! The influence table's flags: the letter each flag is shown by, its rule with the fit's own
//! numbers, and what it says about a row. The workbench's key, `plumb influence` and the
//! summary read the same lines.

use plumb_core::regression::{
    cooks_flag_cut, Flags, InfluenceFlag, COOKS_FLAG_ROWS_CAP, LEVERAGE_FLAG_FACTOR,
    STUDENTIZED_FLAG,
};

use crate::text::{count, num, sig};

/// Where the thresholds come from.
pub const FLAG_SOURCE: &str =
    "rules of thumb: common practice, no source; the hold at 1000 rows is our own choice";

/// One flag of the key.
#[derive(Debug, Clone, PartialEq)]
pub struct FlagKey {
    /// The flag.
    pub flag: InfluenceFlag,
    /// Its rule, with the cut for this fit (`leverage above 2p/n = 0.025`).
    pub rule: String,
    /// What a flagged row is.
    pub says: &'static str,
}

/// The letter a flag is shown by in a table: `x` (unusual x), `y` (unusual y), `D` (moves the
/// fit).
pub fn flag_letter(f: InfluenceFlag) -> &'static str {
    match f {
        InfluenceFlag::HighLeverage => "x",
        InfluenceFlag::LargeResidual => "y",
        InfluenceFlag::LargeCooksDistance => "D",
    }
}

/// A row's flags as letters: `x D`.
pub fn flag_letters(flags: &Flags) -> String {
    flags.iter().map(flag_letter).collect::<Vec<_>>().join(" ")
}

/// The key of a fit of `p` terms to `n` rows, in the order x, y, D.
pub fn flag_key(n: usize, p: usize) -> Vec<FlagKey> {
    let lev = LEVERAGE_FLAG_FACTOR * p as f64 / n.max(1) as f64;
    let cook = if n <= COOKS_FLAG_ROWS_CAP {
        format!("Cook's distance above 4/n = {}", sig(cooks_flag_cut(n), 3))
    } else {
        format!(
            "Cook's distance above {} (4/n up to {} rows, held there above: 4/n would flag one row in twenty of a sound fit)",
            sig(cooks_flag_cut(n), 3),
            count(COOKS_FLAG_ROWS_CAP)
        )
    };
    vec![
        FlagKey {
            flag: InfluenceFlag::HighLeverage,
            rule: format!("leverage above 2p/n = {}", sig(lev, 3)),
            says: "an unusual x",
        },
        FlagKey {
            flag: InfluenceFlag::LargeResidual,
            rule: format!("|studentized residual| above {}", num(STUDENTIZED_FLAG)),
            says: "a y far from the fit made without the row",
        },
        FlagKey {
            flag: InfluenceFlag::LargeCooksDistance,
            rule: cook,
            says: "leaving the row out moves the fit",
        },
    ]
}

/// The key as lines: `x  leverage above 2p/n = 0.025: an unusual x`.
pub fn flag_key_lines(n: usize, p: usize) -> Vec<String> {
    flag_key(n, p)
        .into_iter()
        .map(|k| format!("{}  {}: {}", flag_letter(k.flag), k.rule, k.says))
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_key_states_each_rule_with_the_fits_cut() {
        let small = flag_key_lines(160, 2);
        assert_eq!(small[0], "x  leverage above 2p/n = 0.025: an unusual x");
        assert!(
            small[2].starts_with("D  Cook's distance above 4/n = 0.025"),
            "{small:?}"
        );
        let large = flag_key_lines(2_000_000, 2);
        assert!(
            large[2].contains("above 0.004 (4/n up to 1,000 rows"),
            "{large:?}"
        );
        assert_eq!(
            flag_letters(&Flags::of(&[
                InfluenceFlag::LargeCooksDistance,
                InfluenceFlag::HighLeverage,
            ])),
            "x D"
        );
    }
}
