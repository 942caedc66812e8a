//! The diagnostics: everything about a pair that costs more than a live update — the case
//! diagnostics of every row, bands, overlays, cues, per-group lines and the per-exclusion
//! effects. Computed off the UI thread after each change through the same analysis route as
//! the command line (`plumb_data::analysis::analyze`); a newer change supersedes an older
//! computation.

use std::sync::Arc;

use plumb_core::alternative::{deming, DemingFit};
use plumb_core::regression::{AddedVariable, BoxCox, CaseInfluence, LinearFit};
use plumb_data::analysis::{
    agree, analyze, assumption_checks, calibrate, compare, AgreementReport, Analysis,
    AnalysisError, CalibrationReport, Checks, Comparison, Curve, ExtrasRequest, GroupTests,
    PairExtras, Robust, Wanted,
};
use plumb_data::Table;
use plumb_report::{exclusion_effects, Effect};

use super::case_figures::CaseFigures;
use super::lab_views::{lab_views, LabViews};
use super::marks::Marks;
use super::pair::{FitSpec, Pair, PairRows};
use super::reading::{BenchMode, Reading};
use super::views::views_of;
pub use super::views::{against_fit, AddedView, ResidualAxis, Views};

/// Optional overlays on the scatter.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Overlays {
    /// Theil–Sen line.
    pub theil_sen: bool,
    /// Deming line (error ratio 1).
    pub deming: bool,
    /// LOESS curve.
    pub loess: bool,
    /// LOESS span (fraction of the rows in each local fit).
    pub loess_span: f64,
}

impl Default for Overlays {
    fn default() -> Self {
        Self {
            theil_sen: false,
            deming: false,
            loess: false,
            loess_span: 0.5,
        }
    }
}

/// What a diagnostics job needs (cheap to clone: the columns are shared).
#[derive(Debug, Clone)]
pub struct Input {
    /// The table (the analysis reads the model's columns from it).
    pub table: Arc<Table>,
    /// The model.
    pub spec: FitSpec,
    /// The model's rows and values.
    pub pair: PairRows,
    /// The analyst's marks.
    pub marks: Marks,
    /// Overlays asked for.
    pub overlays: Overlays,
    /// Group level of each pair entry, for per-group lines.
    pub groups: Option<Arc<[Option<usize>]>>,
    /// A model kept for comparison.
    pub kept: Option<FitSpec>,
    /// What the residuals are drawn against.
    pub residual_axis: ResidualAxis,
    /// What the bench reads beside the fit (calibration, method comparison, check order).
    pub reading: Reading,
}

impl Input {
    /// The job input for `pair` under `marks`.
    pub fn of(
        table: &Arc<Table>,
        pair: &Pair,
        marks: &Marks,
        overlays: Overlays,
        groups: Option<Arc<[Option<usize>]>>,
    ) -> Self {
        Self {
            table: Arc::clone(table),
            spec: pair.spec.clone(),
            pair: pair.rows(),
            marks: marks.clone(),
            overlays,
            groups,
            kept: None,
            residual_axis: ResidualAxis::default(),
            reading: Reading::default(),
        }
    }

    /// Current position of entry `i`: moved (what-if) or as in the file.
    fn point(&self, i: usize) -> (f64, f64) {
        self.pair.point(i, &self.marks)
    }

    /// The pair entry of data row `row`.
    fn entry_of(&self, row: usize) -> Option<usize> {
        self.pair.index_of(row)
    }
}

/// The results of one diagnostics job.
#[derive(Debug, Clone)]
pub struct Diagnostics {
    /// The model these results are for.
    pub spec: FitSpec,
    /// The marks these results are for.
    pub marks: Marks,
    /// Pair entries included, ascending; `cases.get(k)` belongs to `included[k]`.
    pub included: Arc<[usize]>,
    /// The least-squares fit of the included rows at their current (possibly moved) positions,
    /// without its per-row fitted values and residuals (the case figures carry the residuals,
    /// a fitted value is read from the coefficients, and at millions of rows the vectors would
    /// be two more copies of the data).
    pub fit: Result<LinearFit, String>,
    /// What is shown of the included rows' case diagnostics.
    pub cases: CaseFigures,
    /// Bands, overlays, cues and the z-units view.
    pub extras: Option<PairExtras>,
    /// Deming line, when asked for.
    pub deming: Option<Result<DemingFit, String>>,
    /// Before/after of each exclusion and of all together (on the file's values).
    pub effects: Result<Vec<Effect>, String>,
    /// Straight line per group level.
    pub group_lines: Vec<GroupLine>,
    /// Points of the residual, leverage and quantile views.
    pub views: Views,
    /// The grouping factor's tests and table (with a factor in the model).
    pub groups: Option<GroupTests>,
    /// The Box–Cox estimate on the included rows (with that response scale).
    pub boxcox: Option<BoxCox>,
    /// The response as fitted: `y`, or its transform's label (`ln(y)`).
    pub scale: String,
    /// The fit kept for comparison.
    pub kept: Option<Kept>,
    /// Positions in `cases` of the most influential rows, largest first, by Cook's distance,
    /// by leverage and by |externally studentized residual| (at most [`TOP_ROWS`] each).
    pub top: [Vec<usize>; 3],
    /// The assumption checks of the fit.
    pub checks: Option<Result<Checks, String>>,
    /// The calibration read from the fit (in calibration mode).
    pub calibration: Option<Result<CalibrationReport, String>>,
    /// The two methods compared (in method-comparison mode).
    pub agreement: Option<Result<AgreementReport, String>>,
    /// The points of the differences view and the weightings' views.
    pub lab_views: LabViews,
}

/// Rows kept in each influence ranking.
pub const TOP_ROWS: usize = 50;

/// The fit kept beside the current one, and how they compare.
#[derive(Debug, Clone)]
pub struct Kept {
    /// The kept model.
    pub spec: FitSpec,
    /// The two fits' figures, the partial F when one is nested in the other, or why not.
    pub comparison: Result<Comparison, String>,
    /// The kept model's curves (one predictor), in the data's units.
    pub curves: Vec<Curve>,
}

/// A straight line through one group's included points.
#[derive(Debug, Clone, PartialEq)]
pub struct GroupLine {
    /// Level index.
    pub level: usize,
    /// Intercept.
    pub intercept: f64,
    /// Slope.
    pub slope: f64,
    /// R² within the group.
    pub r_squared: f64,
    /// Points in the group.
    pub n: usize,
}

/// Runs the diagnostics for `input`.
pub fn compute(input: &Input) -> Diagnostics {
    let wanted = Wanted {
        influence: true,
        // The bench never shows DFBETAS: a case carries no per-row vector.
        dfbetas: false,
        extras: Some(ExtrasRequest {
            robust: input.overlays.theil_sen.then_some(Robust::TheilSen),
            loess_span: input.overlays.loess.then_some(input.overlays.loess_span),
            at: None,
        }),
        added_variables: input.spec.x.len() > 1 || input.spec.factor.is_some(),
    };
    let request = input.spec.with_marks(&input.marks);
    let analysis = analyze(&input.table, &request, wanted);
    let checks = analysis.as_ref().ok().map(|a| {
        assumption_checks(&input.table, a, &input.reading.order).map_err(|e| e.to_string())
    });
    let calibration = (input.reading.mode == BenchMode::Calibration).then(|| match &analysis {
        Ok(a) => calibrate(&request, a, &input.reading.calibration).map_err(|e| e.to_string()),
        Err(e) => Err(e.to_string()),
    });
    let agreement = (input.reading.mode == BenchMode::Agreement).then(|| {
        let a = input
            .reading
            .agreement_request(&input.spec, &input.marks, true);
        agree(&input.table, &a).map_err(|e| e.to_string())
    });
    let lab_views = lab_views(
        input,
        calibration.as_ref().and_then(|c| c.as_ref().ok()),
        agreement.as_ref().and_then(|a| a.as_ref().ok()),
    );
    let mut parts = Parts::of(input, analysis);
    // The views read each case's own fitted value and residual, and the fit's coefficients.
    if let Ok(fit) = &mut parts.fit {
        fit.fitted = Vec::new();
        fit.residuals = Vec::new();
    }
    let views = views_of(
        input,
        &parts.included,
        &parts.cases,
        parts.fit.as_ref().ok(),
        parts.added,
    );
    let effects = exclusion_effects(&input.table, &input.spec.on_file_rows(&input.marks))
        .map_err(|e| e.to_string());
    Diagnostics {
        top: rankings(&parts.cases),
        checks,
        calibration,
        agreement,
        lab_views,
        spec: input.spec.clone(),
        marks: input.marks.clone(),
        deming: input.overlays.deming.then(|| {
            // The pair as it stands, copied only when the overlay is asked for.
            let (x, y): (Vec<f64>, Vec<f64>) =
                parts.included.iter().map(|&i| input.point(i)).unzip();
            deming(&x, &y, 1.0).map_err(|e| e.to_string())
        }),
        group_lines: group_lines(input, &parts.included),
        groups: parts.groups,
        boxcox: parts.boxcox,
        scale: parts.scale,
        kept: input.kept.as_ref().map(|k| kept_fit(input, k)),
        views,
        included: parts.included,
        fit: parts.fit,
        cases: CaseFigures::of(&parts.cases),
        extras: parts.extras,
        effects,
    }
}

/// The analysis taken apart for the diagnostics (empty parts when it failed).
struct Parts {
    fit: Result<LinearFit, String>,
    cases: Vec<CaseInfluence>,
    extras: Option<PairExtras>,
    included: Arc<[usize]>,
    groups: Option<GroupTests>,
    added: Vec<AddedVariable>,
    boxcox: Option<BoxCox>,
    scale: String,
}

impl Parts {
    fn of(input: &Input, analysis: Result<Analysis, AnalysisError>) -> Self {
        match analysis {
            Ok(a) => Self {
                included: a
                    .rows
                    .selection
                    .rows
                    .iter()
                    .filter_map(|&r| input.entry_of(r))
                    .collect(),
                scale: a.response_label(&input.spec.y),
                boxcox: a.rows.boxcox,
                fit: Ok(a.fit),
                cases: a.cases,
                extras: a.extras,
                groups: a.groups,
                added: a.added,
            },
            Err(e) => Self {
                fit: Err(e.to_string()),
                cases: Vec::new(),
                extras: None,
                included: Arc::from(Vec::new()),
                groups: None,
                added: Vec::new(),
                boxcox: None,
                scale: input.spec.y.clone(),
            },
        }
    }
}

/// The kept model beside the current one, on the same marks.
fn kept_fit(input: &Input, kept: &FitSpec) -> Kept {
    let names = ["the kept fit", "the current one"];
    let (a, b) = (
        kept.with_marks(&input.marks),
        input.spec.with_marks(&input.marks),
    );
    let comparison = compare(&input.table, &a, &b, names).map_err(|e| e.to_string());
    let wanted = Wanted {
        extras: Some(ExtrasRequest::default()),
        ..Wanted::default()
    };
    let curves = analyze(&input.table, &a, wanted)
        .ok()
        .and_then(|k| k.extras)
        .map(|e| e.curves)
        .unwrap_or_default();
    Kept {
        spec: kept.clone(),
        comparison,
        curves,
    }
}

/// The most influential cases by Cook's distance, leverage and |externally studentized residual|.
fn rankings(cases: &[CaseInfluence]) -> [Vec<usize>; 3] {
    [
        top_by(cases, |c| c.cooks_distance),
        top_by(cases, |c| c.leverage),
        top_by(cases, |c| c.studentized_external.abs()),
    ]
}

/// The `TOP_ROWS` largest `key`s, largest first (O(n) selection, then a small sort).
fn top_by(cases: &[CaseInfluence], key: impl Fn(&CaseInfluence) -> f64) -> Vec<usize> {
    let mut idx: Vec<usize> = (0..cases.len())
        .filter(|&k| key(&cases[k]).is_finite())
        .collect();
    let by = |a: &usize, b: &usize| key(&cases[*b]).total_cmp(&key(&cases[*a]));
    if idx.len() > TOP_ROWS {
        idx.select_nth_unstable_by(TOP_ROWS, by);
        idx.truncate(TOP_ROWS);
        // Kept with the diagnostics: without this the list would hold its n-row capacity.
        idx.shrink_to_fit();
    }
    idx.sort_by(by);
    idx
}

/// A line per group level, fitted through the analysis route with every other row left out.
fn group_lines(input: &Input, included: &[usize]) -> Vec<GroupLine> {
    let Some(groups) = &input.groups else {
        return Vec::new();
    };
    let levels = groups.iter().flatten().copied().max().map_or(0, |m| m + 1);
    let line = FitSpec::line(&input.spec.y, input.spec.x0());
    (0..levels)
        .filter_map(|level| {
            let mut request = line.with_marks(&input.marks);
            request.exclude.extend(
                (0..input.pair.rows.len())
                    .filter(|&i| groups[i] != Some(level))
                    .map(|i| input.pair.rows[i]),
            );
            let n = included
                .iter()
                .filter(|&&i| groups[i] == Some(level))
                .count();
            let f = analyze(&input.table, &request, Wanted::default()).ok()?.fit;
            Some(GroupLine {
                level,
                intercept: f.coefficients[0].estimate,
                slope: f.coefficients[1].estimate,
                r_squared: f.r_squared,
                n,
            })
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::state::marks::Note;

    #[test]
    fn a_ranking_keeps_its_top_rows_and_not_the_capacity_of_all() {
        let cases: Vec<CaseInfluence> = (0..500)
            .map(|k| CaseInfluence {
                cooks_distance: f64::from((k * 37) % 500),
                ..CaseInfluence::default()
            })
            .collect();
        let top = top_by(&cases, |c| c.cooks_distance);
        assert_eq!(top.len(), TOP_ROWS);
        assert!(top.capacity() <= TOP_ROWS, "capacity {}", top.capacity());
        let d: Vec<f64> = top.iter().map(|&k| cases[k].cooks_distance).collect();
        let best: Vec<f64> = (0..TOP_ROWS).map(|i| (499 - i) as f64).collect();
        assert_eq!(d, best, "largest first");
    }

    #[test]
    fn diagnostics_follow_the_marks_and_effects_use_the_file_values() {
        let dir = tempfile::tempdir().expect("dir");
        let path = dir.path().join("d.csv");
        let mut text = String::from("x,y,site\n");
        for i in 0..30 {
            let x = f64::from(i);
            let y = 1.0 + 2.0 * x + if i == 12 { 25.0 } else { f64::from(i % 3) };
            text.push_str(&format!(
                "{x},{y},{}\n",
                if i % 2 == 0 { "north" } else { "south" }
            ));
        }
        std::fs::write(&path, text).expect("write");
        let data = crate::state::dataset::Dataset::load(&path, &Default::default()).expect("load");
        let pair = Pair::new(&data.table, FitSpec::line("y", "x")).expect("pair");
        let mut marks = Marks::default();
        marks.excluded.insert(
            13,
            Note {
                reason: "spike".into(),
                at: String::new(),
            },
        );
        let groups: Arc<[Option<usize>]> = data.group_of_rows("site").expect("groups").into();
        let d = compute(&Input::of(
            &data.table,
            &pair,
            &marks,
            Overlays::default(),
            Some(groups),
        ));
        assert_eq!(d.included.len(), 29);
        assert!(!d.included.contains(&12), "entry 12 is data row 13");
        assert_eq!(d.cases.len(), 29);
        assert_eq!(d.views.quantile.points.len(), 29);
        assert!(d.views.quantile.points.windows(2).all(|w| w[0].1 <= w[1].1));
        let effects = d.effects.expect("effects");
        assert_eq!(
            effects.len(),
            1,
            "one exclusion (no separate all-together entry)"
        );
        assert_eq!(effects[0].rows, vec![13]);
        assert!(effects[0].after.r_squared > effects[0].before.r_squared);
        assert_eq!(d.group_lines.len(), 2);
        assert_eq!(d.group_lines.iter().map(|g| g.n).sum::<usize>(), 29);
        let fit = d.fit.expect("fit");
        for (k, &i) in d.included.iter().enumerate() {
            let (yhat, _) = against_fit(&pair, &marks, &fit, i).expect("in the domain");
            let e = d.cases.get(k).expect("a case").residual;
            assert!((yhat + e - pair.point(i, &marks).1).abs() < 1e-9 * yhat.abs().max(1.0));
        }
        // Row 13 sits 25 above a line the others follow within 2: too far out to draw, so it
        // is named under the view instead.
        assert!(d.views.excluded_residuals.entries.is_empty());
        assert_eq!(d.views.beyond.iter().map(|b| b.0).collect::<Vec<_>>(), [12]);
        let cook_max = d.cases.iter().map(|c| c.cooks_distance).fold(0.0, f64::max);
        let case = |k: usize| d.cases.get(k).expect("a case");
        assert_eq!(case(d.top[0][0]).cooks_distance, cook_max);
        assert!(d.top[1]
            .windows(2)
            .all(|w| case(w[0]).leverage >= case(w[1]).leverage));
        assert_eq!(d.top[2].len(), 29);
        let live = Pair::new(&data.table, FitSpec::line("y", "x"))
            .expect("pair")
            .apply(&marks)
            .clone()
            .expect("live");
        assert!((fit.r_squared - live.r_squared).abs() < 1e-12);
    }

    #[test]
    fn a_what_if_move_reaches_the_diagnostics_through_the_analysis_route() {
        let dir = tempfile::tempdir().expect("dir");
        let path = dir.path().join("d.csv");
        let text: String = std::iter::once("x,y\n".to_string())
            .chain(
                (0..20).map(|i| format!("{i},{}\n", 3.0 + 0.5 * f64::from(i) + f64::from(i % 4))),
            )
            .collect();
        std::fs::write(&path, text).expect("write");
        let data = crate::state::dataset::Dataset::load(&path, &Default::default()).expect("load");
        let mut pair = Pair::new(&data.table, FitSpec::line("y", "x")).expect("pair");
        let mut marks = Marks::default();
        marks.moved.insert(7, (6.0, 40.0));
        let live = pair.apply(&marks).clone().expect("live");
        let d = compute(&Input::of(
            &data.table,
            &pair,
            &marks,
            Overlays::default(),
            None,
        ));
        let fit = d.fit.expect("fit");
        assert!((fit.r_squared - live.r_squared).abs() < 1e-12);
        assert_eq!(fit.n, 20);
        let k = d
            .included
            .iter()
            .position(|&i| pair.rows[i] == 7)
            .expect("row 7");
        let (yhat, _) = against_fit(&pair, &marks, &fit, d.included[k]).expect("in the domain");
        assert!(
            (yhat + d.cases.get(k).expect("a case").residual - 40.0).abs() < 1e-9,
            "y is the moved value"
        );
    }
}
