//! The session file: what was opened, how, which models, and every exclusion with its reason.
//!
//! A session is a JSON document (our own schema, see README.md) so that it can be read and
//! diffed by people. It records the data file's path and SHA-256, so reopening it reproduces
//! every number, and says so when the data changed.

use std::collections::BTreeMap;
use std::path::{Path, PathBuf};

use plumb_core::calibration::{SigmaSource, WeightRule};
use plumb_data::analysis::{
    transform_name, transform_named, AgreementRequest, CalibrationRequest, Factor, FitRequest,
    ResponseScale, RowOrder, Unknown,
};
use plumb_data::{DecimalMark, HeaderMode, LoadOptions};
use serde::{Deserialize, Serialize};
use sha2::{Digest, Sha256};

use crate::atomic::write_atomically;
use crate::{ReportError, Result};

/// Newest schema version this build writes and reads. Version 2 added the model's grouping,
/// transforms and the kept comparison; version 3 the weighting rules, the calibration's
/// unknowns and the method comparison; version 4 the columns' roles (the group colouring the
/// points and the ID naming the rows, in the view settings). Older files read as the newest
/// (those parts absent).
pub const SCHEMA_VERSION: u32 = 4;

/// A saved session.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Session {
    /// Schema version (always [`SCHEMA_VERSION`] when written by this build).
    pub plumbline_session: u32,
    /// The data file and how to read it.
    pub data: DataSource,
    /// The models looked at, first one is the main one.
    pub models: Vec<ModelSpec>,
    /// Rows left out, each with its reason.
    #[serde(default)]
    pub exclusions: Vec<Exclusion>,
    /// A second model kept beside the main one for comparison (version 2).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub comparison: Option<ModelSpec>,
    /// The main model read as a calibration: its unknowns and the limits' σ (version 3).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub calibration: Option<CalibrationSpec>,
    /// Two methods compared on the same samples (version 3).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub agreement: Option<AgreementSpec>,
    /// View settings of the workbench (free-form, kept as written).
    #[serde(default)]
    pub view: serde_json::Map<String, serde_json::Value>,
}

/// Where the data came from.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct DataSource {
    /// Path as the user gave it (relative paths are relative to the session file's folder).
    pub path: String,
    /// SHA-256 of the file's bytes when the session was saved, lower-case hex.
    pub sha256: String,
    /// Data rows in the file at that time.
    pub rows: usize,
    /// Load options.
    #[serde(default)]
    pub load: LoadSpec,
}

/// The load options, as text.
#[derive(Debug, Clone, PartialEq, Default, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct LoadSpec {
    /// One-character delimiter, or null to detect.
    pub delimiter: Option<String>,
    /// "auto", "yes" or "no".
    #[serde(default = "auto")]
    pub header: String,
    /// "auto", "point" or "comma".
    #[serde(default = "auto")]
    pub decimal: String,
    /// "auto", or the text encoding to read ("utf-8", "utf-16le", "utf-16be",
    /// "windows-1252"); a saved session names the encoding the file was read in.
    #[serde(default = "auto")]
    pub encoding: String,
    /// Extra missing-value tokens.
    #[serde(default)]
    pub missing: Vec<String>,
    /// Spreadsheet sheet.
    pub sheet: Option<String>,
}

fn auto() -> String {
    "auto".into()
}

impl LoadSpec {
    /// The loader's options this spec stands for (unknown words read as "auto").
    pub fn to_options(&self) -> LoadOptions {
        LoadOptions {
            delimiter: self.delimiter.as_deref().and_then(|d| d.bytes().next()),
            header: match self.header.as_str() {
                "yes" => HeaderMode::Yes,
                "no" => HeaderMode::No,
                _ => HeaderMode::Auto,
            },
            decimal: match self.decimal.as_str() {
                "point" => Some(DecimalMark::Point),
                "comma" => Some(DecimalMark::Comma),
                _ => None,
            },
            encoding: plumb_data::TextEncoding::parse(&self.encoding),
            missing_tokens: self.missing.clone(),
            sheet: self.sheet.clone(),
            memory_limit: None,
            only: None,
            skip_hash: false,
        }
    }

    /// The spec of `options` with the encoding `table` was actually read in, so a rerun on
    /// another machine reads the file the same way.
    pub fn as_read(options: &LoadOptions, table: &plumb_data::Table) -> Self {
        let mut spec = Self::from_options(options);
        if let plumb_data::SourceFormat::Delimited { encoding, .. } = table.format() {
            spec.encoding = encoding.as_str().into();
        }
        spec
    }

    /// The spec that records `options`.
    pub fn from_options(options: &LoadOptions) -> Self {
        Self {
            delimiter: options.delimiter.map(|d| (d as char).to_string()),
            header: match options.header {
                HeaderMode::Auto => "auto",
                HeaderMode::Yes => "yes",
                HeaderMode::No => "no",
            }
            .into(),
            decimal: match options.decimal {
                None => "auto",
                Some(DecimalMark::Point) => "point",
                Some(DecimalMark::Comma) => "comma",
            }
            .into(),
            encoding: options
                .encoding
                .map_or("auto", plumb_data::TextEncoding::as_str)
                .into(),
            missing: options.missing_tokens.clone(),
            sheet: options.sheet.clone(),
        }
    }
}

impl ModelSpec {
    /// The analysis request of this model with `exclude` left out. A transform word this build
    /// does not know is an error naming it.
    ///
    /// # Errors
    /// [`ReportError::BadSession`]-style text for an unknown transform.
    pub fn request(&self, exclude: Vec<usize>) -> std::result::Result<FitRequest, String> {
        let response = match &self.transform_y {
            Some(t) => ResponseScale::parse(t)?,
            None => ResponseScale::Identity,
        };
        let x_transforms = self
            .transforms
            .iter()
            .map(|(c, t)| {
                transform_named(t).map(|t| (c.clone(), t)).ok_or_else(|| {
                    format!("'{t}' (for column '{c}') is not ln, log10, sqrt or reciprocal")
                })
            })
            .collect::<std::result::Result<_, _>>()?;
        Ok(FitRequest {
            y: self.y.clone(),
            x: self.x.clone(),
            intercept: self.intercept,
            degree: self.degree,
            weights: self.weights.clone(),
            weight_rule: self
                .weighting
                .as_deref()
                .map(|w| {
                    WeightRule::parse(w).ok_or_else(|| {
                        format!("'{w}' is not a weighting rule: 1/x, 1/x2, 1/y2 or 1/s2")
                    })
                })
                .transpose()?,
            exclude,
            level: self.level,
            factor: self.group.as_ref().map(|g| Factor {
                column: g.column.clone(),
                reference: g.reference.clone(),
                separate_slopes: g.separate_slopes,
            }),
            response,
            x_transforms,
            ..FitRequest::default()
        })
    }

    /// The model of `request` (its exclusions are kept in the session's log, not here).
    pub fn from_request(request: &FitRequest) -> Self {
        Self {
            y: request.y.clone(),
            x: request.x.clone(),
            intercept: request.intercept,
            degree: request.degree,
            weights: request.weights.clone(),
            weighting: request.weight_rule.map(|r| r.key().to_string()),
            level: request.level,
            group: request.factor.as_ref().map(|f| GroupSpec {
                column: f.column.clone(),
                reference: f.reference.clone(),
                separate_slopes: f.separate_slopes,
            }),
            transform_y: (request.response != ResponseScale::Identity)
                .then(|| request.response.name()),
            transforms: request
                .x_transforms
                .iter()
                .filter(|(_, t)| !t.is_identity())
                .map(|(c, t)| (c.clone(), transform_name(*t)))
                .collect(),
        }
    }
}

/// One model of the session.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct ModelSpec {
    /// Response column.
    pub y: String,
    /// Predictor columns.
    pub x: Vec<String>,
    /// Intercept on or off.
    #[serde(default = "yes")]
    pub intercept: bool,
    /// Polynomial degree of a single predictor.
    #[serde(default = "one")]
    pub degree: u32,
    /// Weights column.
    #[serde(default)]
    pub weights: Option<String>,
    /// Weights from a rule instead: `1/x`, `1/x2`, `1/y2` or `1/s2` (version 3).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub weighting: Option<String>,
    /// Confidence level.
    #[serde(default = "level")]
    pub level: f64,
    /// A grouping column entering as indicator terms (version 2).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub group: Option<GroupSpec>,
    /// The response's scale: `ln`, `log10`, `sqrt`, `reciprocal`, `box-cox` or `box-cox:λ`
    /// (version 2; absent: as measured).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub transform_y: Option<String>,
    /// Transforms of predictors, column → `ln`, `log10`, `sqrt` or `reciprocal` (version 2).
    #[serde(default, skip_serializing_if = "BTreeMap::is_empty")]
    pub transforms: BTreeMap<String, String>,
}

/// The calibration read from the main model.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct CalibrationSpec {
    /// Unknown samples and their readings.
    #[serde(default)]
    pub unknowns: Vec<UnknownSpec>,
    /// σ of the limits: `residual` or `intercept`.
    #[serde(default = "residual")]
    pub sigma: String,
}

fn residual() -> String {
    "residual".into()
}

/// Key in the session's `view` map naming the row order of the sequence checks: `file`, or
/// `column:NAME`.
const CHECK_ORDER: &str = "check_order";

/// Key in the session's `view` map naming the text column whose levels colour the points
/// (version 4).
const GROUP_COLUMN: &str = "group_column";

/// Key in the session's `view` map naming the column whose cells name the rows: a column
/// name, or `null` when the analyst chose none (version 4; absent: not recorded).
const ID_COLUMN: &str = "id_column";

/// The columns' roles a session records beside the models (version 4).
#[derive(Debug, Clone, PartialEq, Eq, Default)]
pub struct ColumnRoles {
    /// The text column colouring the points (`None`: none).
    pub group: Option<String>,
    /// The column naming the rows: `Some(None)` when none was chosen, `None` when the
    /// session does not say (written by an older build).
    pub id: Option<Option<String>>,
}

impl CalibrationSpec {
    /// The calibration request this records.
    pub fn request(&self) -> CalibrationRequest {
        CalibrationRequest {
            unknowns: self
                .unknowns
                .iter()
                .map(|u| Unknown {
                    name: u.name.clone(),
                    readings: u.readings.clone(),
                })
                .collect(),
            sigma: SigmaSource::parse(&self.sigma).unwrap_or_default(),
        }
    }

    /// The record of `request`.
    pub fn from_request(request: &CalibrationRequest) -> Self {
        Self {
            unknowns: request
                .unknowns
                .iter()
                .map(|u| UnknownSpec {
                    name: u.name.clone(),
                    readings: u.readings.clone(),
                })
                .collect(),
            sigma: match request.sigma {
                SigmaSource::ResidualSd => "residual",
                SigmaSource::InterceptSe => "intercept",
            }
            .into(),
        }
    }
}

impl AgreementSpec {
    /// The comparison this records, on `model`'s exclusions and level.
    pub fn request(&self, model: &FitRequest) -> AgreementRequest {
        AgreementRequest {
            reference: self.reference.clone(),
            test: self.test.clone(),
            exclude: model.exclude.clone(),
            level: model.level,
            deming_ratio: self.deming_ratio,
            percent: self.percent,
            ..AgreementRequest::default()
        }
    }

    /// The record of `request`.
    pub fn from_request(request: &AgreementRequest) -> Self {
        Self {
            reference: request.reference.clone(),
            test: request.test.clone(),
            percent: request.percent,
            deming_ratio: request.deming_ratio,
        }
    }
}

/// One unknown sample.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct UnknownSpec {
    /// Its name.
    pub name: String,
    /// Its replicate readings.
    pub readings: Vec<f64>,
}

/// Two methods compared on the same samples.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct AgreementSpec {
    /// The established method's column.
    pub reference: String,
    /// The new method's column.
    pub test: String,
    /// Differences as percentages of the pair's mean.
    #[serde(default)]
    pub percent: bool,
    /// Deming error-variance ratio.
    #[serde(default = "one_f")]
    pub deming_ratio: f64,
}

fn one_f() -> f64 {
    1.0
}

/// A grouping column of a model.
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct GroupSpec {
    /// The column.
    pub column: String,
    /// The reference level (absent: the first in sorted order).
    #[serde(default)]
    pub reference: Option<String>,
    /// A slope of its own per level.
    #[serde(default)]
    pub separate_slopes: bool,
}

fn yes() -> bool {
    true
}
fn one() -> u32 {
    1
}
fn level() -> f64 {
    0.95
}

/// A row left out, and why.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Exclusion {
    /// 1-based data row.
    pub row: usize,
    /// The analyst's reason.
    pub reason: String,
    /// When it was recorded (RFC 3339, UTC), if known.
    #[serde(default)]
    pub at: Option<String>,
}

impl Session {
    /// The row order the sequence checks follow, as recorded in the view settings.
    pub fn check_order(&self) -> RowOrder {
        match self
            .view
            .get(CHECK_ORDER)
            .and_then(serde_json::Value::as_str)
        {
            Some("file") => RowOrder::File,
            Some(v) => v
                .strip_prefix("column:")
                .map_or(RowOrder::None, |c| RowOrder::Column(c.to_string())),
            None => RowOrder::None,
        }
    }

    /// Records the row order of the sequence checks in the view settings.
    pub fn set_check_order(&mut self, order: &RowOrder) {
        match order {
            RowOrder::None => {
                self.view.remove(CHECK_ORDER);
            }
            RowOrder::File => {
                self.view.insert(CHECK_ORDER.into(), "file".into());
            }
            RowOrder::Column(c) => {
                self.view
                    .insert(CHECK_ORDER.into(), format!("column:{c}").into());
            }
        }
    }

    /// The columns' roles recorded in the view settings.
    pub fn roles(&self) -> ColumnRoles {
        let text = |v: &serde_json::Value| v.as_str().map(str::to_string);
        ColumnRoles {
            group: self.view.get(GROUP_COLUMN).and_then(text),
            id: self.view.get(ID_COLUMN).map(text),
        }
    }

    /// Records the columns' roles in the view settings.
    pub fn set_roles(&mut self, roles: &ColumnRoles) {
        match &roles.group {
            Some(g) => self.view.insert(GROUP_COLUMN.into(), g.clone().into()),
            None => self.view.remove(GROUP_COLUMN),
        };
        match &roles.id {
            Some(id) => self.view.insert(
                ID_COLUMN.into(),
                id.clone().map_or(serde_json::Value::Null, Into::into),
            ),
            None => self.view.remove(ID_COLUMN),
        };
    }

    /// Reads a session, refusing newer schema versions and malformed files with a clear message.
    ///
    /// # Errors
    /// [`ReportError::Io`], [`ReportError::FutureSession`] or [`ReportError::BadSession`].
    pub fn load(path: &Path) -> Result<Self> {
        let text = std::fs::read_to_string(path).map_err(|source| ReportError::Io {
            path: path.to_path_buf(),
            action: "reading the session",
            source,
        })?;
        Self::from_json(path, &text)
    }

    /// Parses session text; `path` names it in messages. The same checks as [`Session::load`].
    ///
    /// # Errors
    /// [`ReportError::FutureSession`] or [`ReportError::BadSession`].
    pub fn from_json(path: &Path, text: &str) -> Result<Self> {
        let bad = |e: serde_json::Error| ReportError::BadSession {
            path: path.to_path_buf(),
            detail: e.to_string(),
        };
        let value: serde_json::Value = serde_json::from_str(text).map_err(bad)?;
        let version = value
            .get("plumbline_session")
            .and_then(serde_json::Value::as_u64);
        match version {
            Some(v) if v > u64::from(SCHEMA_VERSION) => Err(ReportError::FutureSession {
                path: path.to_path_buf(),
                found: u32::try_from(v).unwrap_or(u32::MAX),
                supported: SCHEMA_VERSION,
            }),
            Some(_) => {
                let mut session: Self = serde_json::from_value(value).map_err(bad)?;
                // Version 1 lacked only optional parts: it reads as version 2.
                session.plumbline_session = SCHEMA_VERSION;
                Ok(session)
            }
            None => Err(ReportError::BadSession {
                path: path.to_path_buf(),
                detail: "no 'plumbline_session' version field".into(),
            }),
        }
    }

    /// Saves atomically (see [`write_atomically`]), as pretty-printed JSON, after checking that
    /// `path` is not the session's own data file (by any name) nor anything but a regular file.
    ///
    /// # Errors
    /// [`ReportError::Unsafe`] or [`ReportError::Io`].
    pub fn save(&self, path: &Path) -> Result<()> {
        let data = self.data_path(path);
        crate::guard::check_outputs(
            &[crate::guard::Output {
                path,
                what: "the session",
            }],
            &[crate::guard::Input {
                path: &data,
                what: "the session's data file",
            }],
        )?;
        let mut text = serde_json::to_string_pretty(self).expect("a session always serializes");
        text.push('\n');
        write_atomically(path, text.as_bytes())
    }

    /// How to write `data` in a session saved at `session_path`: relative to the session's
    /// folder when the data file lies inside it, absolute otherwise.
    pub fn data_path_for(data: &Path, session_path: &Path) -> String {
        let absolute = std::fs::canonicalize(data).unwrap_or_else(|_| data.to_path_buf());
        let folder = session_path
            .parent()
            .filter(|d| !d.as_os_str().is_empty())
            .and_then(|d| std::fs::canonicalize(d).ok());
        match folder.and_then(|f| absolute.strip_prefix(f).ok().map(Path::to_path_buf)) {
            Some(relative) => relative.display().to_string(),
            None => absolute.display().to_string(),
        }
    }

    /// Whether `data` lies inside the folder of `session_path`. A session naming a file
    /// elsewhere is followed only when the analyst agrees (the workbench asks; the command
    /// line needs `--allow-outside-data`), so a session from someone else cannot make
    /// Plumbline read an arbitrary file unannounced.
    pub fn data_is_beside(session_path: &Path, data: &Path) -> bool {
        let folder = session_path
            .parent()
            .filter(|d| !d.as_os_str().is_empty())
            .unwrap_or(Path::new("."));
        match (std::fs::canonicalize(folder), std::fs::canonicalize(data)) {
            (Ok(f), Ok(d)) => d.starts_with(f),
            _ => false,
        }
    }

    /// The data file's path, resolved against the session file's folder when relative.
    pub fn data_path(&self, session_path: &Path) -> PathBuf {
        let p = PathBuf::from(&self.data.path);
        if p.is_absolute() {
            p
        } else {
            session_path.parent().unwrap_or(Path::new(".")).join(p)
        }
    }
}

/// SHA-256 of a file, lower-case hex.
///
/// # Errors
/// [`ReportError::Io`].
pub fn file_sha256(path: &Path) -> Result<String> {
    let bytes = std::fs::read(path).map_err(|source| ReportError::Io {
        path: path.to_path_buf(),
        action: "reading the data file to hash it",
        source,
    })?;
    Ok(Sha256::digest(&bytes)
        .iter()
        .map(|b| format!("{b:02x}"))
        .collect())
}

#[cfg(test)]
mod tests {
    use super::*;

    fn sample() -> Session {
        Session {
            plumbline_session: SCHEMA_VERSION,
            data: DataSource {
                path: "jar.csv".into(),
                sha256: "00".into(),
                rows: 48,
                load: LoadSpec::default(),
            },
            models: vec![ModelSpec {
                y: "settled".into(),
                x: vec!["dose".into()],
                intercept: true,
                degree: 2,
                weights: None,
                weighting: None,
                level: 0.95,
                group: Some(GroupSpec {
                    column: "analyst".into(),
                    reference: Some("MB".into()),
                    separate_slopes: true,
                }),
                transform_y: Some("ln".into()),
                transforms: [("dose".to_string(), "sqrt".to_string())].into(),
            }],
            exclusions: vec![Exclusion {
                row: 17,
                reason: "decimal point slipped".into(),
                at: Some("2026-12-02T09:15:00Z".into()),
            }],
            comparison: Some(ModelSpec {
                y: "settled".into(),
                x: vec!["dose".into()],
                intercept: true,
                degree: 1,
                weights: None,
                weighting: Some("1/x2".into()),
                level: 0.95,
                group: None,
                transform_y: None,
                transforms: BTreeMap::new(),
            }),
            calibration: Some(CalibrationSpec {
                unknowns: vec![UnknownSpec {
                    name: "A7".into(),
                    readings: vec![0.412, 0.418],
                }],
                sigma: "intercept".into(),
            }),
            agreement: None,
            view: serde_json::Map::new(),
        }
    }

    #[test]
    fn the_lab_parts_come_back_as_requests() {
        let s = sample();
        let kept = s
            .comparison
            .as_ref()
            .expect("kept")
            .request(vec![3])
            .expect("known");
        assert_eq!(kept.weight_rule, Some(WeightRule::InverseX2));
        let c = s.calibration.as_ref().expect("calibration").request();
        assert_eq!(c.sigma, SigmaSource::InterceptSe);
        assert_eq!(
            CalibrationSpec::from_request(&c),
            *s.calibration.as_ref().expect("spec")
        );
        let mut bad = s.comparison.clone().expect("kept");
        bad.weighting = Some("1/z".into());
        assert!(
            bad.request(Vec::new()).is_err(),
            "an unknown rule is named, not ignored"
        );
        let mut t = s;
        t.set_check_order(&RowOrder::Column("run".into()));
        assert_eq!(t.roles(), ColumnRoles::default(), "not recorded");
        let roles = ColumnRoles {
            group: Some("analyst".into()),
            id: Some(Some("jar".into())),
        };
        t.set_roles(&roles);
        assert_eq!(t.roles(), roles);
        let none_chosen = ColumnRoles {
            group: None,
            id: Some(None),
        };
        t.set_roles(&none_chosen);
        assert_eq!(
            t.roles(),
            none_chosen,
            "no ID chosen is kept apart from unsaid"
        );
        assert_eq!(t.check_order(), RowOrder::Column("run".into()));
        t.set_check_order(&RowOrder::None);
        assert_eq!(t.check_order(), RowOrder::None);
    }

    #[test]
    fn round_trips_through_a_file() {
        let dir = tempfile::tempdir().expect("tempdir");
        let path = dir.path().join("a.plumb");
        sample().save(&path).expect("saves");
        assert_eq!(Session::load(&path).expect("loads"), sample());
        assert_eq!(sample().data_path(&path), dir.path().join("jar.csv"));
    }

    #[test]
    fn refuses_future_truncated_and_foreign_files() {
        let dir = tempfile::tempdir().expect("tempdir");
        let future = dir.path().join("f.plumb");
        std::fs::write(&future, r#"{"plumbline_session": 9, "whatever": true}"#).expect("write");
        assert!(matches!(
            Session::load(&future),
            Err(ReportError::FutureSession { found: 9, .. })
        ));
        let text = serde_json::to_string(&sample()).expect("json");
        let cut = dir.path().join("t.plumb");
        std::fs::write(&cut, &text[..text.len() / 2]).expect("write");
        let err = Session::load(&cut).expect_err("truncated");
        assert!(
            err.to_string().contains("not a readable Plumbline session"),
            "{err}"
        );
        let foreign = dir.path().join("o.plumb");
        std::fs::write(&foreign, "{\"a\": 1}").expect("write");
        assert!(Session::load(&foreign).is_err());
    }

    #[test]
    fn load_options_and_models_round_trip_through_their_specs() {
        let options = LoadOptions {
            delimiter: Some(b';'),
            header: HeaderMode::No,
            decimal: Some(DecimalMark::Comma),
            encoding: Some(plumb_data::TextEncoding::Windows1252),
            missing_tokens: vec!["-999".into()],
            sheet: Some("runs".into()),
            memory_limit: None,
            only: None,
            skip_hash: false,
        };
        assert_eq!(LoadSpec::from_options(&options).to_options(), options);
        assert_eq!(LoadSpec::default().to_options(), LoadOptions::default());
        let model = &sample().models[0];
        let request = model.request(vec![3]).expect("known transforms");
        assert_eq!(&ModelSpec::from_request(&request), model);
        assert_eq!(request.exclude, [3]);
        assert_eq!(
            request.factor.as_ref().map(|f| f.separate_slopes),
            Some(true)
        );
        let mut unknown = model.clone();
        unknown.transform_y = Some("log2".into());
        assert!(unknown.request(vec![]).expect_err("log2").contains("log2"));
    }

    #[test]
    fn a_version_1_file_opens_as_version_2() {
        // Written by `plumb report … --save-session` of the version-1 build (commit 0e9a486),
        // with its data path made relative; stored beside the tests.
        let path = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/fixtures/v1.plumb");
        let s = Session::load(&path).expect("a version-1 session reads");
        assert_eq!(s.plumbline_session, SCHEMA_VERSION);
        assert_eq!(s.models[0].x, ["standard_mg_l"]);
        assert!(s.models[0].group.is_none() && s.models[0].transforms.is_empty());
        assert!(s.comparison.is_none());
        assert_eq!(
            s.roles(),
            ColumnRoles::default(),
            "an older file says nothing of roles"
        );
        assert_eq!(s.exclusions[0].row, 14);
        let request = s.models[0].request(vec![14]).expect("a plain model");
        assert_eq!(
            request.response,
            plumb_data::analysis::ResponseScale::Identity
        );
    }

    #[test]
    fn hashes_are_sha256() {
        // SHA-256("abc") = ba7816bf… (FIPS 180-2, appendix B.1).
        let dir = tempfile::tempdir().expect("tempdir");
        let path = dir.path().join("abc");
        std::fs::write(&path, "abc").expect("write");
        assert_eq!(
            file_sha256(&path).expect("hash"),
            "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad"
        );
    }
}
