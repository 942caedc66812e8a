//! Helpers shared by Plumbline's cross-crate tests: locating and parsing the NIST StRD
//! linear-regression reference files, and the log relative error used to score them.

use std::path::{Path, PathBuf};

/// Environment variable naming the NIST StRD folder (overrides the default location).
pub const NIST_DIR_VAR: &str = "PLUMB_NIST_DIR";
/// Environment variable that turns a missing reference folder into a test failure (set by CI).
pub const REQUIRE_VAR: &str = "PLUMB_REQUIRE_REFERENCE";

/// Environment variable naming a file where skipped checks are listed, one per line
/// (`scripts/check` sets it and counts them at the end, so a skip is never silent).
pub const SKIP_LOG_VAR: &str = "PLUMB_SKIP_LOG";

/// Says loudly that a check is skipped and why, and lists it in `$PLUMB_SKIP_LOG` when set.
pub fn note_skip(what: &str) {
    eprintln!("\n*** SKIPPED: {what} ***\n");
    if let Some(path) = std::env::var_os(SKIP_LOG_VAR) {
        use std::io::Write as _;
        // A log that cannot be written leaves the loud message; the skip is still said.
        if let Ok(mut f) = std::fs::OpenOptions::new()
            .create(true)
            .append(true)
            .open(path)
        {
            let _ = writeln!(f, "{what}");
        }
    }
}

/// The NIST folder: `$PLUMB_NIST_DIR`, else `../shared/reference/nist-strd` beside the checkout.
/// `None` (after a loud message) when absent and not required; panics when required.
pub fn nist_dir() -> Option<PathBuf> {
    let dir = std::env::var_os(NIST_DIR_VAR).map_or_else(
        || Path::new(env!("CARGO_MANIFEST_DIR")).join("../../shared/reference/nist-strd"),
        PathBuf::from,
    );
    if dir.is_dir() {
        return Some(dir);
    }
    let required = std::env::var_os(REQUIRE_VAR).is_some_and(|v| v != "0" && !v.is_empty());
    assert!(
        !required,
        "NIST StRD folder {} is missing and {REQUIRE_VAR} is set",
        dir.display()
    );
    note_skip(&format!(
        "NIST StRD folder {} not found; set {NIST_DIR_VAR} to run the reference checks",
        dir.display()
    ));
    None
}

/// One certified parameter: estimate and its standard deviation.
#[derive(Debug, Clone, PartialEq)]
pub struct Certified {
    /// Certified estimate.
    pub estimate: f64,
    /// Certified standard deviation of the estimate.
    pub std_dev: f64,
}

/// A parsed NIST StRD linear-regression file.
#[derive(Debug, Clone)]
pub struct NistCase {
    /// Data set name (file stem).
    pub name: String,
    /// Certified parameters, B0 (if any) first.
    pub parameters: Vec<Certified>,
    /// Whether the model has B0.
    pub intercept: bool,
    /// Certified residual standard deviation.
    pub residual_sd: f64,
    /// Certified R².
    pub r_squared: f64,
    /// Response values.
    pub y: Vec<f64>,
    /// Predictor columns.
    pub x: Vec<Vec<f64>>,
}

impl NistCase {
    /// Polynomial degree when there is one predictor and more slope parameters than one.
    pub fn degree(&self) -> Option<u32> {
        let slopes = self.parameters.len() - usize::from(self.intercept);
        (self.x.len() == 1 && slopes > 1).then_some(slopes as u32)
    }
}

/// Parses a NIST StRD `.dat` file, using the line ranges its header states.
///
/// # Panics
/// On a malformed file (the files are fixed references; a failure here is a test failure).
pub fn parse_nist(path: &Path) -> NistCase {
    let text = std::fs::read_to_string(path).expect("readable NIST file");
    let lines: Vec<&str> = text.lines().collect();
    let range = |label: &str| -> (usize, usize) {
        let line = lines
            .iter()
            .find(|l| l.trim_start().starts_with(label) && l.contains("lines"))
            .unwrap_or_else(|| panic!("{}: no '{label}' line range", path.display()));
        let numbers: Vec<usize> = line
            .split(|c: char| !c.is_ascii_digit())
            .filter_map(|s| s.parse().ok())
            .collect();
        (numbers[0], numbers[1])
    };
    let (cert_from, cert_to) = range("Certified Values");
    let (data_from, data_to) = range("Data");
    let mut parameters = Vec::new();
    let mut intercept = false;
    let mut residual_sd = f64::NAN;
    let mut r_squared = f64::NAN;
    for line in &lines[cert_from - 1..cert_to] {
        let words: Vec<&str> = line.split_whitespace().collect();
        match words.as_slice() {
            [name, est, sd, ..] if name.starts_with('B') && name[1..].parse::<u32>().is_ok() => {
                intercept |= *name == "B0";
                parameters.push(Certified {
                    estimate: number(est),
                    std_dev: number(sd),
                });
            }
            ["Standard", "Deviation", value, ..] => residual_sd = number(value),
            ["R-Squared", value, ..] => r_squared = number(value),
            _ => {}
        }
    }
    assert!(
        residual_sd.is_finite() && r_squared.is_finite() && !parameters.is_empty(),
        "{}: the certified values (parameters, residual SD, R²) did not all parse",
        path.display()
    );
    let rows: Vec<Vec<f64>> = lines[data_from - 1..data_to]
        .iter()
        .map(|l| l.split_whitespace().map(number).collect::<Vec<f64>>())
        .filter(|r| !r.is_empty())
        .collect();
    let k = rows[0].len() - 1;
    NistCase {
        name: path
            .file_stem()
            .expect("file name")
            .to_string_lossy()
            .into_owned(),
        parameters,
        intercept,
        residual_sd,
        r_squared,
        y: rows.iter().map(|r| r[0]).collect(),
        x: (1..=k)
            .map(|j| rows.iter().map(|r| r[j]).collect())
            .collect(),
    }
}

fn number(s: &str) -> f64 {
    s.parse().unwrap_or_else(|_| panic!("not a number: {s}"))
}

/// Log relative error, the StRD accuracy score: `LRE = −log₁₀(|x − c| / |c|)`, or
/// `−log₁₀|x|` when the certified value `c` is 0; capped at 15 (the certified digits). A
/// value that is not finite, on either side, scores 0: a NaN must never pass for agreement.
pub fn lre(computed: f64, certified: f64) -> f64 {
    if !(computed.is_finite() && certified.is_finite()) {
        return 0.0;
    }
    let err = if certified == 0.0 {
        computed.abs()
    } else {
        (computed - certified).abs() / certified.abs()
    };
    if err == 0.0 {
        15.0
    } else {
        (-err.log10()).clamp(0.0, 15.0)
    }
}

#[cfg(test)]
mod tests {
    use super::lre;

    #[test]
    fn lre_counts_agreeing_digits() {
        assert!((lre(1.000_001, 1.0) - 6.0).abs() < 1e-6);
        assert_eq!(lre(2.0, 2.0), 15.0);
        assert!((lre(1e-12, 0.0) - 12.0).abs() < 1e-9);
    }

    #[test]
    fn not_a_number_scores_nothing() {
        assert_eq!(lre(f64::NAN, 1.0), 0.0);
        assert_eq!(lre(1.0, f64::NAN), 0.0);
        assert_eq!(lre(f64::INFINITY, 1.0), 0.0);
        assert_eq!(lre(3.0, 1.0), 0.0, "wrong by 200%: no digit agrees");
        // f64::min drops a NaN, which is how a NaN once scored a perfect 15: not any more.
        assert_eq!(
            [15.0, lre(f64::NAN, 2.0)].into_iter().fold(15.0, f64::min),
            0.0
        );
    }
}
