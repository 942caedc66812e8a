//! Everything about a pair that costs more than a live update: the diagnostics of every row,
//! bands, overlays, cues and the per-exclusion effects. Computed off the UI thread after each
//! change, from the same core functions the command line uses; a newer change supersedes an
//! older computation.

use std::sync::Arc;

use plumb_core::alternative::{deming, DemingFit};
use plumb_core::regression::{
    fit, influence, normal_scores, CaseInfluence, Design, FitOptions, LinearFit,
};
use plumb_data::analysis::{pair_extras, ExtrasRequest, FitOutcome, PairExtras, Robust};
use plumb_data::Selection;
use plumb_data::Table;
use plumb_report::{exclusion_effects, Effect};

use crate::cloud::Cloud;
use crate::marks::Marks;
use crate::pair::{Pair, PairSpec};

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
    /// The table (for the per-exclusion effects, which refit on the file's values).
    pub table: Arc<Table>,
    /// The model.
    pub spec: PairSpec,
    /// The pair's rows and values.
    pub rows: Arc<[usize]>,
    /// Predictor values in the file.
    pub x: Arc<[f64]>,
    /// Response values in the file.
    pub y: Arc<[f64]>,
    /// The analyst's marks.
    pub marks: Marks,
    /// Overlays asked for.
    pub overlays: Overlays,
    /// Group level of each pair entry, for per-group lines.
    pub groups: Option<Arc<[Option<usize>]>>,
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
            rows: Arc::clone(&pair.rows),
            x: Arc::clone(&pair.x),
            y: Arc::clone(&pair.y),
            marks: marks.clone(),
            overlays,
            groups,
        }
    }
}

/// One point of the normal quantile view.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct QuantilePoint {
    /// Expected normal score.
    pub expected: f64,
    /// Externally studentized residual (sorted).
    pub observed: f64,
    /// Pair entry it belongs to.
    pub entry: usize,
}

/// The results of one diagnostics job.
#[derive(Debug, Clone)]
pub struct Diagnostics {
    /// The marks these results are for.
    pub marks: Marks,
    /// Pair entries included, ascending; `cases[k]` belongs to `included[k]`.
    pub included: Vec<usize>,
    /// The QR fit of the included rows at their current (possibly moved) positions.
    pub fit: Result<LinearFit, String>,
    /// Case diagnostics of the included rows.
    pub cases: Vec<CaseInfluence>,
    /// Normal quantile view, sorted by expected score.
    pub quantiles: Vec<QuantilePoint>,
    /// Bands, overlays, cues and the z-units view.
    pub extras: Option<PairExtras>,
    /// Deming line, when asked for.
    pub deming: Option<Result<DemingFit, String>>,
    /// Before/after of each exclusion and of all together (on the file's values).
    pub effects: Result<Vec<Effect>, String>,
    /// Straight line per group level: level, intercept, slope, R², n.
    pub group_lines: Vec<GroupLine>,
    /// Points of the residual, leverage and quantile views.
    pub views: Views,
    /// Positions in `cases` of the most influential rows, largest first, by Cook's distance,
    /// by leverage and by |externally studentized residual| (at most [`TOP_ROWS`] each).
    pub top: [Vec<usize>; 3],
}

/// Rows kept in each influence ranking.
pub const TOP_ROWS: usize = 50;

/// The `TOP_ROWS` largest `key`s, largest first (O(n) selection, then a small sort).
fn top_by(cases: &[CaseInfluence], key: impl Fn(&CaseInfluence) -> f64) -> Vec<usize> {
    let mut idx: Vec<usize> = (0..cases.len())
        .filter(|&k| key(&cases[k]).is_finite())
        .collect();
    let by = |a: &usize, b: &usize| key(&cases[*b]).total_cmp(&key(&cases[*a]));
    if idx.len() > TOP_ROWS {
        idx.select_nth_unstable_by(TOP_ROWS, by);
        idx.truncate(TOP_ROWS);
    }
    idx.sort_by(by);
    idx
}

/// Points of the three diagnostic views (included rows), and where the excluded rows fall
/// against the current fit.
#[derive(Debug, Clone, Default)]
pub struct Views {
    /// (fitted, residual).
    pub residual: Cloud,
    /// (leverage, internally studentized residual).
    pub leverage: Cloud,
    /// (expected normal score, externally studentized residual).
    pub quantile: Cloud,
    /// Excluded rows as (prediction of the current fit, y − prediction).
    pub excluded_residuals: Cloud,
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
    let included: Vec<usize> = (0..input.rows.len())
        .filter(|&i| !input.marks.excluded.contains_key(&input.rows[i]))
        .collect();
    let point = |i: usize| {
        input
            .marks
            .moved
            .get(&input.rows[i])
            .copied()
            .unwrap_or((input.x[i], input.y[i]))
    };
    let (x, y): (Vec<f64>, Vec<f64>) = included.iter().map(|&i| point(i)).unzip();
    let options = FitOptions {
        level: input.spec.level,
        ..FitOptions::default()
    };
    let fitted = input
        .spec
        .design(&x)
        .and_then(|d| fit(&d, &y, None, &options).map(|f| (d, f)));
    let (fit_result, cases, extras) = match fitted {
        Ok((design, f)) => {
            let cases = influence(&design, None, &f, &options).unwrap_or_default();
            let extras = extras_of(input, &included, &x, &y, &f);
            (Ok(f), cases, extras)
        }
        Err(e) => (Err(e.to_string()), Vec::new(), None),
    };
    let quantiles = quantiles_of(&cases, &included);
    let views = views_of(
        input,
        &included,
        &cases,
        &quantiles,
        fit_result.as_ref().ok(),
    );
    let excluded: Vec<usize> = input.marks.excluded.keys().copied().collect();
    let effects =
        exclusion_effects(&input.table, &input.spec.request(excluded)).map_err(|e| e.to_string());
    let top = [
        top_by(&cases, |c| c.cooks_distance),
        top_by(&cases, |c| c.leverage),
        top_by(&cases, |c| c.studentized_external.abs()),
    ];
    Diagnostics {
        top,
        marks: input.marks.clone(),
        deming: input
            .overlays
            .deming
            .then(|| deming(&x, &y, 1.0).map_err(|e| e.to_string())),
        group_lines: group_lines(input, &included, &x, &y),
        views,
        included,
        fit: fit_result,
        cases,
        quantiles,
        extras,
        effects,
    }
}

fn extras_of(
    input: &Input,
    included: &[usize],
    x: &[f64],
    y: &[f64],
    f: &LinearFit,
) -> Option<PairExtras> {
    let outcome = FitOutcome {
        selection: Selection {
            rows: included.iter().map(|&i| input.rows[i]).collect(),
            columns: vec![y.to_vec(), x.to_vec()],
            dropped: Vec::new(),
            excluded: Vec::new(),
        },
        fit: f.clone(),
        vif: None,
    };
    let request = input.spec.request(Vec::new());
    pair_extras(
        &outcome,
        &request,
        ExtrasRequest {
            robust: input.overlays.theil_sen.then_some(Robust::TheilSen),
            loess_span: input.overlays.loess.then_some(input.overlays.loess_span),
            at: None,
        },
    )
}

/// `ŷ(x) = Σⱼ βⱼ·x^{kⱼ}` for the pair's polynomial terms (`k = 0` for the intercept).
pub fn predict(spec: &PairSpec, f: &LinearFit, x: f64) -> f64 {
    let first_power = i32::from(!spec.intercept);
    f.coefficients
        .iter()
        .enumerate()
        .map(|(j, c)| c.estimate * x.powi(j as i32 + first_power))
        .sum()
}

fn views_of(
    input: &Input,
    included: &[usize],
    cases: &[CaseInfluence],
    quantiles: &[QuantilePoint],
    f: Option<&LinearFit>,
) -> Views {
    if cases.len() != included.len() {
        return Views::default();
    }
    let residual = Cloud::new(
        cases.iter().map(|c| (c.fitted, c.residual)).collect(),
        included.to_vec(),
    );
    let leverage = Cloud::new(
        cases
            .iter()
            .map(|c| (c.leverage, c.studentized_internal))
            .collect(),
        included.to_vec(),
    );
    let quantile = Cloud::new(
        quantiles.iter().map(|q| (q.expected, q.observed)).collect(),
        quantiles.iter().map(|q| q.entry).collect(),
    );
    let excluded: Vec<usize> = (0..input.rows.len())
        .filter(|&i| input.marks.excluded.contains_key(&input.rows[i]))
        .collect();
    let excluded_residuals = match f {
        Some(f) => Cloud::new(
            excluded
                .iter()
                .map(|&i| {
                    let (x, y) = input
                        .marks
                        .moved
                        .get(&input.rows[i])
                        .copied()
                        .unwrap_or((input.x[i], input.y[i]));
                    let yhat = predict(&input.spec, f, x);
                    (yhat, y - yhat)
                })
                .collect(),
            excluded,
        ),
        None => Cloud::default(),
    };
    Views {
        residual,
        leverage,
        quantile,
        excluded_residuals,
    }
}

/// Sorted externally studentized residuals against normal scores `Φ⁻¹((k − 3/8)/(n + 1/4))`.
fn quantiles_of(cases: &[CaseInfluence], included: &[usize]) -> Vec<QuantilePoint> {
    let mut order: Vec<usize> = (0..cases.len())
        .filter(|&k| cases[k].studentized_external.is_finite())
        .collect();
    order.sort_by(|&a, &b| {
        cases[a]
            .studentized_external
            .total_cmp(&cases[b].studentized_external)
    });
    normal_scores(order.len())
        .into_iter()
        .zip(order)
        .map(|(expected, k)| QuantilePoint {
            expected,
            observed: cases[k].studentized_external,
            entry: included[k],
        })
        .collect()
}

fn group_lines(input: &Input, included: &[usize], x: &[f64], y: &[f64]) -> Vec<GroupLine> {
    let Some(groups) = &input.groups else {
        return Vec::new();
    };
    let levels = groups.iter().flatten().copied().max().map_or(0, |m| m + 1);
    (0..levels)
        .filter_map(|level| {
            let (gx, gy): (Vec<f64>, Vec<f64>) = included
                .iter()
                .zip(x.iter().zip(y))
                .filter(|(&i, _)| groups[i] == Some(level))
                .map(|(_, (&a, &b))| (a, b))
                .unzip();
            let design = Design::linear(&[("x", &gx)], true);
            let f = fit(&design, &gy, None, &FitOptions::default()).ok()?;
            Some(GroupLine {
                level,
                intercept: f.coefficients[0].estimate,
                slope: f.coefficients[1].estimate,
                r_squared: f.r_squared,
                n: gx.len(),
            })
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::marks::Note;

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
        let data = crate::dataset::Dataset::load(&path, &Default::default()).expect("load");
        let pair = Pair::new(&data.table, PairSpec::line("y", "x")).expect("pair");
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
        assert_eq!(d.quantiles.len(), 29);
        assert!(d
            .quantiles
            .windows(2)
            .all(|w| w[0].observed <= w[1].observed));
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
            let yhat = predict(&pair.spec, &fit, pair.x[i]);
            assert!((yhat - fit.fitted[k]).abs() < 1e-9 * yhat.abs().max(1.0));
        }
        assert_eq!(d.views.excluded_residuals.entries, vec![12]);
        let cook_max = d.cases.iter().map(|c| c.cooks_distance).fold(0.0, f64::max);
        assert_eq!(d.cases[d.top[0][0]].cooks_distance, cook_max);
        assert!(d.top[1]
            .windows(2)
            .all(|w| d.cases[w[0]].leverage >= d.cases[w[1]].leverage));
        assert_eq!(d.top[2].len(), 29);
        let live = Pair::new(&data.table, PairSpec::line("y", "x"))
            .expect("pair")
            .apply(&marks)
            .clone()
            .expect("live");
        assert!((fit.r_squared - live.r_squared).abs() < 1e-12);
    }
}
