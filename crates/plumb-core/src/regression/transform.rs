//! Transforms of a variable before it enters a model, and their inverses (to draw a fitted
//! curve back in the original units).
//!
//! * natural log `ln v` and `log₁₀ v` (v > 0);
//! * square root `√v` (v ≥ 0);
//! * reciprocal `1/v` (v ≠ 0);
//! * Box–Cox `(v^λ − 1)/λ`, or `ln v` at λ = 0 (v > 0).

/// A transform of one variable.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Transform {
    /// The values as they are.
    Identity,
    /// `ln v`.
    Ln,
    /// `log₁₀ v`.
    Log10,
    /// `√v`.
    Sqrt,
    /// `1/v`.
    Reciprocal,
    /// `(v^λ − 1)/λ`, `ln v` at λ = 0.
    BoxCox(f64),
}

/// |λ| below this counts as λ = 0 in the Box–Cox transform (where `(v^λ − 1)/λ` → `ln v`).
const BOX_COX_ZERO: f64 = 1e-12;

impl Transform {
    /// Whether this is the identity.
    pub fn is_identity(self) -> bool {
        self == Self::Identity
    }

    /// The transformed value, or `None` outside the transform's domain.
    pub fn apply(self, v: f64) -> Option<f64> {
        let t = match self {
            Self::Identity => v,
            Self::Ln if v > 0.0 => v.ln(),
            Self::Log10 if v > 0.0 => v.log10(),
            Self::Sqrt if v >= 0.0 => v.sqrt(),
            Self::Reciprocal if v != 0.0 => 1.0 / v,
            Self::BoxCox(l) if v > 0.0 => {
                if l.abs() < BOX_COX_ZERO {
                    v.ln()
                } else {
                    (v.powf(l) - 1.0) / l
                }
            }
            _ => return None,
        };
        t.is_finite().then_some(t)
    }

    /// The original value of transformed value `t`, or `None` where no value maps there
    /// (a negative square root, a Box–Cox value beyond the transform's range).
    pub fn inverse(self, t: f64) -> Option<f64> {
        let v = match self {
            Self::Identity => t,
            Self::Ln => t.exp(),
            Self::Log10 => 10f64.powf(t),
            Self::Sqrt if t >= 0.0 => t * t,
            Self::Reciprocal if t != 0.0 => 1.0 / t,
            Self::BoxCox(l) if l.abs() < BOX_COX_ZERO => t.exp(),
            Self::BoxCox(l) if l * t + 1.0 > 0.0 => (l * t + 1.0).powf(1.0 / l),
            _ => return None,
        };
        v.is_finite().then_some(v)
    }

    /// [`Transform::inverse`], with a value beyond the transform's range taken to the edge of
    /// the data's domain where that edge is finite (a negative square root to 0): for band
    /// ends that reach past what the transform can produce.
    pub fn inverse_clamped(self, t: f64) -> Option<f64> {
        match self {
            Self::Sqrt if t < 0.0 => Some(0.0),
            Self::BoxCox(l) if l > BOX_COX_ZERO && l * t + 1.0 <= 0.0 => Some(0.0),
            _ => self.inverse(t),
        }
    }

    /// What the transform needs of a value, for messages: "positive", "zero or positive",
    /// "non-zero", or "finite".
    pub fn domain(self) -> &'static str {
        match self {
            Self::Identity => "finite",
            Self::Ln | Self::Log10 | Self::BoxCox(_) => "positive",
            Self::Sqrt => "zero or positive",
            Self::Reciprocal => "non-zero",
        }
    }

    /// `name` with the transform written around it, e.g. `ln(conc)`, `boxcox[0.5](conc)`.
    pub fn label(self, name: &str) -> String {
        match self {
            Self::Identity => name.to_string(),
            Self::Ln => format!("ln({name})"),
            Self::Log10 => format!("log10({name})"),
            Self::Sqrt => format!("sqrt({name})"),
            Self::Reciprocal => format!("1/{name}"),
            Self::BoxCox(l) => format!("boxcox[{}]({name})", trim(l)),
        }
    }
}

/// `l` with at most four decimals and no trailing zeros.
fn trim(l: f64) -> String {
    crate::short::trimmed(l, 4)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn each_transform_is_undone_by_its_inverse() {
        let all = [
            Transform::Identity,
            Transform::Ln,
            Transform::Log10,
            Transform::Sqrt,
            Transform::Reciprocal,
            Transform::BoxCox(0.0),
            Transform::BoxCox(0.5),
            Transform::BoxCox(-1.3),
        ];
        for t in all {
            for v in [0.01, 0.7, 3.0, 1234.5] {
                let back = t.apply(v).and_then(|u| t.inverse(u)).expect("in domain");
                assert!((back - v).abs() <= 1e-12 * v, "{t:?} at {v}: {back}");
            }
        }
    }

    #[test]
    fn values_outside_the_domain_are_refused() {
        assert_eq!(Transform::Ln.apply(0.0), None);
        assert_eq!(Transform::Log10.apply(-2.0), None);
        assert_eq!(Transform::Sqrt.apply(-1e-300), None);
        assert_eq!(Transform::Reciprocal.apply(0.0), None);
        assert_eq!(Transform::BoxCox(2.0).apply(0.0), None);
        assert_eq!(Transform::Sqrt.inverse(-1.0), None);
        assert_eq!(Transform::Sqrt.inverse_clamped(-1.0), Some(0.0));
        assert_eq!(Transform::BoxCox(0.5).inverse_clamped(-3.0), Some(0.0));
        // (v^λ − 1)/λ at λ = 1 is v − 1 (by hand), and λ → 0 gives ln v.
        assert_eq!(Transform::BoxCox(1.0).apply(5.0), Some(4.0));
        assert_eq!(Transform::BoxCox(0.0).apply(1.0), Some(0.0));
        assert_eq!(Transform::BoxCox(0.25).label("y"), "boxcox[0.25](y)");
    }
}
