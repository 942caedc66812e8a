//! `plumb report`: the colleague summary, from a session or from a data file and a model.

use std::path::Path;

use plumb_data::analysis::{AgreementRequest, CalibrationRequest, FitRequest, RowOrder};
use plumb_report::guard::{check_outputs, Input, Output};
use plumb_report::report::{build, planned_files, write, ReportInput};
use plumb_report::{
    AgreementSpec, CalibrationSpec, DataSource, Exclusion, LoadSpec, ModelSpec, Session,
    SCHEMA_VERSION,
};

use crate::cli::ReportArgs;

pub fn run(args: &ReportArgs) -> anyhow::Result<String> {
    let input = &args.load.data;
    let is_session = input.extension().is_some_and(|e| e == "plumb");
    let Prepared {
        table,
        request,
        exclusions,
        reproduce,
        note,
        sha256,
        comparison,
        lab,
    } = if is_session {
        from_session(input, &args.output, args.allow_outside_data)?
    } else {
        from_data(args)?
    };
    let report = build(&ReportInput {
        table: &table,
        sha256: sha256.clone(),
        request: request.clone(),
        exclusions: exclusions.clone(),
        reproduce,
        comparison: comparison.clone(),
        calibration: lab.calibration.clone(),
        agreement: lab.agreement.clone(),
        order: lab.order.clone(),
    })?;
    // Every name about to be written, against every file read, before anything is written.
    let mut inputs = vec![Input {
        path: table.source(),
        what: "the data file",
    }];
    if is_session {
        inputs.push(Input {
            path: input,
            what: "the session",
        });
    }
    if let Some(u) = &args.unknowns.unknowns_file {
        inputs.push(Input {
            path: u,
            what: "the unknowns' file",
        });
    }
    let planned = planned_files(&report, &args.output);
    let mut outputs: Vec<Output<'_>> = planned
        .iter()
        .map(|(path, what)| Output { path, what })
        .collect();
    let session_out = args.save_session.as_deref().filter(|_| !is_session);
    if let Some(path) = session_out {
        outputs.push(Output {
            path,
            what: "the session (--save-session)",
        });
    }
    check_outputs(&outputs, &inputs)?;
    let files = write(&report, &args.output, &inputs)?;
    if let Some(path) = session_out {
        let mut session = session_of(args, &table, &request, &exclusions, sha256);
        session.comparison = comparison.as_ref().map(ModelSpec::from_request);
        lab.put_in(&mut session);
        session.save(path)?;
    }
    let mut out = String::new();
    if let Some(n) = note {
        out.push_str(&format!("note: {n}\n"));
    }
    for f in files {
        out.push_str(&format!("wrote {}\n", f.display()));
    }
    Ok(out)
}

/// What a summary is built from, however it was asked for.
struct Prepared {
    table: plumb_data::Table,
    request: FitRequest,
    exclusions: Vec<Exclusion>,
    reproduce: String,
    /// Something the user should know (a changed data file).
    note: Option<String>,
    /// SHA-256 of the data file, read once.
    sha256: String,
    /// A second model to show beside the first.
    comparison: Option<FitRequest>,
    /// The calibration, method comparison and check order asked for.
    lab: LabAsked,
}

/// The lab sections a summary is asked for.
#[derive(Default)]
struct LabAsked {
    calibration: Option<CalibrationRequest>,
    agreement: Option<AgreementRequest>,
    order: RowOrder,
}

impl LabAsked {
    /// What a session records.
    fn of_session(session: &Session, request: &FitRequest) -> Self {
        Self {
            calibration: session.calibration.as_ref().map(CalibrationSpec::request),
            agreement: session.agreement.as_ref().map(|a| a.request(request)),
            order: session.check_order(),
        }
    }

    /// What the command line asks for.
    fn of_args(args: &ReportArgs, request: &FitRequest) -> anyhow::Result<Self> {
        let calibration = (args.calibration || args.unknowns.any())
            .then(|| {
                args.unknowns
                    .read(&request.y, &args.load.options())
                    .map(|unknowns| CalibrationRequest {
                        unknowns,
                        sigma: args.sigma.source(),
                    })
            })
            .transpose()?;
        let agreement = args.methods.then(|| AgreementRequest {
            reference: request.x[0].clone(),
            test: request.y.clone(),
            exclude: request.exclude.clone(),
            level: request.level,
            deming_ratio: args.deming_ratio.unwrap_or(1.0),
            percent: args.percent,
            ..AgreementRequest::default()
        });
        Ok(Self {
            calibration,
            agreement,
            order: args.order.row_order(),
        })
    }

    /// Records the lab sections in a session.
    fn put_in(&self, session: &mut Session) {
        session.calibration = self.calibration.as_ref().map(CalibrationSpec::from_request);
        session.agreement = self.agreement.as_ref().map(AgreementSpec::from_request);
        session.set_check_order(&self.order);
    }
}

fn from_session(path: &Path, output: &Path, allow_outside: bool) -> anyhow::Result<Prepared> {
    let session = Session::load(path)?;
    let data_path = session.data_path(path);
    if data_path.exists() && !allow_outside && !Session::data_is_beside(path, &data_path) {
        anyhow::bail!(
            "{}: the session names the data file {}, outside the session's folder; check it is the file you mean, then add --allow-outside-data",
            path.display(),
            data_path.display()
        );
    }
    let options = session.data.load.to_options();
    let table = plumb_data::load(&data_path, &options).map_err(|e| {
        anyhow::anyhow!(
            "{}: the session's data file cannot be used: {e}",
            path.display()
        )
    })?;
    let hash = table.sha256().to_string();
    let note = (hash != session.data.sha256).then(|| {
        format!(
            "{} changed since the session was saved (SHA-256 differs; {} data rows then, {} now); the exclusions below name rows of the file as it is now",
            data_path.display(),
            session.data.rows,
            table.n_rows()
        )
    });
    let model = session
        .models
        .first()
        .ok_or_else(|| anyhow::anyhow!("{}: the session names no model", path.display()))?;
    let request = model
        .request(session.exclusions.iter().map(|e| e.row).collect())
        .map_err(|e| anyhow::anyhow!("{}: {e}", path.display()))?;
    let comparison = session
        .comparison
        .as_ref()
        .map(|m| m.request(Vec::new()))
        .transpose()
        .map_err(|e| anyhow::anyhow!("{}: the kept model: {e}", path.display()))?;
    let lab = LabAsked::of_session(&session, &request);
    let word = |p: &Path| plumb_report::text::shell_word(&p.display().to_string());
    let reproduce = format!(
        "plumb report {} -o {}{}",
        word(path),
        word(output),
        if allow_outside {
            " --allow-outside-data"
        } else {
            ""
        }
    );
    Ok(Prepared {
        table,
        request,
        exclusions: session.exclusions.clone(),
        reproduce,
        note,
        sha256: hash,
        comparison,
        lab,
    })
}

fn from_data(args: &ReportArgs) -> anyhow::Result<Prepared> {
    let y = args.y.clone().ok_or_else(|| {
        anyhow::anyhow!(
            "{}: name the response with --y (or give a .plumb session)",
            args.load.data.display()
        )
    })?;
    if args.x.is_empty() {
        anyhow::bail!(
            "{}: name at least one predictor with --x",
            args.load.data.display()
        );
    }
    let table = plumb_data::load(&args.load.data, &args.load.options())?;
    let exclude = match &args.exclude {
        Some(r) => r
            .within(table.n_rows(), table.source())
            .map_err(anyhow::Error::msg)?,
        None => Vec::new(),
    };
    if let Some((row, _)) = args.reasons.iter().find(|(r, _)| !exclude.contains(r)) {
        anyhow::bail!(
            "--reason names row {row}, which is not in --exclude; add it there or drop the reason"
        );
    }
    // A session records when each exclusion was made; a one-off summary has no such record.
    let at = args
        .save_session
        .is_some()
        .then(|| humantime::format_rfc3339_seconds(std::time::SystemTime::now()).to_string());
    let exclusions = exclude
        .iter()
        .map(|&row| Exclusion {
            row,
            reason: args
                .reasons
                .iter()
                .find(|(r, _)| *r == row)
                .map(|(_, t)| t.clone())
                .unwrap_or_default(),
            at: at.clone(),
        })
        .collect();
    let mut request = FitRequest {
        y,
        x: args.x.clone(),
        intercept: !args.no_intercept,
        degree: args.degree,
        weights: args.weights.clone(),
        weight_rule: args.weighting,
        exclude,
        level: args.level,
        ..FitRequest::default()
    };
    args.terms.apply(&mut request);
    let lab = LabAsked::of_args(args, &request)?;
    let comparison = args
        .compare
        .other(&request)
        .map_err(|e| anyhow::anyhow!("{}: {e}", args.load.data.display()))?;
    let reproduce = std::iter::once("plumb".to_string())
        .chain(std::env::args().skip(1))
        .map(|a| plumb_report::text::shell_word(&a))
        .collect::<Vec<_>>()
        .join(" ");
    let sha256 = table.sha256().to_string();
    Ok(Prepared {
        table,
        request,
        exclusions,
        reproduce,
        note: None,
        sha256,
        comparison,
        lab,
    })
}

fn session_of(
    args: &ReportArgs,
    table: &plumb_data::Table,
    request: &FitRequest,
    exclusions: &[Exclusion],
    sha256: String,
) -> Session {
    Session {
        plumbline_session: SCHEMA_VERSION,
        data: DataSource {
            path: Session::data_path_for(
                table.source(),
                args.save_session.as_deref().unwrap_or(Path::new(".")),
            ),
            sha256,
            rows: table.n_rows(),
            load: LoadSpec::as_read(&args.load.options(), table),
        },
        models: vec![ModelSpec::from_request(request)],
        exclusions: exclusions.to_vec(),
        comparison: None,
        calibration: None,
        agreement: None,
        view: serde_json::Map::new(),
    }
}
