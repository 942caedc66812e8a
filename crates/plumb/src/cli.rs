//! Command-line arguments.

use std::path::PathBuf;

use clap::{Args as ClapArgs, Parser, Subcommand, ValueEnum};
use plumb_core::calibration::WeightRule;
use plumb_core::regression::Transform;
use plumb_data::analysis::{Factor, ResponseScale};
use plumb_data::{DecimalMark, HeaderMode, LoadOptions, RowList, TextEncoding};

/// Plumbline: exploratory fitting with honest numbers.
#[derive(Debug, Parser)]
#[command(name = "plumb", version, about, args_conflicts_with_subcommands = true)]
pub struct Args {
    /// What to do (without one, the desktop workbench opens).
    #[command(subcommand)]
    pub command: Option<Command>,
    /// Options of the desktop workbench.
    #[command(flatten)]
    pub workbench: WorkbenchArgs,
}

/// `plumb [DATA]`: the desktop workbench.
#[derive(Debug, ClapArgs)]
pub struct WorkbenchArgs {
    /// Data file (CSV, TSV, Parquet, spreadsheet) or .plumb session to open.
    pub data: Option<PathBuf>,
    /// Open this response column on the pair bench (with --x).
    #[arg(long, value_name = "COLUMN", requires = "x")]
    pub y: Option<String>,
    /// Open this predictor column on the pair bench (with --y).
    #[arg(long, value_name = "COLUMN", requires = "y")]
    pub x: Option<String>,
    /// Rows to exclude at start (1-based data rows, e.g. 3,17,40-42).
    #[arg(long, value_name = "ROWS", value_parser = parse_rows)]
    pub exclude: Option<RowList>,
    /// Screen to show first.
    #[arg(long, value_enum)]
    pub screen: Option<ScreenArg>,
    /// Render the window once to this PNG file and exit (for checks and documentation).
    #[arg(long, value_name = "FILE.png")]
    pub screenshot: Option<PathBuf>,
    /// Window size in points, WIDTHxHEIGHT.
    #[arg(long, value_name = "WxH", value_parser = parse_size)]
    pub window_size: Option<(f32, f32)>,
    /// Colours (default: follow the system).
    #[arg(long, value_enum)]
    pub theme: Option<ThemeArg>,
    /// Overlay on the scatter (repeatable).
    #[arg(long = "overlay", value_enum, value_name = "KIND")]
    pub overlays: Vec<OverlayArg>,
    /// Colour the points by this text column and fit a line per group.
    #[arg(long, value_name = "COLUMN")]
    pub colour_by: Option<String>,
    /// Read DATA (delimited text) in the one-pass view instead of loading it: the line of --y
    /// on --x and a density image, in bounded memory, for files too large to hold.
    #[arg(long, requires = "data")]
    pub one_pass: bool,
    /// What the pair bench is for: a fit, a calibration (unknowns, limits, weightings), or two
    /// methods compared (--y the new one, --x the established one).
    #[arg(long, value_enum, value_name = "MODE")]
    pub bench: Option<BenchArg>,
    /// Weights of the pair from a rule on x and y: 1/x, 1/x2, 1/y2 or 1/s2.
    #[arg(long, value_name = "RULE", value_parser = parse_weight_rule, requires = "x")]
    pub weighting: Option<WeightRule>,
    /// Unknown samples to read off the calibration (opens the bench as a calibration).
    #[command(flatten)]
    pub unknowns: UnknownArgs,
}

/// What the pair bench is for.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum BenchArg {
    /// A fit and its diagnostics.
    Fit,
    /// A calibration.
    Calibration,
    /// Two methods measuring the same thing.
    Methods,
}

/// Scatter overlays.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum OverlayArg {
    /// Theil–Sen line.
    TheilSen,
    /// Deming line (equal error variances).
    Deming,
    /// LOESS curve (span 0.5).
    Loess,
}

/// Colour themes.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum ThemeArg {
    /// Light background.
    Light,
    /// Dark background.
    Dark,
}

/// Screens of the workbench.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum ScreenArg {
    /// The file's columns.
    Columns,
    /// The co-movement map.
    Map,
    /// The pair bench.
    Bench,
}

fn parse_size(s: &str) -> Result<(f32, f32), String> {
    let (w, h) = s
        .split_once(['x', 'X'])
        .ok_or_else(|| format!("'{s}' is not WIDTHxHEIGHT, e.g. 1440x900"))?;
    let parse = |v: &str| {
        v.trim()
            .parse::<f32>()
            .ok()
            .filter(|n| (200.0..=8000.0).contains(n))
            .ok_or_else(|| format!("'{v}' is not a size between 200 and 8000"))
    };
    Ok((parse(w)?, parse(h)?))
}

/// Subcommands.
#[derive(Debug, Subcommand)]
pub enum Command {
    /// Fit a least-squares line, plane or polynomial and report it.
    Fit(FitArgs),
    /// Diagnose each row of a fit: leverage, studentized residuals, Cook's distance, DFFITS, DFBETAS.
    Influence(InfluenceArgs),
    /// Write the summary for a colleague (HTML, charts as SVG/PNG, CSVs) from a session or a data file.
    Report(ReportArgs),
    /// Measure how every pair of numeric columns moves together, with adjusted p-values.
    Corr(CorrArgs),
    /// List the columns of a data file with their type, missing count and range.
    Columns(ColumnsArgs),
    /// One pass over a delimited file of any size (never loaded whole): the least-squares line
    /// of one column on another, and their Pearson r, in bounded memory.
    Stream(StreamArgs),
    /// Read unknown samples off a calibration line or curve: concentrations with intervals,
    /// detection and quantitation limits, lack of fit, and the weightings side by side.
    Calibrate(CalibrateArgs),
    /// Compare two methods that measure the same thing on the same samples: Passing–Bablok and
    /// Deming lines, and the agreement of their differences (bias, limits of agreement).
    Agree(AgreeArgs),
}

/// Coefficient for `plumb corr`.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum MethodArg {
    /// Pearson's r (linear association).
    Pearson,
    /// Spearman's rank correlation (monotone association).
    Spearman,
    /// Kendall's tau-b (rank concordance, tie-corrected).
    Kendall,
    /// Distance correlation (any dependence; permutation p-value).
    Distance,
}

/// Multiple-testing adjustment for `plumb corr`.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum AdjustArg {
    /// Holm's step-down (family-wise error rate).
    Holm,
    /// Benjamini–Hochberg (false discovery rate).
    Bh,
    /// No adjustment.
    None,
}

/// `plumb corr`.
#[derive(Debug, ClapArgs)]
pub struct CorrArgs {
    /// How to read the file.
    #[command(flatten)]
    pub load: LoadArgs,
    /// Columns to include, comma-separated (default: every numeric column but the order column).
    #[arg(long, value_delimiter = ',', value_name = "A,B,C")]
    pub columns: Vec<String>,
    /// Coefficient to compute.
    #[arg(long, value_enum, default_value_t = MethodArg::Pearson)]
    pub method: MethodArg,
    /// Adjustment of p-values across the pairs tested (applied when more than one pair is tested).
    #[arg(long, value_enum, default_value_t = AdjustArg::Holm)]
    pub adjust: AdjustArg,
    /// Column giving the order of the rows (time, run sequence): adds correlations of first
    /// differences and after removing a linear trend, to expose shared drifts.
    #[arg(long, value_name = "COLUMN")]
    pub order: Option<String>,
    /// Output format.
    #[arg(long, value_enum, default_value_t = Format::Text)]
    pub format: Format,
}

/// Output format.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum Format {
    /// Readable layout for people.
    Text,
    /// One JSON object on standard output.
    Json,
}

/// Header handling on the command line.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum HeaderArg {
    /// Detect from the content.
    Auto,
    /// The first row names the columns.
    Yes,
    /// No header row.
    No,
}

/// Decimal mark on the command line.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum DecimalArg {
    /// Detect from the content.
    Auto,
    /// `3.14`.
    Point,
    /// `3,14`.
    Comma,
}

/// How to read the data file (shared by every subcommand).
#[derive(Debug, ClapArgs)]
pub struct LoadArgs {
    /// Data file: CSV/TSV/semicolon text, Parquet, or a spreadsheet (xlsx, xls, ods).
    pub data: PathBuf,
    /// Field delimiter of a text file (one character, or "tab"); detected when omitted.
    #[arg(long, value_parser = parse_delimiter)]
    pub delimiter: Option<u8>,
    /// Whether the first row names the columns.
    #[arg(long, value_enum, default_value_t = HeaderArg::Auto)]
    pub header: HeaderArg,
    /// Decimal mark of numbers in a text file.
    #[arg(long, value_enum, default_value_t = DecimalArg::Auto)]
    pub decimal: DecimalArg,
    /// Text encoding of a text file: utf-8, utf-16le, utf-16be or windows-1252 (also
    /// latin-1); by default the byte-order mark, then UTF-16 by its zero bytes, then UTF-8, then Windows-1252
    /// with a note.
    #[arg(long, value_parser = parse_encoding)]
    pub encoding: Option<TextEncoding>,
    /// A cell value that means "missing" (repeatable), beside empty, NA, N/A, NaN and ".".
    #[arg(long = "missing", value_name = "TOKEN")]
    pub missing: Vec<String>,
    /// Spreadsheet sheet to read (default: the first).
    #[arg(long)]
    pub sheet: Option<String>,
}

impl LoadArgs {
    /// The loader's options.
    pub fn options(&self) -> LoadOptions {
        LoadOptions {
            delimiter: self.delimiter,
            header: match self.header {
                HeaderArg::Auto => HeaderMode::Auto,
                HeaderArg::Yes => HeaderMode::Yes,
                HeaderArg::No => HeaderMode::No,
            },
            decimal: match self.decimal {
                DecimalArg::Auto => None,
                DecimalArg::Point => Some(DecimalMark::Point),
                DecimalArg::Comma => Some(DecimalMark::Comma),
            },
            encoding: self.encoding,
            missing_tokens: self.missing.clone(),
            sheet: self.sheet.clone(),
            memory_limit: None,
            only: None,
            skip_hash: false,
        }
    }

    /// The loader's options for a command that prints numbers only: the file is not hashed
    /// (only sessions and summaries record the hash).
    pub fn options_for_numbers(&self) -> LoadOptions {
        LoadOptions {
            skip_hash: true,
            ..self.options()
        }
    }
}

/// How a model's terms are built beyond its columns: a grouping and transforms (shared by
/// `plumb fit`, `plumb influence` and `plumb report`).
#[derive(Debug, Clone, Default, ClapArgs)]
pub struct TermArgs {
    /// Group the rows by this column (text, or numbers as labels): an indicator term per level
    /// against the reference level.
    #[arg(long, value_name = "COLUMN")]
    pub group: Option<String>,
    /// The level of --group the others are measured against (default: the first in sorted
    /// order).
    #[arg(long, value_name = "LEVEL", requires = "group")]
    pub reference: Option<String>,
    /// With --group: a slope of its own per level for the first predictor (else parallel lines).
    #[arg(long, requires = "group")]
    pub separate_slopes: bool,
    /// Scale of the response: ln, log10, sqrt, reciprocal, box-cox (λ by maximum likelihood)
    /// or box-cox:LAMBDA.
    #[arg(long, value_name = "KIND", value_parser = parse_response_scale)]
    pub transform_y: Option<ResponseScale>,
    /// Scale of a predictor, as COLUMN=KIND with KIND ln, log10, sqrt or reciprocal (repeatable).
    #[arg(long = "transform", value_name = "COLUMN=KIND", value_parser = parse_x_transform)]
    pub transforms: Vec<(String, Transform)>,
}

impl TermArgs {
    /// Puts the grouping and the transforms into `request`.
    pub fn apply(&self, request: &mut plumb_data::analysis::FitRequest) {
        request.factor = self.group.as_ref().map(|column| Factor {
            column: column.clone(),
            reference: self.reference.clone(),
            separate_slopes: self.separate_slopes,
        });
        request.response = self.transform_y.unwrap_or_default();
        request.x_transforms = self.transforms.clone();
    }
}

fn parse_response_scale(s: &str) -> Result<ResponseScale, String> {
    ResponseScale::parse(s)
}

fn parse_x_transform(s: &str) -> Result<(String, Transform), String> {
    let bad = || {
        format!(
            "'{s}' is not COLUMN=KIND with KIND ln, log10, sqrt or reciprocal (such as dose=ln)"
        )
    };
    let (column, kind) = s.rsplit_once('=').ok_or_else(bad)?;
    let t = plumb_data::analysis::transform_named(kind.trim())
        .filter(|t| !t.is_identity())
        .ok_or_else(bad)?;
    if column.trim().is_empty() {
        return Err(bad());
    }
    Ok((column.trim().to_string(), t))
}

/// A second model set beside the one fitted (`plumb fit`): the same model changed as these
/// flags say.
#[derive(Debug, Clone, Default, ClapArgs)]
pub struct CompareArgs {
    /// Compare with the same model without this part: a predictor column, the --group column,
    /// or "slopes" for the separate slopes (repeatable).
    #[arg(long, value_name = "TERM")]
    pub compare_without: Vec<String>,
    /// Compare with the same model at this polynomial degree.
    #[arg(long, value_name = "N", value_parser = clap::value_parser!(u32).range(1..=10))]
    pub compare_degree: Option<u32>,
}

impl CompareArgs {
    /// The other model, when a comparison is asked for.
    ///
    /// # Errors
    /// A part to leave out that the model does not have, or a comparison that leaves no
    /// predictor.
    pub fn other(
        &self,
        request: &plumb_data::analysis::FitRequest,
    ) -> Result<Option<plumb_data::analysis::FitRequest>, String> {
        if self.compare_without.is_empty() && self.compare_degree.is_none() {
            return Ok(None);
        }
        let mut other = request.clone();
        for part in &self.compare_without {
            let group = request.factor.as_ref().map(|f| f.column.as_str());
            if part == "slopes" && request.factor.as_ref().is_some_and(|f| f.separate_slopes) {
                if let Some(f) = &mut other.factor {
                    f.separate_slopes = false;
                }
            } else if Some(part.as_str()) == group {
                other.factor = None;
            } else if request.x.contains(part) {
                other.x.retain(|x| x != part);
            } else {
                return Err(format!(
                    "--compare-without {part}: the model has no such part (its predictors: {}{})",
                    request.x.join(", "),
                    group.map_or(String::new(), |g| format!("; its grouping: {g}"))
                ));
            }
        }
        if other.x.is_empty() {
            return Err("--compare-without leaves no predictor in the other model".into());
        }
        if let Some(d) = self.compare_degree {
            other.degree = d;
        }
        Ok(Some(other))
    }
}

/// The model shared by `plumb fit` and `plumb influence`.
#[derive(Debug, ClapArgs)]
pub struct ModelArgs {
    /// Response column.
    #[arg(long, value_name = "COLUMN")]
    pub y: String,
    /// Predictor column (repeat for several).
    #[arg(long, value_name = "COLUMN", required = true)]
    pub x: Vec<String>,
    /// Fit through the origin (no intercept); R² is then uncentered.
    #[arg(long)]
    pub no_intercept: bool,
    /// Polynomial degree of the single predictor (1..=10).
    #[arg(long, default_value_t = 1, value_parser = clap::value_parser!(u32).range(1..=10))]
    pub degree: u32,
    /// Column of positive weights (weighted least squares).
    #[arg(long, value_name = "COLUMN", conflicts_with = "weighting")]
    pub weights: Option<String>,
    /// Weights from a rule on the single predictor x and the response y: 1/x, 1/x2, 1/y2, or
    /// 1/s2 (the inverse variance of the replicate readings at each x).
    #[arg(long, value_name = "RULE", value_parser = parse_weight_rule)]
    pub weighting: Option<WeightRule>,
    /// Data rows to leave out, numbered from 1 after the header: "3,17,40-42".
    #[arg(long, value_name = "ROWS", value_parser = parse_rows)]
    pub exclude: Option<RowList>,
    /// Confidence level of the coefficient intervals.
    #[arg(long, default_value_t = 0.95, value_parser = parse_level)]
    pub level: f64,
    /// Grouping and transforms.
    #[command(flatten)]
    pub terms: TermArgs,
}

impl ModelArgs {
    /// Every column the model names (response, predictors, weights, grouping).
    pub fn columns(&self) -> Vec<String> {
        let mut names = vec![self.y.clone()];
        names.extend(self.x.iter().cloned());
        names.extend(self.weights.iter().cloned());
        names.extend(self.terms.group.iter().cloned());
        names
    }
}

impl LoadArgs {
    /// The loader's options for a command that prints numbers only, reading only `columns`
    /// from a text file (all of them when that could change what is read or said; see
    /// `LoadOptions::only`).
    pub fn options_for(&self, columns: Vec<String>) -> LoadOptions {
        LoadOptions {
            only: Some(columns),
            ..self.options_for_numbers()
        }
    }
}

fn parse_weight_rule(s: &str) -> Result<WeightRule, String> {
    WeightRule::parse(s)
        .ok_or_else(|| format!("'{s}' is not a weighting rule: 1/x, 1/x2, 1/y2 or 1/s2"))
}

/// The order of the rows for the sequence checks (Durbin–Watson, runs of signs).
#[derive(Debug, Clone, Default, ClapArgs)]
pub struct OrderArgs {
    /// Column giving the order the rows were measured in (run sequence, time): adds the
    /// Durbin–Watson statistic and the runs of residual signs along it.
    #[arg(long, value_name = "COLUMN", conflicts_with = "file_order")]
    pub order: Option<String>,
    /// The rows were measured in file order: check the residuals along it.
    #[arg(long)]
    pub file_order: bool,
}

impl OrderArgs {
    /// The row order to check along.
    pub fn row_order(&self) -> plumb_data::analysis::RowOrder {
        use plumb_data::analysis::RowOrder;
        match (&self.order, self.file_order) {
            (Some(c), _) => RowOrder::Column(c.clone()),
            (None, true) => RowOrder::File,
            (None, false) => RowOrder::None,
        }
    }
}

impl ModelArgs {
    /// The analysis request these arguments describe, on `table`.
    ///
    /// # Errors
    /// Excluded rows the table does not have.
    pub fn request(
        &self,
        table: &plumb_data::Table,
    ) -> Result<plumb_data::analysis::FitRequest, String> {
        let exclude = match &self.exclude {
            Some(r) => r.within(table.n_rows(), table.source())?,
            None => Vec::new(),
        };
        let mut request = plumb_data::analysis::FitRequest {
            y: self.y.clone(),
            x: self.x.clone(),
            intercept: !self.no_intercept,
            degree: self.degree,
            weights: self.weights.clone(),
            weight_rule: self.weighting,
            exclude,
            level: self.level,
            ..plumb_data::analysis::FitRequest::default()
        };
        self.terms.apply(&mut request);
        Ok(request)
    }
}

/// `plumb fit`.
#[derive(Debug, ClapArgs)]
pub struct FitArgs {
    /// How to read the file.
    #[command(flatten)]
    pub load: LoadArgs,
    /// The model.
    #[command(flatten)]
    pub model: ModelArgs,
    /// Overlay line for a single predictor: "theil-sen", or "deming" / "deming:LAMBDA" with
    /// LAMBDA = Var(error in y)/Var(error in x) (default 1).
    #[arg(long, value_name = "METHOD", value_parser = parse_robust)]
    pub robust: Option<plumb_data::analysis::Robust>,
    /// LOESS smooth (degree 2) with this span, the fraction of points in each local fit (0–1].
    #[arg(long, value_name = "SPAN")]
    pub loess: Option<f64>,
    /// Read a one-predictor fit at this x: fitted value with its bands, and (in z-units) how far
    /// toward the mean a unit at this x is expected to sit on y.
    #[arg(long, value_name = "X", allow_negative_numbers = true)]
    pub at: Option<f64>,
    /// A second model to set beside this one.
    #[command(flatten)]
    pub compare: CompareArgs,
    /// The row order for the sequence checks.
    #[command(flatten)]
    pub order: OrderArgs,
    /// Output format.
    #[arg(long, value_enum, default_value_t = Format::Text)]
    pub format: Format,
}

/// `plumb calibrate`.
#[derive(Debug, ClapArgs)]
pub struct CalibrateArgs {
    /// How to read the standards' file.
    #[command(flatten)]
    pub load: LoadArgs,
    /// The calibration: --y the reading, --x the standards' concentration.
    #[command(flatten)]
    pub model: ModelArgs,
    /// The unknown samples.
    #[command(flatten)]
    pub unknowns: UnknownArgs,
    /// Where σ of the detection limits comes from: the residual standard deviation, or the
    /// standard error of the intercept.
    #[arg(long, value_enum, default_value_t = SigmaArg::Residual)]
    pub sigma: SigmaArg,
    /// The row order for the sequence checks.
    #[command(flatten)]
    pub order: OrderArgs,
    /// Output format.
    #[arg(long, value_enum, default_value_t = Format::Text)]
    pub format: Format,
}

/// Unknown samples to read off a calibration, typed or from a second file.
#[derive(Debug, Clone, Default, ClapArgs)]
pub struct UnknownArgs {
    /// An unknown sample as NAME=READING[,READING…] (repeatable), e.g. A7=0.412,0.418.
    #[arg(long = "unknown", value_name = "NAME=READINGS", value_parser = parse_unknown)]
    pub unknowns: Vec<plumb_data::analysis::Unknown>,
    /// A second file of unknowns: its column named like --y (or --unknowns-reading) holds
    /// the readings, grouped into samples by --unknowns-sample.
    #[arg(long, value_name = "FILE")]
    pub unknowns_file: Option<PathBuf>,
    /// The readings' column in --unknowns-file (default: the --y column's name).
    #[arg(long, value_name = "COLUMN", requires = "unknowns_file")]
    pub unknowns_reading: Option<String>,
    /// The column of --unknowns-file naming each sample (replicates share a name; default:
    /// each row is a sample).
    #[arg(long, value_name = "COLUMN", requires = "unknowns_file")]
    pub unknowns_sample: Option<String>,
}

impl UnknownArgs {
    /// Whether any unknown is given.
    pub fn any(&self) -> bool {
        !self.unknowns.is_empty() || self.unknowns_file.is_some()
    }

    /// The unknowns typed and those of the second file (read like the data file, `options`),
    /// whose readings default to the column named `y`.
    ///
    /// # Errors
    /// The second file cannot be read, or lacks the columns.
    pub fn read(
        &self,
        y: &str,
        options: &LoadOptions,
    ) -> anyhow::Result<Vec<plumb_data::analysis::Unknown>> {
        let mut out = self.unknowns.clone();
        if let Some(path) = &self.unknowns_file {
            let second = plumb_data::load(path, options)?;
            let reading = self.unknowns_reading.as_deref().unwrap_or(y);
            out.extend(plumb_data::analysis::unknowns_from_table(
                &second,
                reading,
                self.unknowns_sample.as_deref(),
            )?);
        }
        Ok(out)
    }
}

/// Where σ of the limits comes from.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum SigmaArg {
    /// The residual standard deviation of the line.
    Residual,
    /// The standard error of its intercept.
    Intercept,
}

impl SigmaArg {
    /// The core's name for it.
    pub fn source(self) -> plumb_core::calibration::SigmaSource {
        match self {
            Self::Residual => plumb_core::calibration::SigmaSource::ResidualSd,
            Self::Intercept => plumb_core::calibration::SigmaSource::InterceptSe,
        }
    }
}

fn parse_unknown(s: &str) -> Result<plumb_data::analysis::Unknown, String> {
    let bad = || format!("'{s}' is not NAME=READING[,READING…] (such as A7=0.412,0.418)");
    let (name, readings) = s.split_once('=').ok_or_else(bad)?;
    let readings = readings
        .split(',')
        .map(|r| r.trim().parse::<f64>().ok().filter(|v| v.is_finite()))
        .collect::<Option<Vec<f64>>>()
        .ok_or_else(bad)?;
    if name.trim().is_empty() || readings.is_empty() {
        return Err(bad());
    }
    Ok(plumb_data::analysis::Unknown {
        name: name.trim().to_string(),
        readings,
    })
}

/// `plumb agree`.
#[derive(Debug, ClapArgs)]
pub struct AgreeArgs {
    /// How to read the file.
    #[command(flatten)]
    pub load: LoadArgs,
    /// The established (reference) method's column.
    #[arg(long, value_name = "COLUMN")]
    pub reference: String,
    /// The new (test) method's column.
    #[arg(long, value_name = "COLUMN")]
    pub test: String,
    /// Data rows to leave out: "3,17,40-42".
    #[arg(long, value_name = "ROWS", value_parser = parse_rows)]
    pub exclude: Option<RowList>,
    /// Confidence level of the intervals.
    #[arg(long, default_value_t = 0.95, value_parser = parse_level)]
    pub level: f64,
    /// Error-variance ratio of the Deming line, Var(error of test)/Var(error of reference).
    #[arg(long, default_value_t = 1.0, value_name = "LAMBDA")]
    pub deming_ratio: f64,
    /// Differences as percentages of the pair's mean (when the spread grows with the level).
    #[arg(long)]
    pub percent: bool,
    /// Output format.
    #[arg(long, value_enum, default_value_t = Format::Text)]
    pub format: Format,
}

/// `plumb influence`.
#[derive(Debug, ClapArgs)]
pub struct InfluenceArgs {
    /// How to read the file.
    #[command(flatten)]
    pub load: LoadArgs,
    /// The model.
    #[command(flatten)]
    pub model: ModelArgs,
    /// Output format.
    #[arg(long, value_enum, default_value_t = Format::Text)]
    pub format: Format,
}

/// `plumb report`.
#[derive(Debug, ClapArgs)]
pub struct ReportArgs {
    /// A session file (`.plumb`), or a data file with --y and --x.
    #[command(flatten)]
    pub load: LoadArgs,
    /// Response column (data-file input).
    #[arg(long, value_name = "COLUMN")]
    pub y: Option<String>,
    /// Predictor column, repeatable (data-file input).
    #[arg(long, value_name = "COLUMN")]
    pub x: Vec<String>,
    /// Fit through the origin.
    #[arg(long)]
    pub no_intercept: bool,
    /// Polynomial degree of the single predictor (1..=10).
    #[arg(long, default_value_t = 1, value_parser = clap::value_parser!(u32).range(1..=10))]
    pub degree: u32,
    /// Column of positive weights.
    #[arg(long, value_name = "COLUMN", conflicts_with = "weighting")]
    pub weights: Option<String>,
    /// Weights from a rule on x and y: 1/x, 1/x2, 1/y2 or 1/s2.
    #[arg(long, value_name = "RULE", value_parser = parse_weight_rule)]
    pub weighting: Option<WeightRule>,
    /// Data rows to leave out: "3,17,40-42".
    #[arg(long, value_name = "ROWS", value_parser = parse_rows)]
    pub exclude: Option<RowList>,
    /// The reason for excluding a row, as ROW=TEXT (repeatable); rows without one are flagged.
    #[arg(long = "reason", value_name = "ROW=TEXT", value_parser = parse_reason)]
    pub reasons: Vec<(usize, String)>,
    /// Confidence level of the intervals.
    #[arg(long, default_value_t = 0.95, value_parser = parse_level)]
    pub level: f64,
    /// Grouping and transforms (data-file input).
    #[command(flatten)]
    pub terms: TermArgs,
    /// A second model shown beside this one.
    #[command(flatten)]
    pub compare: CompareArgs,
    /// The row order for the sequence checks.
    #[command(flatten)]
    pub order: OrderArgs,
    /// Read the model as a calibration: unknowns, limits, lack of fit, the weightings side by
    /// side (implied by --unknown and --unknowns-file).
    #[arg(long)]
    pub calibration: bool,
    /// The unknown samples of the calibration.
    #[command(flatten)]
    pub unknowns: UnknownArgs,
    /// Where σ of the detection limits comes from.
    #[arg(long, value_enum, default_value_t = SigmaArg::Residual)]
    pub sigma: SigmaArg,
    /// --y and --x measure the same thing by two methods (--y the new one): add the method
    /// comparison (Passing–Bablok, Deming, the differences' bias and limits of agreement).
    #[arg(long)]
    pub methods: bool,
    /// With --methods: differences as percentages of the pair's mean.
    #[arg(long, requires = "methods")]
    pub percent: bool,
    /// With --methods: Deming's error-variance ratio.
    #[arg(long, value_name = "LAMBDA", requires = "methods")]
    pub deming_ratio: Option<f64>,
    /// Where to write the HTML; the other files go beside it.
    #[arg(short = 'o', long = "output", value_name = "FILE.html")]
    pub output: PathBuf,
    /// Also save this analysis as a session file (data-file input).
    #[arg(long, value_name = "FILE.plumb")]
    pub save_session: Option<PathBuf>,
    /// Read the data file a session names even when it lies outside the session's folder.
    #[arg(long)]
    pub allow_outside_data: bool,
}

fn parse_reason(s: &str) -> Result<(usize, String), String> {
    let bad = || format!("'{s}' is not ROW=TEXT (such as 17=\"decimal point slipped\")");
    let (row, text) = s.split_once('=').ok_or_else(bad)?;
    let row: usize = row.trim().parse().map_err(|_| bad())?;
    if row == 0 || text.trim().is_empty() {
        return Err(bad());
    }
    Ok((row, text.trim().to_string()))
}

/// `plumb columns`.
#[derive(Debug, ClapArgs)]
pub struct ColumnsArgs {
    /// How to read the file.
    #[command(flatten)]
    pub load: LoadArgs,
}

/// `plumb stream`.
#[derive(Debug, ClapArgs)]
pub struct StreamArgs {
    /// How to read the file (a delimited text file).
    #[command(flatten)]
    pub load: LoadArgs,
    /// Response column.
    #[arg(long, value_name = "COLUMN")]
    pub y: String,
    /// Predictor column.
    #[arg(long, value_name = "COLUMN")]
    pub x: String,
    /// Confidence level of the coefficient intervals.
    #[arg(long, default_value_t = 0.95, value_parser = parse_level)]
    pub level: f64,
    /// Megabytes of text read at a time (memory use is a few times this per core).
    #[arg(long, value_name = "MB", default_value_t = 8, value_parser = clap::value_parser!(u64).range(1..=1024))]
    pub chunk_mb: u64,
    /// Output format.
    #[arg(long, value_enum, default_value_t = Format::Text)]
    pub format: Format,
}

fn parse_encoding(s: &str) -> Result<TextEncoding, String> {
    TextEncoding::parse(s).ok_or_else(|| {
        format!("'{s}' is not an encoding read here: utf-8, utf-16le, utf-16be or windows-1252")
    })
}

/// `--exclude ROWS`: parsed by the data layer, where it is fuzzed.
fn parse_rows(s: &str) -> Result<RowList, String> {
    RowList::parse(s)
}

fn parse_robust(s: &str) -> Result<plumb_data::analysis::Robust, String> {
    use plumb_data::analysis::Robust;
    match s.split_once(':') {
        None if s == "theil-sen" => Ok(Robust::TheilSen),
        None if s == "deming" => Ok(Robust::Deming(1.0)),
        Some(("deming", l)) => match l.parse::<f64>() {
            Ok(v) if v.is_finite() && v > 0.0 => Ok(Robust::Deming(v)),
            _ => Err(format!(
                "'{l}' is not a positive error-variance ratio (such as deming:2)"
            )),
        },
        _ => Err(format!("'{s}' is not theil-sen, deming or deming:LAMBDA")),
    }
}

fn parse_level(s: &str) -> Result<f64, String> {
    match s.parse::<f64>() {
        Ok(v) if v > 0.0 && v < 1.0 => Ok(v),
        _ => Err(format!(
            "'{s}' is not a confidence level between 0 and 1 (such as 0.95)"
        )),
    }
}

fn parse_delimiter(s: &str) -> Result<u8, String> {
    match s {
        "tab" | "\\t" => Ok(b'\t'),
        _ if s.len() == 1 && s.is_ascii() => Ok(s.as_bytes()[0]),
        _ => Err(format!("'{s}' is not a one-character delimiter (or 'tab')")),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn robust_methods_parse() {
        use plumb_data::analysis::Robust;
        assert_eq!(parse_robust("theil-sen"), Ok(Robust::TheilSen));
        assert_eq!(parse_robust("deming"), Ok(Robust::Deming(1.0)));
        assert_eq!(parse_robust("deming:2.5"), Ok(Robust::Deming(2.5)));
        assert!(parse_robust("deming:-1").is_err());
        assert!(parse_robust("median").is_err());
    }

    #[test]
    fn levels_and_delimiters_are_validated() {
        assert_eq!(parse_level("0.9"), Ok(0.9));
        assert!(parse_level("95").is_err());
        assert_eq!(parse_delimiter("tab"), Ok(b'\t'));
        assert!(parse_delimiter(";;").is_err());
    }
}
