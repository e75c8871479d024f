//! Drying stages: one period of a drying history (constant rate, falling
//! rate, or internal diffusion) with its start and end moisture, duration and
//! the conditions it assumed, so that dryer models can chain them.

use super::rate_curve::{drying_time, RateCurve};
use super::KineticsError;

/// What governs a stage.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum StageKind {
    /// Surface wet: rate set by heat and mass transfer from the air.
    ConstantRate,
    /// Below the critical moisture: rate falls with moisture.
    FallingRate,
    /// Rate set by internal diffusion (Fick's second law).
    Diffusion,
}

impl StageKind {
    /// Trade words for tables and records.
    pub fn name(self) -> &'static str {
        match self {
            StageKind::ConstantRate => "constant-rate period",
            StageKind::FallingRate => "falling-rate period",
            StageKind::Diffusion => "diffusion period",
        }
    }
}

/// One drying stage.
#[derive(Debug, Clone, PartialEq)]
pub struct DryingStage {
    pub kind: StageKind,
    /// Moisture at the start and end, dry basis.
    pub x_start: f64,
    pub x_end: f64,
    /// Duration, s.
    pub duration_s: f64,
    /// Drying rate at the start and end, kg/(m^2 s) (NaN for a diffusion stage
    /// given only as a duration).
    pub rate_start: f64,
    pub rate_end: f64,
    /// The conditions the stage assumed, in words (air, load, model).
    pub conditions: String,
}

impl DryingStage {
    /// A diffusion-controlled stage from `x_start` to `x_end` (dry basis)
    /// lasting `duration_s`, e.g. from a [`crate::engine::diffusion::DiffusionRun`]
    /// (`x_end = Xe + MR (X0 - Xe)`); its rates are not defined per area
    /// (NaN) because a diffusion run is per body, not per tray area.
    pub fn diffusion(
        x_start: f64,
        x_end: f64,
        duration_s: f64,
        conditions: &str,
    ) -> Result<DryingStage, KineticsError> {
        super::non_negative("stage duration", duration_s)?;
        if !super::above(x_start, x_end) {
            return Err(KineticsError::OutOfRange {
                name: "stage start moisture",
                value: x_start,
                reason: "must exceed the end moisture",
            });
        }
        Ok(DryingStage {
            kind: StageKind::Diffusion,
            x_start,
            x_end,
            duration_s,
            rate_start: f64::NAN,
            rate_end: f64::NAN,
            conditions: conditions.to_string(),
        })
    }

    /// Water removed per kg of dry solid.
    pub fn water_removed_per_kg_solid(&self) -> f64 {
        self.x_start - self.x_end
    }
}

/// Split a drying run from `x_start` to `x_end` on `curve` into its
/// constant-rate and falling-rate stages (only the stages that occur), at
/// `critical` when given (e.g. the critical moisture found in a test for a
/// measured curve), else at the curve's own critical moisture. A curve with
/// neither is one falling-rate stage.
pub fn stages(
    curve: &RateCurve,
    load_kg_per_m2: f64,
    x_start: f64,
    x_end: f64,
    critical: Option<f64>,
    conditions: &str,
) -> Result<Vec<DryingStage>, KineticsError> {
    // Validates the whole span first (target above equilibrium and so on).
    drying_time(curve, load_kg_per_m2, x_start, x_end)?;
    let mut out = Vec::new();
    match critical.or(curve.critical()) {
        Some(xc) if xc > x_end && xc < x_start => {
            let constant = drying_time(curve, load_kg_per_m2, x_start, xc)?.total_s;
            let falling = drying_time(curve, load_kg_per_m2, xc, x_end)?.total_s;
            out.push(stage(
                StageKind::ConstantRate,
                curve,
                x_start,
                xc,
                constant,
                conditions,
            ));
            out.push(stage(
                StageKind::FallingRate,
                curve,
                xc,
                x_end,
                falling,
                conditions,
            ));
        }
        Some(xc) if xc <= x_end => {
            let t = drying_time(curve, load_kg_per_m2, x_start, x_end)?.total_s;
            out.push(stage(
                StageKind::ConstantRate,
                curve,
                x_start,
                x_end,
                t,
                conditions,
            ));
        }
        _ => {
            let t = drying_time(curve, load_kg_per_m2, x_start, x_end)?.total_s;
            out.push(stage(
                StageKind::FallingRate,
                curve,
                x_start,
                x_end,
                t,
                conditions,
            ));
        }
    }
    Ok(out)
}

fn stage(
    kind: StageKind,
    curve: &RateCurve,
    x_start: f64,
    x_end: f64,
    duration_s: f64,
    conditions: &str,
) -> DryingStage {
    DryingStage {
        kind,
        x_start,
        x_end,
        duration_s,
        rate_start: curve.rate(x_start),
        rate_end: curve.rate(x_end),
        conditions: conditions.to_string(),
    }
}

/// Total duration of a chain of stages, s; errors when consecutive stages
/// do not join (end moisture of one differs from the start of the next by
/// more than 1e-9).
pub fn chain_duration(chain: &[DryingStage]) -> Result<f64, KineticsError> {
    for pair in chain.windows(2) {
        if (pair[0].x_end - pair[1].x_start).abs() > 1e-9 {
            return Err(KineticsError::OutOfRange {
                name: "stage start moisture",
                value: pair[1].x_start,
                reason: "does not match the end moisture of the previous stage",
            });
        }
    }
    Ok(chain.iter().map(|s| s.duration_s).sum())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn stages_split_at_critical_moisture_and_sum_to_total() {
        let c = RateCurve::constant_linear(1e-3, 0.6, 0.05).unwrap();
        let chain = stages(&c, 18.0, 1.3, 0.12, None, "invented lab air").unwrap();
        assert_eq!(chain.len(), 2);
        assert_eq!(chain[0].kind, StageKind::ConstantRate);
        assert!((chain[0].x_end - 0.6).abs() < 1e-12 && (chain[1].x_start - 0.6).abs() < 1e-12);
        let total = drying_time(&c, 18.0, 1.3, 0.12).unwrap().total_s;
        assert!((chain_duration(&chain).unwrap() - total).abs() < 1e-9 * total);
        // Constant period only: (1.3 - 0.6) * 18 / 1e-3 s.
        assert!((chain[0].duration_s - 0.7 * 18.0 / 1e-3).abs() < 1e-6);
        let mut chained = chain.clone();
        chained.push(DryingStage::diffusion(0.12, 0.08, 3600.0, "tempering bin").unwrap());
        assert!((chain_duration(&chained).unwrap() - total - 3600.0).abs() < 1e-6);
        chained.push(DryingStage::diffusion(0.07, 0.06, 60.0, "gap").unwrap());
        assert!(chain_duration(&chained).is_err(), "stages that do not join");
        let only_falling = stages(&c, 18.0, 0.5, 0.12, None, "").unwrap();
        assert_eq!(only_falling.len(), 1);
        assert_eq!(only_falling[0].kind, StageKind::FallingRate);
    }
}
