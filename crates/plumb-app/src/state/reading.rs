//! What the bench reads from the pair beside the fit: the mode (a plain fit, a calibration, or
//! two methods compared), the calibration's unknowns and the limits' σ, the method
//! comparison's settings, and the row order the sequence checks follow.

use plumb_core::calibration::SigmaSource;
use plumb_data::analysis::{AgreementRequest, CalibrationRequest, RowOrder, Unknown};

use super::marks::Marks;
use super::pair::FitSpec;

/// What the bench is for.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum BenchMode {
    /// A fit and its diagnostics.
    #[default]
    Fit,
    /// A calibration: unknowns read back, limits, lack of fit, the weightings side by side.
    Calibration,
    /// Two methods measuring the same thing: y the new method, x the established one.
    Agreement,
}

impl BenchMode {
    /// Every mode, in the order the switch shows them.
    pub const ALL: [Self; 3] = [Self::Fit, Self::Calibration, Self::Agreement];

    /// Its name on the switch.
    pub fn label(self) -> &'static str {
        match self {
            Self::Fit => "fit",
            Self::Calibration => "calibration",
            Self::Agreement => "method comparison",
        }
    }

    /// What it shows, for the switch's tooltip.
    pub fn tip(self) -> &'static str {
        match self {
            Self::Fit => "The fit with its residuals, leverage and quantile views",
            Self::Calibration => "Read unknown samples off the line with intervals; detection and quantitation limits; lack of fit against the replicate standards; the weightings side by side",
            Self::Agreement => "y and x measure the same thing by two methods: Passing–Bablok and Deming lines against the line of identity, and the differences against the means with the bias and limits of agreement",
        }
    }
}

/// Settings of the method comparison.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct AgreementOptions {
    /// Differences as percentages of the pair's mean.
    pub percent: bool,
    /// Deming's error-variance ratio, Var(error of y)/Var(error of x).
    pub deming_ratio: f64,
}

impl Default for AgreementOptions {
    fn default() -> Self {
        Self {
            percent: false,
            deming_ratio: 1.0,
        }
    }
}

/// Everything the bench reads beside the fit.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct Reading {
    /// The mode.
    pub mode: BenchMode,
    /// The calibration's unknowns and σ.
    pub calibration: CalibrationRequest,
    /// The method comparison's settings.
    pub agreement: AgreementOptions,
    /// The order the sequence checks follow.
    pub order: RowOrder,
}

impl Reading {
    /// The unknowns.
    pub fn unknowns(&self) -> &[Unknown] {
        &self.calibration.unknowns
    }

    /// σ of the limits.
    pub fn sigma(&self) -> SigmaSource {
        self.calibration.sigma
    }

    /// The calibration the summary reads (in calibration mode).
    pub fn report_calibration(&self) -> Option<CalibrationRequest> {
        (self.mode == BenchMode::Calibration).then(|| self.calibration.clone())
    }

    /// The method comparison the summary shows (in method-comparison mode): `spec`'s response
    /// against its first predictor, on the file's values without the excluded rows.
    pub fn report_agreement(&self, spec: &FitSpec, marks: &Marks) -> Option<AgreementRequest> {
        (self.mode == BenchMode::Agreement).then(|| self.agreement_request(spec, marks, false))
    }

    /// The method comparison of `spec`'s response (the new method) against its first
    /// predictor (the established one) under `marks`, with the what-if moves when `what_if`.
    pub fn agreement_request(
        &self,
        spec: &FitSpec,
        marks: &Marks,
        what_if: bool,
    ) -> AgreementRequest {
        let request = if what_if {
            spec.with_marks(marks)
        } else {
            spec.on_file_rows(marks)
        };
        AgreementRequest {
            reference: spec.x0().to_string(),
            test: spec.y.clone(),
            exclude: request.exclude,
            what_if: request.what_if,
            level: spec.level,
            deming_ratio: self.agreement.deming_ratio,
            percent: self.agreement.percent,
        }
    }
}
