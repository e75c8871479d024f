//! Standard-atmosphere pressure from altitude (ISO 2533:1975, troposphere).

use uom::si::f64::{Length, Pressure};
use uom::si::length::meter;
use uom::si::pressure::pascal;

use super::AirError;

/// Lowest altitude of the ISO 2533 tables used here, m.
pub const ALTITUDE_MIN_M: f64 = -2000.0;
/// Top of the troposphere (standard lapse rate), m.
pub const ALTITUDE_MAX_M: f64 = 11000.0;

/// ISO 2533 constants: sea-level pressure, temperature, lapse rate, g0, air molar mass, gas constant, earth radius.
const P0: f64 = 101_325.0;
const T0: f64 = 288.15;
const LAPSE: f64 = 0.0065;
const G0: f64 = 9.806_65;
const M_AIR: f64 = 0.028_964_420;
const R_STAR: f64 = 8.314_32;
const EARTH_RADIUS: f64 = 6_356_766.0;

/// Pressure of the ISO 2533 standard atmosphere at geometric altitude `z`.
///
/// Method: `p = p0 (1 - L H / T0)^(g0 M / (R* L))` with the geopotential
/// altitude `H = r z / (r + z)`; p0 = 101.325 kPa, T0 = 288.15 K,
/// L = 6.5 K/km (ISO 2533:1975, constants as published there).
/// Validity: -2000 m to 11000 m (troposphere); outside, an error.
pub fn standard_atmosphere_pressure(z: Length) -> Result<Pressure, AirError> {
    let z = z.get::<meter>();
    if !(z.is_finite() && (ALTITUDE_MIN_M..=ALTITUDE_MAX_M).contains(&z)) {
        return Err(AirError::ProcessOutOfRange {
            what: format!("altitude `z` = {z:.1} m is outside {ALTITUDE_MIN_M} to {ALTITUDE_MAX_M} m (ISO 2533 troposphere)"),
        });
    }
    let h = EARTH_RADIUS * z / (EARTH_RADIUS + z);
    let exponent = G0 * M_AIR / (R_STAR * LAPSE);
    Ok(Pressure::new::<pascal>(
        P0 * (1.0 - LAPSE * h / T0).powf(exponent),
    ))
}

#[cfg(test)]
mod tests {
    use super::*;

    /// ISO 2533 table values (from memory of the published table, rounded there):
    /// 1000 m: 89.876 kPa, 2000 m: 79.501 kPa, 5000 m: 54.048 kPa (geometric altitude).
    #[test]
    fn matches_standard_table() {
        for (z, p_kpa) in [
            (0.0, 101.325),
            (1000.0, 89.876),
            (2000.0, 79.501),
            (5000.0, 54.048),
        ] {
            let p = standard_atmosphere_pressure(Length::new::<meter>(z))
                .unwrap()
                .get::<pascal>()
                / 1e3;
            assert!((p - p_kpa).abs() < 0.01, "z={z}: {p} vs {p_kpa}");
        }
        assert!(standard_atmosphere_pressure(Length::new::<meter>(20000.0)).is_err());
    }
}
