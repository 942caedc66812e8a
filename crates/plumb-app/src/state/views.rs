//! The points of the diagnostic views, built once per diagnostics job: residuals against the
//! axis the analyst chose, leverage, quantiles, the added-variable views, and where the
//! excluded rows fall against the current fit.

use std::sync::Arc;

use rayon::prelude::*;

use plumb_core::regression::{
    normal_scores, pull_of, strong_pull_from, AddedVariable, CaseInfluence, LinearFit,
    Pull as PullClass,
};

use super::cloud::Cloud;
use super::diagnostics::Input;
use super::marks::Marks;
use super::pair::{FitSpec, PairRows};

/// What the residuals are drawn against.
#[derive(Debug, Clone, PartialEq, Eq, Default)]
pub enum ResidualAxis {
    /// The model's first predictor when it has only one (the residual strip then shares the
    /// scatter's x axis, drawn under it), else the fitted values.
    #[default]
    Predictor,
    /// The fitted values (a curve or a funnel: the model misses structure).
    Fitted,
    /// A numeric column: a predictor (a bend the model misses) or a time or sequence column
    /// (a drifting instrument).
    Column(String),
    /// The data row number: the order the rows were recorded in.
    RowOrder,
}

impl ResidualAxis {
    /// What the axis is under `spec`: [`Self::Predictor`] resolved to the predictor's column
    /// (one predictor) or the fitted values (several); the others as they are.
    pub fn resolved(&self, spec: &FitSpec) -> Self {
        match self {
            Self::Predictor if spec.x.len() == 1 => Self::Column(spec.x0().to_string()),
            Self::Predictor => Self::Fitted,
            other => other.clone(),
        }
    }

    /// Whether the axis is the scatter's own x axis under `spec` (one predictor, drawn
    /// against it): the two views then share their horizontal range.
    pub fn is_scatter_x(&self, spec: &FitSpec) -> bool {
        spec.x.len() == 1 && self.resolved(spec) == Self::Column(spec.x0().to_string())
    }

    /// The axis label.
    pub fn label(&self) -> String {
        match self {
            Self::Predictor => "the predictor".into(),
            Self::Fitted => "fitted value".into(),
            Self::Column(c) => c.clone(),
            Self::RowOrder => "data row".into(),
        }
    }
}

/// Points of the three diagnostic views (included rows), and where the excluded rows fall
/// against the current fit.
#[derive(Debug, Clone, Default)]
pub struct Views {
    /// (the residual axis, residual).
    pub residual: Cloud,
    /// What `residual`'s horizontal axis is.
    pub residual_axis: ResidualAxis,
    /// (leverage, externally studentized residual).
    pub leverage: Cloud,
    /// How strongly each row of `leverage` pulls the fit, by its Cook's distance.
    pub pull: Pull,
    /// (expected normal score `Φ⁻¹((k − 3/8)/(n + 1/4))`, sorted externally studentized
    /// residual).
    pub quantile: Cloud,
    /// The 95 % band of normal order statistics along the quantile view, as (score, low, high)
    /// at up to [`BAND_POINTS`] ranks: residuals outside it stray further than a normal
    /// sample of that size would at that rank.
    pub quantile_band: Vec<[f64; 3]>,
    /// Excluded rows as (the residual axis, y − prediction of the current fit), those near
    /// the included rows' extent.
    pub excluded_residuals: Cloud,
    /// Excluded rows far beyond the included rows' extent (a gross error left out would
    /// squash the included residuals into a strip): `(entry, residual)`, named under the view.
    pub beyond: Vec<(usize, f64)>,
    /// The added-variable view of each predictor term (several predictors).
    pub added: Vec<AddedView>,
}

/// How strongly the rows pull the fit, by Cook's distance `D`, in the three classes of
/// [`plumb_core::regression::Pull`].
#[derive(Debug, Clone, Default)]
pub struct Pull {
    /// Class of each point of the leverage view.
    pub class: Vec<PullClass>,
    /// The strong class's threshold, `F₀.₅(p, n − p)`.
    pub strong_from: f64,
    /// The flagged and strong rows as (entry, (leverage, studentized), class, D), largest `D`
    /// first, at most [`PULL_SHOWN`]: drawn as sized markers even over a density image.
    pub notable: Vec<(usize, (f64, f64), PullClass, f64)>,
}

/// Most rows drawn as sized markers in the influence view.
pub const PULL_SHOWN: usize = 500;

impl Pull {
    /// The classes of `cases` (pair entries `included`, `p` terms).
    pub fn of(cases: &[CaseInfluence], included: &[usize], p: usize) -> Self {
        let strong_from = strong_pull_from(cases.len(), p);
        let class: Vec<PullClass> = cases.iter().map(|c| pull_of(c, strong_from)).collect();
        let mut notable: Vec<(usize, (f64, f64), PullClass, f64)> = cases
            .iter()
            .zip(included)
            .zip(&class)
            .filter(|(_, &k)| k > PullClass::Ordinary)
            .map(|((c, &e), &k)| (e, (c.leverage, c.studentized_external), k, c.cooks_distance))
            .filter(|(_, (h, t), _, _)| h.is_finite() && t.is_finite())
            .collect();
        notable.sort_by(|a, b| b.3.total_cmp(&a.3));
        notable.truncate(PULL_SHOWN);
        Self {
            class,
            strong_from,
            notable,
        }
    }
}

/// One predictor's added-variable view: y and the term each residualized on the other terms;
/// the slope of the cloud is the term's coefficient (Frisch–Waugh–Lovell).
#[derive(Debug, Clone)]
pub struct AddedView {
    /// The term.
    pub term: String,
    /// The slope through the cloud (the coefficient).
    pub slope: f64,
    /// (e_x, e_y) of the included rows.
    pub cloud: Cloud,
}

/// Entry `i` at its current position against `f`: `(ŷ, y − ŷ)` on the model's scale (`None`
/// where a transform cannot take its values).
pub fn against_fit(pair: &PairRows, marks: &Marks, f: &LinearFit, i: usize) -> Option<(f64, f64)> {
    let (x, y) = pair.point(i, marks);
    let (row, y_t) = pair.model_row(i, x, y)?;
    let yhat: f64 = row
        .iter()
        .zip(&f.coefficients)
        .map(|(a, c)| a * c.estimate)
        .sum();
    Some((yhat, y_t - yhat))
}

/// The views of the included entries `included` (with their `cases`) under the fit `f`.
pub fn views_of(
    input: &Input,
    included: &Arc<[usize]>,
    cases: &[CaseInfluence],
    f: Option<&LinearFit>,
    added: Vec<AddedVariable>,
) -> Views {
    if cases.len() != included.len() {
        return Views::default();
    }
    let cloud = |pick: fn(&CaseInfluence) -> (f64, f64)| {
        Cloud::new(cases.iter().map(pick).collect(), Arc::clone(included))
    };
    let axis = input.residual_axis.resolved(&input.spec);
    let along = Along::new(input);
    // The four views of every case are independent: built side by side.
    let ((residual, leverage), (pull, quantile)) = rayon::join(
        || {
            rayon::join(
                || {
                    let points: Vec<(f64, f64)> = included
                        .iter()
                        .zip(cases)
                        .map(|(&i, c)| (along.at(i, c.fitted), c.residual))
                        .collect();
                    if points.iter().all(|(x, y)| x.is_finite() && y.is_finite()) {
                        // Every row drawn: the entries are the included rows themselves.
                        Cloud::new(points, Arc::clone(included))
                    } else {
                        finite_cloud(included.iter().copied().zip(points))
                    }
                },
                || cloud(|c| (c.leverage, c.studentized_external)),
            )
        },
        || {
            rayon::join(
                || Pull::of(cases, included, f.map_or(0, |f| f.coefficients.len())),
                || quantile_cloud(cases, included),
            )
        },
    );
    let rings: Vec<Placed> = f.map_or_else(Vec::new, |f| {
        input
            .marks
            .excluded
            .keys()
            .filter_map(|&r| {
                let i = input.pair.index_of(r)?;
                let (yhat, e) = against_fit(&input.pair, &input.marks, f, i)?;
                Some((i, (along.at(i, yhat), e)))
            })
            .collect()
    });
    let (near, beyond) = split_far(residual.bounds, rings);
    let excluded_residuals = finite_cloud(near.into_iter());
    let mut views = Views {
        residual,
        residual_axis: axis,
        leverage,
        pull,
        quantile_band: Vec::new(),
        quantile,
        excluded_residuals,
        beyond: beyond.into_iter().map(|(i, (_, e))| (i, e)).collect(),
        added: added
            .into_iter()
            .map(|av| AddedView {
                cloud: Cloud::new(av.x.into_iter().zip(av.y).collect(), Arc::clone(included)),
                term: av.term,
                slope: av.slope,
            })
            .collect(),
    };
    views.quantile_band = order_band(&views.quantile);
    views
}

/// Ranks at which the quantile view's band is computed.
pub const BAND_POINTS: usize = 120;

/// The pointwise 95 % band of normal order statistics at up to [`BAND_POINTS`] ranks, placed
/// at the quantile view's scores.
pub fn order_band(quantile: &Cloud) -> Vec<[f64; 3]> {
    let points = &quantile.points;
    plumb_core::distributions::normal_order_bands(
        points.len(),
        |i| points[i - 1].0,
        BAND_POINTS,
        0.05,
    )
}

/// A pair entry and where it sits in a view.
pub type Placed = (usize, (f64, f64));

/// How far past the included rows' extent (in shares of its span, each way) an excluded row
/// is still drawn in the residual view.
pub const RING_REACH: f64 = 0.5;

/// Splits excluded rows into those within [`RING_REACH`] of `bounds` (drawn) and those
/// beyond (named instead); everything is near when there are no bounds.
pub fn split_far(
    bounds: Option<crate::density::Bounds>,
    rings: Vec<Placed>,
) -> (Vec<Placed>, Vec<Placed>) {
    let Some(b) = bounds else {
        return (rings, Vec::new());
    };
    let reach = |v: f64, lo: f64, hi: f64| {
        let pad = (hi - lo).max(f64::MIN_POSITIVE) * RING_REACH;
        v >= lo - pad && v <= hi + pad
    };
    rings
        .into_iter()
        .partition(|(_, (x, y))| reach(*x, b.x_min, b.x_max) && reach(*y, b.y_min, b.y_max))
}

/// A cloud of the finite points only (a missing cell in an order column leaves its row out).
fn finite_cloud(placed: impl Iterator<Item = Placed>) -> Cloud {
    let (entries, points): (Vec<usize>, Vec<(f64, f64)>) = placed
        .filter(|(_, (x, y))| x.is_finite() && y.is_finite())
        .unzip();
    Cloud::new(points, entries)
}

/// Where an entry sits on the residual axis.
enum Along<'a> {
    Fitted,
    RowOrder(&'a PairRows),
    /// The first predictor, at its current (possibly moved) position.
    Moved(&'a Input),
    /// Values per pair entry (another predictor of the model).
    Entry(&'a [f64]),
    /// Values per data row (a column outside the model).
    DataRow(&'a PairRows, &'a plumb_data::Numbers),
}

impl<'a> Along<'a> {
    fn new(input: &'a Input) -> Self {
        let axis = input.residual_axis.resolved(&input.spec);
        let ResidualAxis::Column(name) = &axis else {
            return match axis {
                ResidualAxis::RowOrder => Self::RowOrder(&input.pair),
                _ => Self::Fitted,
            };
        };
        let spec = &input.spec;
        match spec.x.iter().position(|x| x == name) {
            Some(0) => Self::Moved(input),
            Some(k) => Self::Entry(&input.pair.model.selection.columns[k + 1]),
            None => input
                .table
                .numeric(name)
                .map_or(Self::Fitted, |v| Self::DataRow(&input.pair, v)),
        }
    }

    fn at(&self, i: usize, fitted: f64) -> f64 {
        match self {
            Self::Fitted => fitted,
            Self::RowOrder(p) => p.rows[i] as f64,
            Self::Moved(input) => input.pair.point(i, &input.marks).0,
            Self::Entry(v) => v[i],
            Self::DataRow(p, v) => v.get(p.rows[i] - 1).unwrap_or(f64::NAN),
        }
    }
}

/// Sorted externally studentized residuals against normal scores `Φ⁻¹((k − 3/8)/(n + 1/4))`.
fn quantile_cloud(cases: &[CaseInfluence], included: &[usize]) -> Cloud {
    // (residual, position) pairs sorted side by side on all cores, ties in row order: the keys
    // are read in place rather than through the positions.
    let mut keyed: Vec<(f64, usize)> = cases
        .iter()
        .enumerate()
        .filter(|(_, c)| c.studentized_external.is_finite())
        .map(|(k, c)| (c.studentized_external, k))
        .collect();
    keyed.par_sort_unstable_by(|a, b| a.0.total_cmp(&b.0).then(a.1.cmp(&b.1)));
    let points = normal_scores(keyed.len())
        .into_iter()
        .zip(&keyed)
        .map(|(expected, &(t, _))| (expected, t))
        .collect();
    // The view's positions in entry order without a second sort: the entries ascend with the
    // case index, so inverting the rank order lists them.
    let mut rank_of = vec![usize::MAX; cases.len()];
    for (position, &(_, k)) in keyed.iter().enumerate() {
        rank_of[k] = position;
    }
    let by_entry = rank_of.into_iter().filter(|&r| r != usize::MAX).collect();
    Cloud::ordered(
        points,
        keyed
            .iter()
            .map(|&(_, k)| included[k])
            .collect::<Arc<[usize]>>(),
        by_entry,
    )
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::density::Bounds;

    use plumb_core::regression::{Flags, InfluenceFlag};

    fn case(d: f64, flagged: bool) -> CaseInfluence {
        let flags: &[InfluenceFlag] = if flagged {
            &[InfluenceFlag::LargeCooksDistance]
        } else {
            &[]
        };
        CaseInfluence {
            leverage: 0.1,
            studentized_external: 1.0,
            cooks_distance: d,
            flags: Flags::of(flags),
            ..CaseInfluence::default()
        }
    }

    #[test]
    fn the_quantile_view_finds_each_point_by_its_entry_as_a_sorted_lookup_would() {
        // Residuals out of order, a tie and an undefined one; the entries ascend.
        let t = [0.4, -1.2, f64::NAN, 2.5, -1.2, 0.0, 1.1];
        let cases: Vec<CaseInfluence> = t
            .iter()
            .map(|&v| CaseInfluence {
                studentized_external: v,
                ..CaseInfluence::default()
            })
            .collect();
        let included: Vec<usize> = (0..t.len()).map(|i| 3 * i + 1).collect();
        let cloud = quantile_cloud(&cases, &included);
        let sorted: Vec<f64> = cloud.points.iter().map(|p| p.1).collect();
        assert_eq!(sorted, [-1.2, -1.2, 0.0, 0.4, 1.1, 2.5]);
        assert_eq!(cloud.entries[..2], [4, 13], "ties in row order");
        let reference = Cloud::new(cloud.points.clone(), cloud.entries.to_vec());
        for (k, &e) in included.iter().enumerate() {
            assert_eq!(cloud.position_of(e), reference.position_of(e), "entry {e}");
            assert_eq!(cloud.position_of(e).is_some(), !t[k].is_nan());
        }
    }

    #[test]
    fn rows_are_classed_by_the_flag_rule_and_the_f_median() {
        // p = 2, n = 12: F(2, 10) has median 0.7435 (scipy.stats.f.median(2, 10)).
        let mut cases: Vec<CaseInfluence> = (0..12).map(|_| case(0.01, false)).collect();
        cases[3] = case(0.3, true);
        cases[7] = case(0.75, true);
        cases[9] = case(0.74, false);
        let included: Vec<usize> = (0..12).map(|i| i * 2).collect();
        let pull = Pull::of(&cases, &included, 2);
        assert!((pull.strong_from - 0.743_491_774_985_175_2).abs() < 1e-9);
        assert_eq!(pull.class[3], PullClass::Flagged);
        assert_eq!(pull.class[7], PullClass::Strong);
        assert_eq!(
            pull.class[9],
            PullClass::Ordinary,
            "below the median, not flagged"
        );
        assert_eq!(
            pull.notable.iter().map(|n| (n.0, n.2)).collect::<Vec<_>>(),
            [(14, PullClass::Strong), (6, PullClass::Flagged)],
            "largest D first, by pair entry"
        );
        let two = Pull::of(&cases[..2], &included[..2], 2);
        assert!(two.class.iter().all(|&k| k < PullClass::Strong));
    }

    #[test]
    fn a_gross_error_left_out_is_named_instead_of_squashing_the_view() {
        let b = Bounds {
            x_min: 0.0,
            x_max: 10.0,
            y_min: -1.0,
            y_max: 1.0,
        };
        let rings = vec![
            (3, (5.0, 1.8)),
            (7, (5.0, 50.0)),
            (9, (-4.9, 0.0)),
            (11, (-5.1, 0.0)),
        ];
        let (near, far) = split_far(Some(b), rings.clone());
        assert_eq!(near.iter().map(|r| r.0).collect::<Vec<_>>(), [3, 9]);
        assert_eq!(far.iter().map(|r| r.0).collect::<Vec<_>>(), [7, 11]);
        let (near, far) = split_far(None, rings);
        assert_eq!((near.len(), far.len()), (4, 0));
    }
}
