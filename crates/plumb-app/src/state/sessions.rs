//! The workbench's state as a session file, and back; and the recovery copy that is written
//! after every change so that a killed process loses nothing.

use std::path::{Path, PathBuf};

use plumb_report::{
    AgreementSpec, CalibrationSpec, DataSource, Exclusion, LoadSpec, ModelSpec, Session,
    SCHEMA_VERSION,
};

use super::dataset::Dataset;
use super::marks::{Marks, Note};
use super::pair::FitSpec;
use super::reading::{AgreementOptions, BenchMode, Reading};

/// Key in the session's `view` map naming the session file the recovery copy belongs to.
const RECOVERY_OF: &str = "recovery_of";

/// The session for `data` under `marks`, to be saved at `session_path`: `models` are the one
/// on the bench and the one kept for comparison; `reading` what the bench reads beside it.
pub fn session_of(
    data: &Dataset,
    sha256: &str,
    models: [Option<&FitSpec>; 2],
    marks: &Marks,
    reading: &Reading,
    session_path: &Path,
) -> Session {
    let [spec, kept] = models;
    let mut session = Session {
        plumbline_session: SCHEMA_VERSION,
        data: DataSource {
            path: Session::data_path_for(data.table.source(), session_path),
            sha256: sha256.to_string(),
            rows: data.table.n_rows(),
            load: LoadSpec::as_read(&data.options, &data.table),
        },
        models: spec
            .map(|s| ModelSpec::from_request(&s.model()))
            .into_iter()
            .collect(),
        exclusions: marks
            .excluded
            .iter()
            .map(|(&row, note)| Exclusion {
                row,
                reason: note.reason.clone(),
                at: (!note.at.is_empty()).then(|| note.at.clone()),
            })
            .collect(),
        comparison: kept.map(|k| ModelSpec::from_request(&k.model())),
        calibration: reading
            .report_calibration()
            .as_ref()
            .map(CalibrationSpec::from_request),
        agreement: spec
            .and_then(|s| reading.report_agreement(s, marks))
            .as_ref()
            .map(AgreementSpec::from_request),
        view: serde_json::Map::new(),
    };
    session.set_check_order(&reading.order);
    session
}

/// What the bench read beside the fit when the session was saved.
pub fn reading_of(session: &Session) -> Reading {
    let mut reading = Reading {
        order: session.check_order(),
        ..Reading::default()
    };
    if let Some(c) = &session.calibration {
        reading.mode = BenchMode::Calibration;
        reading.calibration = c.request();
    }
    if let Some(a) = &session.agreement {
        reading.mode = BenchMode::Agreement;
        reading.agreement = AgreementOptions {
            percent: a.percent,
            deming_ratio: a.deming_ratio,
        };
    }
    reading
}

/// The marks a session records (what-if moves are never saved).
pub fn marks_of(session: &Session) -> Marks {
    Marks {
        excluded: session
            .exclusions
            .iter()
            .map(|e| {
                (
                    e.row,
                    Note {
                        reason: e.reason.clone(),
                        at: e.at.clone().unwrap_or_default(),
                    },
                )
            })
            .collect(),
        moved: Default::default(),
    }
}

/// The model a session's first model describes (`None` without one, or with a transform this
/// build does not know).
pub fn spec_of(session: &Session) -> Option<FitSpec> {
    let m = session.models.first()?;
    (!m.x.is_empty())
        .then(|| m.request(Vec::new()).ok())
        .flatten()
        .map(|r| FitSpec::from_request(&r))
}

/// The model a session keeps for comparison.
pub fn kept_of(session: &Session) -> Option<FitSpec> {
    let m = session.comparison.as_ref()?;
    m.request(Vec::new())
        .ok()
        .map(|r| FitSpec::from_request(&r))
}

/// The recovery file in the settings folder.
pub fn recovery_path(config: &Path) -> PathBuf {
    config.join("recovery.plumb")
}

/// Writes the recovery copy (atomically). `of` is the session file the work belongs to.
///
/// # Errors
/// If the settings folder or the file cannot be written.
pub fn write_recovery(
    config: &Path,
    mut session: Session,
    of: Option<&Path>,
) -> Result<(), String> {
    std::fs::create_dir_all(config).map_err(|e| format!("{}: {e}", config.display()))?;
    if let Some(of) = of {
        session
            .view
            .insert(RECOVERY_OF.into(), of.display().to_string().into());
    }
    session
        .save(&recovery_path(config))
        .map_err(|e| e.to_string())
}

/// A recovery copy left by a previous run, if any (an unreadable one is reported as such).
pub fn read_recovery(config: &Path) -> Option<Result<Session, String>> {
    let path = recovery_path(config);
    path.exists()
        .then(|| Session::load(&path).map_err(|e| e.to_string()))
}

/// The session file a recovery copy belongs to.
pub fn recovery_of(session: &Session) -> Option<PathBuf> {
    session
        .view
        .get(RECOVERY_OF)
        .and_then(serde_json::Value::as_str)
        .map(PathBuf::from)
}

/// Removes the recovery copy (after a save, a discard or a clean exit with nothing unsaved).
pub fn clear_recovery(config: &Path) {
    // A missing file is the goal; any other failure leaves a stale offer, which is harmless.
    let _ = std::fs::remove_file(recovery_path(config));
}

/// Whether `data` lies inside the folder of `session_path` (see [`Session::data_is_beside`]).
pub fn data_is_beside(session_path: &Path, data: &Path) -> bool {
    Session::data_is_beside(session_path, data)
}

#[cfg(test)]
mod tests {
    use super::*;
    use plumb_core::calibration::SigmaSource;
    use plumb_data::analysis::{RowOrder, Unknown};

    #[test]
    fn a_session_round_trips_marks_and_the_pair_and_the_recovery_copy_names_its_owner() {
        let dir = tempfile::tempdir().expect("dir");
        let data_path = dir.path().join("d.csv");
        std::fs::write(&data_path, "a,b\n1,2\n2,3\n3,5\n4,4\n").expect("write");
        let data = Dataset::load(&data_path, &Default::default()).expect("load");
        let mut marks = Marks::default();
        marks.excluded.insert(
            3,
            Note {
                reason: "pipette slipped".into(),
                at: "2026-12-01T10:00:00Z".into(),
            },
        );
        marks.moved.insert(2, (9.0, 9.0));
        let spec = FitSpec::line("b", "a");
        let session_path = dir.path().join("s.plumb");
        let mut kept = spec.clone();
        kept.degree = 2;
        let reading = Reading {
            mode: BenchMode::Calibration,
            calibration: plumb_data::analysis::CalibrationRequest {
                unknowns: vec![Unknown {
                    name: "A7".into(),
                    readings: vec![2.5, 2.6],
                }],
                sigma: SigmaSource::InterceptSe,
            },
            order: RowOrder::Column("a".into()),
            ..Reading::default()
        };
        let s = session_of(
            &data,
            "abc",
            [Some(&spec), Some(&kept)],
            &marks,
            &reading,
            &session_path,
        );
        assert_eq!(
            reading_of(&s),
            reading,
            "the calibration's unknowns and σ come back"
        );
        assert_eq!(s.data.path, "d.csv");
        let mut expect = marks.clone();
        expect.moved.clear();
        assert_eq!(marks_of(&s), expect, "moves are hypothetical and not saved");
        assert_eq!(spec_of(&s), Some(spec));
        assert_eq!(kept_of(&s), Some(kept));
        let config = dir.path().join("config");
        write_recovery(&config, s, Some(&session_path)).expect("write");
        let back = read_recovery(&config).expect("present").expect("readable");
        assert_eq!(recovery_of(&back), Some(session_path.clone()));
        assert_eq!(marks_of(&back), expect);
        assert!(data_is_beside(&session_path, &data_path));
        assert!(!data_is_beside(&session_path, Path::new("/etc/hostname")));
        clear_recovery(&config);
        assert!(read_recovery(&config).is_none());
    }
}
