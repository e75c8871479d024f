//! Impinging air jets (impingement and nozzle dryers): Martin's correlations
//! for the mean Nusselt number under single and arrays of round and slot
//! nozzles.
//!
//! Source for every function here: H. Martin, "Heat and mass transfer between
//! impinging gas jets and solid surfaces", Advances in Heat Transfer 13 (1977)
//! 1-60; the same equations and ranges are reproduced in Incropera and DeWitt,
//! *Fundamentals of Heat and Mass Transfer*, section 7.7. The mean Nusselt
//! number is Nu = h d / k with d the nozzle's hydraulic diameter: the diameter
//! D for a round nozzle, twice the slot width (S = 2B) for a slot. Re = u d / nu
//! with u the nozzle exit velocity. Properties at the jet exit temperature.
//! The Prandtl dependence is Pr^0.42 throughout.

use super::{check_range, positive, Correlated, TransferError};

const PR_EXP: f64 = 0.42;

/// Mean Nusselt number Nu = h D / k under a single round nozzle, averaged over
/// a circle of radius r around the stagnation point.
///
/// Nu = Pr^0.42 (D/r)(1 - 1.1 D/r) / [1 + 0.1 (H/D - 6) D/r]
///      * 2 Re^(1/2) (1 + 0.005 Re^0.55)^(1/2)
///
/// `h_over_d` is nozzle-to-surface distance over diameter, `r_over_d` the
/// averaging radius over diameter. Range: Re 2000-400000, H/D 2-12,
/// r/D 2.5-7.5.
pub fn round_jet_single(
    re: f64,
    pr: f64,
    h_over_d: f64,
    r_over_d: f64,
) -> Result<Correlated<f64>, TransferError> {
    const NAME: &str = "Martin single round nozzle";
    let (re, pr) = groups(re, pr)?;
    let hd = positive("nozzle distance H/D", h_over_d, "")?;
    let rd = positive("radius r/D", r_over_d, "")?;
    let dr = 1.0 / rd;
    let geometry = dr * (1.0 - 1.1 * dr) / (1.0 + 0.1 * (hd - 6.0) * dr);
    let f1 = 2.0 * re.sqrt() * (1.0 + 0.005 * re.powf(0.55)).sqrt();
    let mut out = Correlated::new(pr.powf(PR_EXP) * geometry * f1);
    check_range(&mut out.warnings, NAME, "Re", re, (2000.0, 400_000.0), "");
    check_range(&mut out.warnings, NAME, "H/D", hd, (2.0, 12.0), "");
    check_range(&mut out.warnings, NAME, "r/D", rd, (2.5, 7.5), "");
    nonnegative_result(out, NAME)
}

/// Mean Nusselt number Nu = h D / k under a regular array of round nozzles.
///
/// Nu = Pr^0.42 K G Re^(2/3) / 2, with
/// K = [1 + ((H/D) / (0.6 / f^(1/2)))^6]^(-0.05) and
/// G = 2 f^(1/2) (1 - 2.2 f^(1/2)) / [1 + 0.2 (H/D - 6) f^(1/2)],
/// where f is the relative nozzle area (open area over plate area: pi D^2 /
/// (4 L^2) for a square pitch L). Range: Re 2000-100000, H/D 2-12,
/// f 0.004-0.04.
pub fn round_jet_array(
    re: f64,
    pr: f64,
    h_over_d: f64,
    open_area: f64,
) -> Result<Correlated<f64>, TransferError> {
    const NAME: &str = "Martin array of round nozzles";
    let (re, pr) = groups(re, pr)?;
    let hd = positive("nozzle distance H/D", h_over_d, "")?;
    let f = fraction("relative nozzle area f", open_area)?;
    let sf = f.sqrt();
    let k = (1.0 + (hd / (0.6 / sf)).powi(6)).powf(-0.05);
    let g = 2.0 * sf * (1.0 - 2.2 * sf) / (1.0 + 0.2 * (hd - 6.0) * sf);
    let mut out = Correlated::new(pr.powf(PR_EXP) * k * g * 0.5 * re.powf(2.0 / 3.0));
    check_range(&mut out.warnings, NAME, "Re", re, (2000.0, 100_000.0), "");
    check_range(&mut out.warnings, NAME, "H/D", hd, (2.0, 12.0), "");
    check_range(&mut out.warnings, NAME, "f", f, (0.004, 0.04), "");
    nonnegative_result(out, NAME)
}

/// Mean Nusselt number Nu = h S / k under a single slot nozzle of width B
/// (S = 2B), averaged over a distance x either side of the centreline.
///
/// Nu = Pr^0.42 * 1.53 / (x/S + H/S + 1.39) * Re^m,
/// m = 0.695 - 1 / (x/S + (H/S)^1.33 + 3.06).
///
/// Range: Re 3000-90000, H/S 2-10, x/S 2-25.
pub fn slot_jet_single(
    re: f64,
    pr: f64,
    h_over_s: f64,
    x_over_s: f64,
) -> Result<Correlated<f64>, TransferError> {
    const NAME: &str = "Martin single slot nozzle";
    let (re, pr) = groups(re, pr)?;
    let hs = positive("nozzle distance H/S", h_over_s, "")?;
    let xs = positive("half-width x/S", x_over_s, "")?;
    let m = 0.695 - 1.0 / (xs + hs.powf(1.33) + 3.06);
    let mut out = Correlated::new(pr.powf(PR_EXP) * 1.53 / (xs + hs + 1.39) * re.powf(m));
    check_range(&mut out.warnings, NAME, "Re", re, (3000.0, 90_000.0), "");
    check_range(&mut out.warnings, NAME, "H/S", hs, (2.0, 10.0), "");
    check_range(&mut out.warnings, NAME, "x/S", xs, (2.0, 25.0), "");
    Ok(out)
}

/// Optimum relative open area f0 of a slot array at nozzle distance H/S:
/// f0 = [60 + 4 (H/S - 2)^2]^(-1/2) (Martin 1977).
pub fn slot_array_optimum_open_area(h_over_s: f64) -> f64 {
    (60.0 + 4.0 * (h_over_s - 2.0).powi(2)).powf(-0.5)
}

/// Mean Nusselt number Nu = h S / k under an array of slot nozzles (S = 2B).
///
/// Nu = Pr^0.42 (2/3) f0^(3/4) [2 Re / (f/f0 + f0/f)]^(2/3), with f the
/// relative open area (slot width over slot pitch, B / L) and f0 from
/// [`slot_array_optimum_open_area`]. Range: Re 1500-40000, H/S 1-40,
/// f 0.008 to 2.5 f0.
pub fn slot_jet_array(
    re: f64,
    pr: f64,
    h_over_s: f64,
    open_area: f64,
) -> Result<Correlated<f64>, TransferError> {
    const NAME: &str = "Martin array of slot nozzles";
    let (re, pr) = groups(re, pr)?;
    let hs = positive("nozzle distance H/S", h_over_s, "")?;
    let f = fraction("relative nozzle area f", open_area)?;
    let f0 = slot_array_optimum_open_area(hs);
    let nu = pr.powf(PR_EXP)
        * (2.0 / 3.0)
        * f0.powf(0.75)
        * (2.0 * re / (f / f0 + f0 / f)).powf(2.0 / 3.0);
    let mut out = Correlated::new(nu);
    check_range(&mut out.warnings, NAME, "Re", re, (1500.0, 40_000.0), "");
    check_range(&mut out.warnings, NAME, "H/S", hs, (1.0, 40.0), "");
    check_range(&mut out.warnings, NAME, "f", f, (0.008, 2.5 * f0), "");
    Ok(out)
}

fn groups(re: f64, pr: f64) -> Result<(f64, f64), TransferError> {
    Ok((
        positive("Reynolds number", re, "")?,
        positive("Prandtl number", pr, "")?,
    ))
}

fn fraction(name: &'static str, f: f64) -> Result<f64, TransferError> {
    if f > 0.0 && f < 1.0 {
        Ok(f)
    } else {
        Err(TransferError::OutOfBounds {
            name,
            value: f,
            low: 0.0,
            high: 1.0,
        })
    }
}

/// Geometry far outside the fit can drive the geometric factor negative;
/// a negative Nusselt number is meaningless, so say so.
fn nonnegative_result(
    out: Correlated<f64>,
    name: &'static str,
) -> Result<Correlated<f64>, TransferError> {
    if out.value > 0.0 && out.value.is_finite() {
        Ok(out)
    } else {
        Err(TransferError::OutOfBounds {
            name,
            value: out.value,
            low: 0.0,
            high: f64::INFINITY,
        })
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// At H/D = 6 the geometric factor of the single round nozzle reduces to
    /// (D/r)(1 - 1.1 D/r): check the formula at both range ends of r/D.
    #[test]
    fn round_single_formula_at_range_ends() {
        for (re, rd) in [(2000.0, 2.5), (400_000.0, 7.5)] {
            let nu = round_jet_single(re, 0.71, 6.0, rd).unwrap();
            let dr = 1.0 / rd;
            let expect = 0.71_f64.powf(0.42)
                * dr
                * (1.0 - 1.1 * dr)
                * 2.0
                * f64::sqrt(re)
                * f64::sqrt(1.0 + 0.005 * f64::powf(re, 0.55));
            assert!((nu.value - expect).abs() < 1e-9 * expect);
            assert!(nu.warnings.is_empty(), "{:?}", nu.warnings);
        }
        let w = round_jet_single(1000.0, 0.71, 14.0, 2.0).unwrap().warnings;
        let inputs: Vec<&str> = w.iter().map(|w| w.input).collect();
        assert_eq!(inputs, ["Re", "H/D", "r/D"]);
    }

    /// Heat transfer falls with nozzle distance and with averaging radius
    /// (common practice for impinging jets).
    #[test]
    fn round_single_trends() {
        let near = round_jet_single(20000.0, 0.71, 2.0, 4.0).unwrap().value;
        let far = round_jet_single(20000.0, 0.71, 10.0, 4.0).unwrap().value;
        let wide = round_jet_single(20000.0, 0.71, 2.0, 7.0).unwrap().value;
        assert!(near > far && near > wide);
    }

    #[test]
    fn round_array_has_an_optimum_open_area() {
        let nus: Vec<f64> = [0.004, 0.01, 0.02, 0.04]
            .iter()
            .map(|f| round_jet_array(20000.0, 0.71, 5.0, *f).unwrap().value)
            .collect();
        // Nu rises with open area over the fitted range at fixed Re (per nozzle).
        assert!(nus.windows(2).all(|w| w[1] > w[0]), "{nus:?}");
        assert!(round_jet_array(20000.0, 0.71, 5.0, 1.5).is_err());
    }

    #[test]
    fn slot_single_formula() {
        let nu = slot_jet_single(10000.0, 0.71, 4.0, 5.0).unwrap();
        let m = 0.695 - 1.0 / (5.0 + f64::powf(4.0, 1.33) + 3.06);
        let expect = 0.71_f64.powf(0.42) * 1.53 / (5.0 + 4.0 + 1.39) * f64::powf(10000.0, m);
        assert!((nu.value - expect).abs() < 1e-9 * expect);
        assert!(nu.warnings.is_empty());
        assert_eq!(
            slot_jet_single(10000.0, 0.71, 12.0, 5.0)
                .unwrap()
                .warnings
                .len(),
            1
        );
    }

    /// At f = f0 the slot-array bracket is 2 Re / 2 = Re, the best open area.
    #[test]
    fn slot_array_peaks_at_optimum() {
        let f0 = slot_array_optimum_open_area(8.0);
        let best = slot_jet_array(10000.0, 0.71, 8.0, f0).unwrap();
        let expect =
            0.71_f64.powf(0.42) * (2.0 / 3.0) * f0.powf(0.75) * f64::powf(10000.0, 2.0 / 3.0);
        assert!((best.value - expect).abs() < 1e-9 * expect);
        for f in [0.5 * f0, 2.0 * f0] {
            assert!(slot_jet_array(10000.0, 0.71, 8.0, f).unwrap().value < best.value);
        }
    }
}
