//! One-dimensional search: the maximum of a smooth function on a bracket (Brent's method:
//! golden-section steps with parabolic interpolation) and a root by bisection. Small enough to
//! write here; no general optimizer is needed.

/// The golden section, `(3 − √5)/2`.
const GOLDEN: f64 = 0.381_966_011_250_105_1;

/// The `x` in `[lo, hi]` that maximizes `f`, to within `tol` (absolute), by Brent's method
/// (R. P. Brent, *Algorithms for Minimization without Derivatives*, 1973, ch. 5: golden
/// section with parabolic steps where they are safe). `f` should have one maximum in the
/// interval; at most 200 evaluations.
pub fn maximize(f: impl Fn(f64) -> f64, lo: f64, hi: f64, tol: f64) -> f64 {
    let g = |x: f64| -f(x);
    let (mut a, mut b) = (lo.min(hi), lo.max(hi));
    let mut x = a + GOLDEN * (b - a);
    let (mut w, mut v) = (x, x);
    let mut fx = g(x);
    let (mut fw, mut fv) = (fx, fx);
    let (mut d, mut e) = (0.0_f64, 0.0_f64);
    for _ in 0..200 {
        let m = 0.5 * (a + b);
        let tol1 = tol + 1e-12 * x.abs();
        let tol2 = 2.0 * tol1;
        if (x - m).abs() <= tol2 - 0.5 * (b - a) {
            break;
        }
        let mut golden = true;
        if e.abs() > tol1 {
            // Fit a parabola through x, w, v.
            let r = (x - w) * (fx - fv);
            let mut q = (x - v) * (fx - fw);
            let mut p = (x - v) * q - (x - w) * r;
            q = 2.0 * (q - r);
            if q > 0.0 {
                p = -p;
            }
            q = q.abs();
            if p.abs() < (0.5 * q * e).abs() && p > q * (a - x) && p < q * (b - x) {
                e = d;
                d = p / q;
                let u = x + d;
                if u - a < tol2 || b - u < tol2 {
                    d = if x < m { tol1 } else { -tol1 };
                }
                golden = false;
            }
        }
        if golden {
            e = if x < m { b - x } else { a - x };
            d = GOLDEN * e;
        }
        let u = if d.abs() >= tol1 {
            x + d
        } else if d > 0.0 {
            x + tol1
        } else {
            x - tol1
        };
        let fu = g(u);
        if fu <= fx {
            if u < x {
                b = x;
            } else {
                a = x;
            }
            (v, fv, w, fw, x, fx) = (w, fw, x, fx, u, fu);
        } else {
            if u < x {
                a = u;
            } else {
                b = u;
            }
            if fu <= fw || w == x {
                (v, fv, w, fw) = (w, fw, u, fu);
            } else if fu <= fv || v == x || v == w {
                (v, fv) = (u, fu);
            }
        }
    }
    x
}

/// A root of `f` between `lo` and `hi` (where `f` changes sign), by bisection to `tol`.
/// `None` when `f` has the same sign at both ends.
pub fn bisect(f: impl Fn(f64) -> f64, lo: f64, hi: f64, tol: f64) -> Option<f64> {
    let (mut a, mut b) = (lo, hi);
    let (fa, fb) = (f(a), f(b));
    if !(fa.is_finite() && fb.is_finite()) || fa.signum() == fb.signum() {
        return None;
    }
    let positive_at_a = fa > 0.0;
    for _ in 0..200 {
        let m = 0.5 * (a + b);
        if (b - a).abs() <= tol {
            break;
        }
        if (f(m) > 0.0) == positive_at_a {
            a = m;
        } else {
            b = m;
        }
    }
    Some(0.5 * (a + b))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn finds_the_top_of_smooth_functions() {
        // −(x − 1.3)² peaks at 1.3; x·e^(−x) peaks at 1 (by hand: derivative (1 − x)e^(−x)).
        let x = maximize(|x| -(x - 1.3) * (x - 1.3), -5.0, 5.0, 1e-10);
        assert!((x - 1.3).abs() < 1e-8, "{x}");
        let y = maximize(|x| x * (-x).exp(), 0.0, 8.0, 1e-10);
        assert!((y - 1.0).abs() < 1e-8, "{y}");
    }

    #[test]
    fn bisection_finds_a_bracketed_root() {
        let r = bisect(|x| x * x - 2.0, 0.0, 2.0, 1e-13).expect("sign change");
        assert!((r - std::f64::consts::SQRT_2).abs() < 1e-12);
        assert!(bisect(|x| x * x + 1.0, -1.0, 1.0, 1e-9).is_none());
    }
}
