//! The change of variables that keeps a parameter inside its bounds (the
//! MINUIT transformation, James & Roos 1975; formulas in the parent module's
//! documentation).

/// The change of variables that keeps one parameter inside its bounds.
#[derive(Clone, Copy, Debug)]
pub(super) enum Transform {
    Free,
    Lower { lo: f64, scale: f64 },
    Upper { hi: f64, scale: f64 },
    Both { lo: f64, hi: f64 },
}

impl Transform {
    pub(super) fn new(start: f64, (lo, hi): (f64, f64)) -> Transform {
        let scale = |gap: f64| {
            if gap > 0.0 {
                gap
            } else {
                1e-3 * start.abs().max(1e-6)
            }
        };
        match (lo.is_finite(), hi.is_finite()) {
            (false, false) => Transform::Free,
            (true, false) => Transform::Lower {
                lo,
                scale: scale(start - lo),
            },
            (false, true) => Transform::Upper {
                hi,
                scale: scale(hi - start),
            },
            (true, true) => Transform::Both { lo, hi },
        }
    }

    /// Internal (unbounded) variable for a parameter value; a start on a bound
    /// is moved just inside so that the derivative `dx/du` is not zero.
    pub(super) fn internal(self, x: f64) -> f64 {
        match self {
            Transform::Free => x,
            Transform::Lower { lo, scale } => one_sided_internal((x - lo) / scale),
            Transform::Upper { hi, scale } => one_sided_internal((hi - x) / scale),
            Transform::Both { lo, hi } => {
                let s = (2.0 * (x - lo) / (hi - lo) - 1.0).clamp(-0.999_999, 0.999_999);
                s.asin()
            }
        }
    }

    /// Parameter value for an internal variable.
    pub(super) fn external(self, u: f64) -> f64 {
        match self {
            Transform::Free => u,
            Transform::Lower { lo, scale } => lo + scale * ((u * u + 1.0).sqrt() - 1.0),
            Transform::Upper { hi, scale } => hi - scale * ((u * u + 1.0).sqrt() - 1.0),
            Transform::Both { lo, hi } => lo + (hi - lo) * 0.5 * (1.0 + u.sin()),
        }
    }

    /// Derivative `dx/du`.
    pub(super) fn slope(self, u: f64) -> f64 {
        match self {
            Transform::Free => 1.0,
            Transform::Lower { scale, .. } => scale * u / (u * u + 1.0).sqrt(),
            Transform::Upper { scale, .. } => -scale * u / (u * u + 1.0).sqrt(),
            Transform::Both { lo, hi } => (hi - lo) * 0.5 * u.cos(),
        }
    }
}

/// Inverse of `d = sqrt(u^2 + 1) - 1` for a scaled distance `d >= 0`, kept off zero.
fn one_sided_internal(d: f64) -> f64 {
    let d = d.max(1e-6);
    ((d + 1.0) * (d + 1.0) - 1.0).sqrt()
}
