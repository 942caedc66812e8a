//! Adjusting p-values for many tests at once.

/// How to adjust a family of p-values.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Adjustment {
    /// No adjustment.
    None,
    /// Holm's step-down: `p̃₍ᵢ₎ = maxₖ≤ᵢ min(1, (m − k + 1)·p₍ₖ₎)`; controls the family-wise error rate.
    Holm,
    /// Benjamini–Hochberg step-up: `p̃₍ᵢ₎ = minₖ≥ᵢ min(1, m·p₍ₖ₎/k)`; controls the false discovery rate.
    BenjaminiHochberg,
}

impl Adjustment {
    /// Lower-case name used in output.
    pub fn as_str(self) -> &'static str {
        match self {
            Self::None => "none",
            Self::Holm => "holm",
            Self::BenjaminiHochberg => "bh",
        }
    }
}

/// Adjusted p-values, in the order given (`p₍ᵢ₎` above is the i-th smallest of `m`).
pub fn adjust_p_values(p: &[f64], method: Adjustment) -> Vec<f64> {
    let m = p.len();
    let mut order: Vec<usize> = (0..m).collect();
    order.sort_by(|&a, &b| p[a].total_cmp(&p[b]));
    let mut out = vec![0.0; m];
    match method {
        Adjustment::None => return p.to_vec(),
        Adjustment::Holm => {
            let mut running = 0.0f64;
            for (k, &i) in order.iter().enumerate() {
                running = running.max(((m - k) as f64 * p[i]).min(1.0));
                out[i] = running;
            }
        }
        Adjustment::BenjaminiHochberg => {
            let mut running = 1.0f64;
            for (k, &i) in order.iter().enumerate().rev() {
                running = running.min((m as f64 * p[i] / (k + 1) as f64).min(1.0));
                out[i] = running;
            }
        }
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    #[test]
    fn holm_and_bh_on_a_small_family() {
        // Worked by hand: p = (0.01, 0.04, 0.03), m = 3.
        // Holm: sorted 0.01·3 = 0.03, 0.03·2 = 0.06, 0.04·1 → max(0.06, 0.04) = 0.06.
        // BH: 0.04·3/3 = 0.04, 0.03·3/2 = 0.045 → min with 0.04 = 0.04, 0.01·3 = 0.03.
        let p = [0.01, 0.04, 0.03];
        let holm = adjust_p_values(&p, Adjustment::Holm);
        let bh = adjust_p_values(&p, Adjustment::BenjaminiHochberg);
        for (a, b) in holm.iter().zip([0.03, 0.06, 0.06]) {
            assert_relative_eq!(*a, b, max_relative = 1e-15);
        }
        for (a, b) in bh.iter().zip([0.03, 0.04, 0.04]) {
            assert_relative_eq!(*a, b, max_relative = 1e-15);
        }
    }
}
