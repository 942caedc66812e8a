//! The points of the diagnostic views, built once per diagnostics job: residuals against the
//! axis the analyst chose, leverage, quantiles, the added-variable views, and where the
//! excluded rows fall against the current fit.

use plumb_core::regression::{normal_scores, AddedVariable, CaseInfluence, LinearFit};

use super::cloud::Cloud;
use super::diagnostics::Input;
use super::marks::Marks;
use super::pair::PairRows;

/// What the residuals are drawn against.
#[derive(Debug, Clone, PartialEq, Eq, Default)]
pub enum ResidualAxis {
    /// The fitted values (a curve or a funnel: the model misses structure).
    #[default]
    Fitted,
    /// A numeric column: a predictor (a bend the model misses) or a time or sequence column
    /// (a drifting instrument).
    Column(String),
    /// The data row number: the order the rows were recorded in.
    RowOrder,
}

impl ResidualAxis {
    /// The axis label.
    pub fn label(&self) -> String {
        match self {
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
    /// (leverage, internally studentized residual).
    pub leverage: Cloud,
    /// (expected normal score `Φ⁻¹((k − 3/8)/(n + 1/4))`, sorted externally studentized
    /// residual).
    pub quantile: Cloud,
    /// Excluded rows as (the residual axis, y − prediction of the current fit), those near
    /// the included rows' extent.
    pub excluded_residuals: Cloud,
    /// Excluded rows far beyond the included rows' extent (a gross error left out would
    /// squash the included residuals into a strip): `(entry, residual)`, named under the view.
    pub beyond: Vec<(usize, f64)>,
    /// The added-variable view of each predictor term (several predictors).
    pub added: Vec<AddedView>,
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
    included: &[usize],
    cases: &[CaseInfluence],
    f: Option<&LinearFit>,
    added: Vec<AddedVariable>,
) -> Views {
    if cases.len() != included.len() {
        return Views::default();
    }
    let cloud = |pick: fn(&CaseInfluence) -> (f64, f64)| {
        Cloud::new(cases.iter().map(pick).collect(), included.to_vec())
    };
    let axis = input.residual_axis.clone();
    let along = Along::new(input);
    let residual = finite_cloud(
        included
            .iter()
            .zip(cases)
            .map(|(&i, c)| (i, (along.at(i, c.fitted), c.residual))),
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
    Views {
        residual,
        residual_axis: axis,
        leverage: cloud(|c| (c.leverage, c.studentized_external)),
        quantile: quantile_cloud(cases, included),
        excluded_residuals,
        beyond: beyond.into_iter().map(|(i, (_, e))| (i, e)).collect(),
        added: added
            .into_iter()
            .map(|av| AddedView {
                cloud: Cloud::new(av.x.into_iter().zip(av.y).collect(), included.to_vec()),
                term: av.term,
                slope: av.slope,
            })
            .collect(),
    }
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
    DataRow(&'a PairRows, &'a [Option<f64>]),
}

impl<'a> Along<'a> {
    fn new(input: &'a Input) -> Self {
        let ResidualAxis::Column(name) = &input.residual_axis else {
            return match input.residual_axis {
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
            Self::DataRow(p, v) => v.get(p.rows[i] - 1).copied().flatten().unwrap_or(f64::NAN),
        }
    }
}

/// Sorted externally studentized residuals against normal scores `Φ⁻¹((k − 3/8)/(n + 1/4))`.
fn quantile_cloud(cases: &[CaseInfluence], included: &[usize]) -> Cloud {
    let mut order: Vec<usize> = (0..cases.len())
        .filter(|&k| cases[k].studentized_external.is_finite())
        .collect();
    order.sort_by(|&a, &b| {
        cases[a]
            .studentized_external
            .total_cmp(&cases[b].studentized_external)
    });
    let points = normal_scores(order.len())
        .into_iter()
        .zip(&order)
        .map(|(expected, &k)| (expected, cases[k].studentized_external))
        .collect();
    Cloud::new(points, order.iter().map(|&k| included[k]).collect())
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::density::Bounds;

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
