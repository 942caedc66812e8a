//! Accuracy against the NIST StRD linear-regression certified values (all eleven sets).
//!
//! Reference: NIST/ITL Statistical Reference Datasets, linear least squares, in
//! `../shared/reference/nist-strd/` (see its README). Score: log relative error (LRE).
//! Required: LRE ≥ 12 on every estimate, standard deviation, residual SD and R², except
//! Filip (degree 10, ill-conditioned), where the floor is 7.

use plumb_core::regression::{fit, Design, FitOptions, LinearFit};
use plumb_tests::{lre, nist_dir, parse_nist, NistCase};

const SETS: [&str; 11] = [
    "Norris", "Pontius", "NoInt1", "NoInt2", "Filip", "Longley", "Wampler1", "Wampler2",
    "Wampler3", "Wampler4", "Wampler5",
];

fn fit_case(case: &NistCase) -> LinearFit {
    let design = match case.degree() {
        Some(d) => Design::polynomial("x", &case.x[0], d, case.intercept).expect("degree ≤ 10"),
        None => {
            let names: Vec<String> = (1..=case.x.len()).map(|j| format!("x{j}")).collect();
            let cols: Vec<(&str, &[f64])> = names
                .iter()
                .zip(&case.x)
                .map(|(n, c)| (n.as_str(), c.as_slice()))
                .collect();
            Design::linear(&cols, case.intercept)
        }
    };
    fit(&design, &case.y, None, &FitOptions::default())
        .unwrap_or_else(|e| panic!("{}: fit failed: {e}", case.name))
}

/// The smallest LRE over everything certified, and a line describing each score.
fn score(case: &NistCase, fit: &LinearFit) -> (f64, String) {
    let mut scores = Vec::new();
    for (c, got) in case.parameters.iter().zip(&fit.coefficients) {
        scores.push(lre(got.estimate, c.estimate));
        scores.push(lre(got.std_error, c.std_dev));
    }
    let (est_min, sd_min) = scores
        .chunks(2)
        .fold((15.0_f64, 15.0_f64), |(a, b), s| (a.min(s[0]), b.min(s[1])));
    let resid = lre(fit.residual_std_error, case.residual_sd);
    let r2 = lre(fit.r_squared, case.r_squared);
    let min = est_min.min(sd_min).min(resid).min(r2);
    let line = format!(
        "{:<9} estimates {est_min:5.1}  std devs {sd_min:5.1}  residual SD {resid:5.1}  R² {r2:5.1}",
        case.name
    );
    (min, line)
}

#[test]
fn every_nist_linear_set_meets_its_accuracy_floor() {
    let Some(dir) = nist_dir() else { return };
    let mut failures = Vec::new();
    for name in SETS {
        let case = parse_nist(&dir.join(format!("{name}.dat")));
        let fit = fit_case(&case);
        assert_eq!(
            case.parameters.len(),
            fit.coefficients.len(),
            "{name}: term count"
        );
        let (min, line) = score(&case, &fit);
        let floor = if name == "Filip" { 7.0 } else { 12.0 };
        println!("{line}   (floor {floor})");
        if min < floor {
            failures.push(format!("{name}: minimum LRE {min:.2} < {floor}"));
        }
    }
    assert!(failures.is_empty(), "{}", failures.join("\n"));
}

#[test]
fn no_intercept_sets_report_uncentered_r_squared() {
    let Some(dir) = nist_dir() else { return };
    for name in ["NoInt1", "NoInt2"] {
        let fit = fit_case(&parse_nist(&dir.join(format!("{name}.dat"))));
        assert_eq!(fit.r_squared_kind.as_str(), "uncentered", "{name}");
    }
}
