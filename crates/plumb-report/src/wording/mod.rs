//! Sentences people read in more than one place — on the command line, in the summary and in
//! the workbench: the cautions that go with every result, and the cues drawn from a pair's
//! numbers. Written once here so that every surface says the same thing.

use plumb_core::cues::{PairCues, CURVE_R2_GAIN, CURVE_R2_STRONG};

use crate::text::{num, p_clause, sig};

pub mod agreement;
pub mod calibration;
mod checks;
pub mod influence;
mod models;
pub mod numbers;

pub use checks::{check_cues, CheckCue, CHECK_ALPHA, DW_LOW};
pub use models::{box_cox, f_test, scale_note, NOT_NESTED_HINT};

/// A correlation or a fit describes association only.
pub const NOT_CAUSATION: &str = "Association is not causation.";
/// Every exclusion is written down with its reason.
pub const REASON_NEEDED: &str = "Every exclusion needs a documented reason.";
/// Where health or safety is at stake.
pub const FOLLOW_PROTOCOL: &str = "Where these results inform decisions about health or safety, follow your laboratory's validation protocol and local regulations.";
/// A single coefficient summarizes one kind of pattern.
pub const ONE_KIND_ONLY: &str = "A coefficient measures one kind of association only: a strong curved or clustered relation can give r near 0.";
/// What-if moves are not measurements.
pub const WHAT_IF_ONLY: &str =
    "Moved points are hypothetical: the data file keeps the measured values.";
/// A reported model chosen among many overstates its evidence.
pub const ONE_MODEL_OF_MANY: &str = "One model is reported here; if it was chosen among many pairs or models, its p-values overstate the evidence.";

/// The cautions that go with a fit.
pub const FIT_CAUTIONS: [&str; 3] = [NOT_CAUSATION, REASON_NEEDED, FOLLOW_PROTOCOL];
/// The cautions that go with a map of many coefficients.
pub const MAP_CAUTIONS: [&str; 3] = [NOT_CAUSATION, ONE_KIND_ONLY, FOLLOW_PROTOCOL];

/// The cautions as one line of prose.
pub fn line(cautions: &[&str]) -> String {
    cautions.join(" ")
}

/// What a cue is about.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum CueKind {
    /// A curve explains clearly more than the straight line.
    Curve,
    /// Dependence that r does not see (distance correlation, quantile-grid test).
    HiddenDependence,
    /// One row carries the association.
    OnePoint,
}

/// One cue, ready to show.
#[derive(Debug, Clone, PartialEq)]
pub struct Cue {
    /// What it is about.
    pub kind: CueKind,
    /// The sentence.
    pub text: String,
}

/// The cues of a pair, as sentences; `row_of` turns the cues' 0-based point index into the
/// data row shown to people.
pub fn pair_cues(c: &PairCues, row_of: impl Fn(usize) -> Option<usize>) -> Vec<Cue> {
    let mut cues = Vec::new();
    let curve_gain = c
        .curve_r_squared
        .is_some_and(|v| v - c.linear_r_squared >= CURVE_R2_GAIN && v >= CURVE_R2_STRONG);
    if c.nonlinear && curve_gain {
        cues.push(Cue {
            kind: CueKind::Curve,
            text: format!(
                "The pair follows a curve: a curve reaches R² {} against {} for the straight line, so r understates the relation.",
                c.curve_r_squared.map_or_else(|| "—".into(), num),
                num(c.linear_r_squared)
            ),
        });
    } else if c.nonlinear {
        let dcor = c.distance_correlation.map_or_else(
            || "not computed".into(),
            |(d, dp)| format!("{} ({})", num(d), permutation_p(dp)),
        );
        let grid = c
            .grid_independence
            .map_or_else(|| "not computed".into(), |g| p_clause(g.2));
        cues.push(Cue {
            kind: CueKind::HiddenDependence,
            text: format!(
                "x and y depend on each other in a way r does not see: distance correlation {dcor}, quantile-grid test {grid}. Look at the plot."
            ),
        });
    }
    if c.driven_by_one_point {
        let row = row_of(c.most_influential).map_or_else(|| "?".into(), |r| r.to_string());
        cues.push(Cue {
            kind: CueKind::OnePoint,
            text: format!(
                "One row carries the association: r is {} with row {row} and {} without it.",
                num(c.r),
                num(c.r_without_most_influential)
            ),
        });
    }
    cues
}

/// A permutation p-value of distance correlation: `permutation p = 0.035`, or at its floor
/// `1/(R + 1)` (no permuted value reached the observed one) `permutation p ≤ 0.005 (199
/// permutations)`, since no smaller p can come out of R permutations.
pub fn permutation_p(v: f64) -> String {
    let r = plumb_core::association::DISTANCE_PERMUTATIONS;
    let floor = 1.0 / (r + 1) as f64;
    if v <= floor * (1.0 + 1e-12) {
        format!("permutation p ≤ {} ({r} permutations)", sig(floor, 3))
    } else {
        format!("permutation {}", p_clause(v))
    }
}

/// Why no matrix is computed for a table this wide, and what to do instead.
pub fn matrix_too_wide(size: &plumb_core::association::MatrixSize) -> String {
    format!(
        "{} numeric columns make {} pairs (a matrix of about {} MB); at most {} columns are \
         compared at once",
        size.columns,
        size.pairs,
        size.bytes.div_ceil(1_000_000),
        plumb_core::association::MATRIX_MAX_COLUMNS
    )
}

/// The cue of a pair that moves together mostly through a shared drift along the row order.
pub fn shared_trend(a: &str, b: &str) -> String {
    format!("{a} and {b} move together mostly because both drift along the row order.")
}

#[cfg(test)]
mod tests {
    use super::*;

    fn cues() -> PairCues {
        PairCues {
            r: 0.62,
            linear_r_squared: 0.3844,
            curve_r_squared: Some(0.91),
            distance_correlation: Some((0.8, 0.005)),
            grid_independence: None,
            nonlinear: true,
            most_influential: 4,
            r_without_most_influential: 0.2,
            driven_by_one_point: true,
        }
    }

    #[test]
    fn a_curved_pair_driven_by_one_row_gets_both_cues_with_the_data_row() {
        let said = pair_cues(&cues(), |i| Some(i + 10));
        let kinds: Vec<CueKind> = said.iter().map(|c| c.kind).collect();
        assert_eq!(kinds, vec![CueKind::Curve, CueKind::OnePoint]);
        assert!(said[0].text.contains("R² 0.91 against"), "{}", said[0].text);
        assert!(said[1].text.contains("row 14"), "{}", said[1].text);
    }

    #[test]
    fn without_a_clear_curve_the_dependence_cue_names_its_tests() {
        let mut c = cues();
        c.curve_r_squared = Some(0.4);
        c.driven_by_one_point = false;
        let said = pair_cues(&c, |_| None);
        assert_eq!(said.len(), 1);
        assert_eq!(said[0].kind, CueKind::HiddenDependence);
        assert!(said[0].text.contains("permutation p"));
        assert_eq!(
            permutation_p(0.005),
            "permutation p ≤ 0.005 (199 permutations)"
        );
        assert_eq!(permutation_p(0.035), "permutation p = 0.035");
        assert!(line(&FIT_CAUTIONS).starts_with(NOT_CAUSATION));
    }
}
