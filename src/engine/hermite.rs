//! Cubic Hermite interpolation on one interval of a table, and the estimate
//! of its error that the engine's tables share: the wet-bulb tables of the
//! humid-air engine and the saturated-surface table of the wet-surface
//! balance.
//!
//! On an interval scaled to `s` in [0, 1], the interpolant through
//! `(y0, slope m0)` at 0 and `(y1, m1)` at 1 (slopes per node spacing) is
//! `y0 + m0 (s^3 - 2 s^2 + s) + (y1 - y0) (3 s^2 - 2 s^3) + m1 (s^3 - s^2)`.
//! Its error is at most `M4 / 384` (in steps: `M4 = max |f''''| step^4`, the
//! cubic Hermite remainder). The functions tabulated grow nearly like an
//! exponential (a vapour pressure), for which `f'''' = f'''^2 / f''`
//! exactly; [`fourth_estimate`] takes that ratio from the interpolant's own
//! data, with a safety factor.

/// Safety factor on the estimate of the fourth derivative in
/// [`fourth_estimate`] (checked over the wet-bulb tables by
/// `air::per_pressure::tests::table_root_is_within_its_bound`, and over the
/// saturated-surface table by
/// `transfer::surface_table::tests::table_values_are_within_their_bounds`).
pub(crate) const FOURTH_SAFETY: f64 = 4.0;

/// The interpolant's second derivatives at the two ends, per step^2.
#[inline]
pub(crate) fn end_curvatures((y0, m0): (f64, f64), (y1, m1): (f64, f64)) -> (f64, f64) {
    let rise = y1 - y0;
    let c0 = 6.0 * rise - 4.0 * m0 - 2.0 * m1;
    let c1 = 2.0 * m0 + 4.0 * m1 - 6.0 * rise;
    (c0, c1)
}

/// An estimate of `max |f''''| step^4` over the interval from the end
/// curvatures `(c0, c1)` of [`end_curvatures`]: [`FOURTH_SAFETY`] times
/// `third^2 / small`, with the interpolant's (constant) third derivative
/// `c1 - c0` and the smaller magnitude of the two; `None` when the two
/// differ in sign or one is zero (the model of the growth does not apply).
#[inline]
pub(crate) fn fourth_estimate((c0, c1): (f64, f64)) -> Option<f64> {
    let same_sign = c0 * c1 > 0.0;
    if !same_sign {
        return None;
    }
    let small = c0.abs().min(c1.abs());
    let third = c1 - c0;
    Some(FOURTH_SAFETY * third * third / small)
}

/// The interpolant's value and slope (per step) at `s`.
#[inline]
pub(crate) fn value_and_slope((y0, m0): (f64, f64), (y1, m1): (f64, f64), s: f64) -> (f64, f64) {
    let rise = y1 - y0;
    let s2 = s * s;
    let s3 = s2 * s;
    let value = y0 + m0 * (s3 - 2.0 * s2 + s) + rise * (3.0 * s2 - 2.0 * s3) + m1 * (s3 - s2);
    let slope =
        m0 * (3.0 * s2 - 4.0 * s + 1.0) + rise * (6.0 * s - 6.0 * s2) + m1 * (3.0 * s2 - 2.0 * s);
    (value, slope)
}

/// The grid of the tables of temperature functions filled once per process
/// (`engine::air::dry_air_table`, `engine::transport_table`): nodes `STEP`
/// apart from `ORIGIN` to `TOP`, the engine's whole dry-bulb range. The
/// spacing is a power of two and the ends whole kelvins, so every node
/// temperature and the offset of a dry-bulb from the first node are exact.
pub(crate) mod grid {
    /// Spacing of the nodes, K.
    pub(crate) const STEP: f64 = 0.125;
    /// The first node, K (below -40 degC, the coldest dry-bulb the engine takes).
    pub(crate) const ORIGIN: f64 = 232.0;
    /// The last node, K (above 350 degC, the hottest).
    pub(crate) const TOP: f64 = 624.0;

    /// The nodes of a table of spacing `step` (K) from [`ORIGIN`] to
    /// [`TOP`], each made by `node` at its temperature.
    pub(crate) fn nodes<N>(step: f64, node: impl Fn(f64) -> N) -> Vec<N> {
        let len = ((TOP - ORIGIN) / step).round() as usize + 1;
        (0..len).map(|k| node(ORIGIN + k as f64 * step)).collect()
    }

    /// The interval of a table of `len` nodes of spacing `step` that holds
    /// `t` (K), and where in it `t` lies (0 to 1); `None` outside the
    /// table or for NaN.
    #[inline]
    pub(crate) fn locate(t: f64, step: f64, len: usize) -> Option<(usize, f64)> {
        let x = (t - ORIGIN) * (1.0 / step);
        let last = len.checked_sub(1)? as f64;
        if !(x >= 0.0 && x < last) {
            return None;
        }
        let k = x as usize;
        Some((k, x - k as f64))
    }
}

/// The largest magnitude of the fourth differences of `f` over spacings
/// `spacings` (K), per K^4 (with `relative`, over the magnitude of `f` at
/// the middle point), starting every `stride` K from `from` while the five
/// points stay at or below `to`: what a table's fixed bound on a fourth
/// derivative is tested against.
#[cfg(test)]
pub(crate) fn largest_fourth_difference(
    f: impl Fn(f64) -> f64,
    (from, to): (f64, f64),
    spacings: &[f64],
    stride: f64,
    relative: bool,
) -> f64 {
    let mut largest: f64 = 0.0;
    for &h in spacings {
        let mut t = from;
        while t + 4.0 * h <= to {
            let middle = f(t + 2.0 * h);
            let d4 = f(t) - 4.0 * f(t + h) + 6.0 * middle - 4.0 * f(t + 3.0 * h) + f(t + 4.0 * h);
            let scale = if relative { middle.abs() } else { 1.0 };
            largest = largest.max(d4.abs() / scale / h.powi(4));
            t += stride;
        }
    }
    largest
}

#[cfg(test)]
mod tests {
    use super::*;

    /// On a cubic the interpolant is exact, with its slope; the end
    /// curvatures are the cubic's second derivatives.
    #[test]
    fn exact_on_a_cubic() {
        let f = |s: f64| 1.5 - 0.25 * s + 2.0 * s * s + 0.75 * s * s * s;
        let df = |s: f64| -0.25 + 4.0 * s + 2.25 * s * s;
        let (a, b) = ((f(0.0), df(0.0)), (f(1.0), df(1.0)));
        for i in 0..=10 {
            let s = f64::from(i) / 10.0;
            let (v, d) = value_and_slope(a, b, s);
            assert!((v - f(s)).abs() < 1e-14, "{s}");
            assert!((d - df(s)).abs() < 1e-14, "{s}");
        }
        let (c0, c1) = end_curvatures(a, b);
        assert!((c0 - 4.0).abs() < 1e-14 && (c1 - 8.5).abs() < 1e-14);
    }

    /// For an exponential the estimate is the safety factor times the
    /// fourth derivative, within a few times the growth over the step (the
    /// end curvatures are the interpolant's, not the function's); none
    /// across a sign change of the curvature.
    #[test]
    fn estimate_of_an_exponential() {
        let a = 0.05_f64;
        let (y0, y1) = (1.0, a.exp());
        let (c0, c1) = end_curvatures((y0, a * y0), (y1, a * y1));
        let got = fourth_estimate((c0, c1)).unwrap();
        let want = FOURTH_SAFETY * a.powi(4);
        assert!((got / want - 1.0).abs() < 0.1, "{got} {want}");
        assert_eq!(fourth_estimate((1.0, -1.0)), None);
        assert_eq!(fourth_estimate((0.0, 1.0)), None);
    }
}
