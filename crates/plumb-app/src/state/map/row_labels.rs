//! Columns that label rows instead of measuring anything: a running index, a sequence number,
//! an identifier. They correlate with whatever drifts along the file and crowd the map, so the
//! map leaves them out unless the analyst puts them back.

/// Why a column looks like a row label.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum RowLabel {
    /// Every step from one row to the next is the same (1, 2, 3 … or 10, 20, 30 …).
    RunningIndex {
        /// The step.
        step: f64,
    },
    /// Increasing whole numbers, mostly one apart (a numbering with a few gaps).
    Sequence,
    /// Distinct whole numbers under a name that reads as an identifier (`sample_id`, `code`).
    Identifier,
}

/// Share of steps that must be exactly 1 for a [`RowLabel::Sequence`]. A choice of this
/// project, no source.
const SEQUENCE_ONES: f64 = 0.8;
/// Name words that mark an identifier.
const ID_WORDS: [&str; 11] = [
    "id", "ids", "key", "code", "no", "nr", "num", "number", "serial", "idx", "seq",
];

impl RowLabel {
    /// A few words for the screen: "a running index (steps of 1)".
    pub fn describe(&self) -> String {
        match self {
            Self::RunningIndex { step } => format!(
                "a running index (steps of {})",
                plumb_report::text::sig(*step, 4)
            ),
            Self::Sequence => "a sequence number (increasing whole numbers)".into(),
            Self::Identifier => "an identifier (distinct whole numbers)".into(),
        }
    }
}

/// How column `name` with values `v` (NaN where missing) labels rows, if it does. A column
/// with a missing or non-finite cell, or fewer than 3 rows, is taken as a measurement.
pub fn row_label(name: &str, v: &[f64]) -> Option<RowLabel> {
    if v.len() < 3 || !v.iter().all(|x| x.is_finite()) {
        return None;
    }
    let steps: Vec<f64> = v.windows(2).map(|w| w[1] - w[0]).collect();
    let step = steps[0];
    let tolerance = 1e-9 * step.abs().max(v[0].abs()).max(1.0);
    if step != 0.0 && steps.iter().all(|s| (s - step).abs() <= tolerance) {
        return Some(RowLabel::RunningIndex { step });
    }
    let whole = v.iter().all(|x| x.fract() == 0.0);
    if !whole {
        return None;
    }
    let ones = steps.iter().filter(|&&s| s == 1.0).count() as f64;
    if steps.iter().all(|&s| s > 0.0) && ones >= SEQUENCE_ONES * steps.len() as f64 {
        return Some(RowLabel::Sequence);
    }
    (names_an_identifier(name) && all_distinct(v)).then_some(RowLabel::Identifier)
}

/// Whether a word of `name` (split at anything not a letter or digit, and before a capital
/// after a lower-case letter: `sampleID`, `Sample_No`) is one of [`ID_WORDS`].
fn names_an_identifier(name: &str) -> bool {
    let mut words = Vec::new();
    let mut word = String::new();
    let mut last_lower = false;
    for c in name.chars() {
        let split = !c.is_alphanumeric() || (c.is_uppercase() && last_lower);
        if split && !word.is_empty() {
            words.push(std::mem::take(&mut word));
        }
        if c.is_alphanumeric() {
            word.extend(c.to_lowercase());
        }
        last_lower = c.is_lowercase();
    }
    words.push(word);
    words.iter().any(|w| ID_WORDS.contains(&w.as_str()))
}

fn all_distinct(v: &[f64]) -> bool {
    let mut sorted = v.to_vec();
    sorted.sort_by(f64::total_cmp);
    sorted.windows(2).all(|w| w[0] != w[1])
}

#[cfg(test)]
mod tests {
    use super::*;

    fn col(v: &[f64]) -> Vec<f64> {
        v.to_vec()
    }

    #[test]
    fn running_indexes_and_sequences_are_found() {
        assert_eq!(
            row_label("read_order", &col(&[1.0, 2.0, 3.0, 4.0])),
            Some(RowLabel::RunningIndex { step: 1.0 })
        );
        assert_eq!(
            row_label("t", &col(&[0.5, 0.75, 1.0, 1.25])),
            Some(RowLabel::RunningIndex { step: 0.25 })
        );
        assert_eq!(
            row_label("countdown", &col(&[30.0, 20.0, 10.0])),
            Some(RowLabel::RunningIndex { step: -10.0 })
        );
        let gaps = col(&[1.0, 2.0, 3.0, 4.0, 5.0, 7.0, 8.0, 9.0, 10.0, 11.0, 12.0]);
        assert_eq!(row_label("run", &gaps), Some(RowLabel::Sequence));
    }

    #[test]
    fn identifiers_need_the_name_and_distinct_whole_numbers() {
        let ids = col(&[1047.0, 2231.0, 1550.0, 9034.0]);
        assert_eq!(row_label("sample_id", &ids), Some(RowLabel::Identifier));
        assert_eq!(row_label("SampleID", &ids), Some(RowLabel::Identifier));
        assert_eq!(row_label("Plot No.", &ids), Some(RowLabel::Identifier));
        assert_eq!(row_label("yield_kg", &ids), None, "not an ID name");
        assert_eq!(row_label("idle_s", &ids), None, "'id' only as a word");
        let repeated = col(&[3.0, 5.0, 3.0, 8.0]);
        assert_eq!(
            row_label("batch_id", &repeated),
            None,
            "repeats: a grouping"
        );
    }

    #[test]
    fn measurements_are_left_alone() {
        // The field survey's visit day rises but in uneven fractional steps.
        assert_eq!(row_label("visit_day", &col(&[1.3, 2.2, 3.4, 4.1])), None);
        // Calibration standards: increasing whole numbers, but not a numbering.
        assert_eq!(row_label("conc", &col(&[1.0, 2.0, 5.0, 10.0, 20.0])), None);
        assert_eq!(row_label("const", &col(&[4.0, 4.0, 4.0])), None);
        assert_eq!(row_label("gap", &[1.0, f64::NAN, 3.0]), None);
        assert_eq!(row_label("short", &col(&[1.0, 2.0])), None);
    }
}
