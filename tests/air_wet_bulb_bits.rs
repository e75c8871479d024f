//! The library wet-bulb, bit for bit, over a dense grid of the whole range
//! against a digest of its results: dry-bulb -40..350 degC (ice and liquid
//! wet-bulbs, above the boiling point), 50..200 kPa, dry to 99.99 % and
//! 100 % saturation or to 20 kg/kg above the boiling point, with the errors at
//! the edges (their messages) in the same digest. A rearrangement that moves
//! any result by one unit in the last place, or changes an error, changes
//! the digest.
//!
//! The digest was last replaced when the enthalpies of states and of the
//! balance began to take the ideal-gas enthalpy of dry air and its specific
//! heat from a table (`engine::air::dry_air_table`, within 1.3e-11 J/kg of
//! the exact expression, below that expression's own rounding). That moved
//! results by rounding only: over this grid the wet-bulbs moved by at most
//! 5.1e-13 K (dry air below 0 degC, where the balance's slope is least,
//! under enthalpy changes of a few 1e-10 J/kg, the exact expression's
//! rounding at those magnitudes), no error changed, and every result is
//! still held to the converged solve as below.
//!
//! Before that, the digest was replaced when the wet-bulb began to take the root of
//! the per-pressure table itself where the table's error bound is within
//! the solver's tolerance (1e-13 K), instead of one exact Newton step from
//! it. That moved results by rounding only: every result is held to Newton's
//! method run to convergence by
//! `engine::air::state::tests::one_step_wet_bulb_matches_the_converged_solve`
//! (1e-13 K plus 8 units of rounding), and the rendered sweeps in
//! tests/render_golden moved by at most 2.3e-13 K (4 units in the last place).
//!
//! The digest holds the bits this machine's C library (glibc on x86_64
//! Linux, where it was made and where CI runs) gives for exp, ln and pow; a
//! different library may round a few of them differently, so the check runs
//! on that target only. A change meant to move results (within the solve's
//! tolerance) replaces the digest, with a max-difference test against the
//! converged solve.
//!
//! To print the digest of the current code: `SICCANT_PRINT_DIGEST=1 cargo test
//! --release --test air_wet_bulb_bits -- --nocapture`.

#![cfg(all(target_arch = "x86_64", target_os = "linux", target_env = "gnu"))]

use siccant::engine::air::AirState;
use uom::si::f64::{Pressure, ThermodynamicTemperature};
use uom::si::pressure::pascal;
use uom::si::thermodynamic_temperature::kelvin;

/// FNV-1a, 64 bits, over bytes.
struct Digest(u64);

impl Digest {
    fn add(&mut self, bytes: &[u8]) {
        for &b in bytes {
            self.0 ^= u64::from(b);
            self.0 = self.0.wrapping_mul(0x0100_0000_01b3);
        }
    }
}

/// Saturation humidity ratio at (T, p) from a 100 % relative-humidity state,
/// or `None` above the boiling point.
fn saturation_w(t: f64, p: f64) -> Option<f64> {
    AirState::from_rh(
        ThermodynamicTemperature::new::<kelvin>(t),
        1.0,
        Pressure::new::<pascal>(p),
    )
    .ok()
    .map(|s| s.humidity_ratio())
}

/// The digest of every wet-bulb (its bits) or error (its message) on the grid,
/// and the number of states.
fn grid_digest() -> (u64, usize) {
    let mut digest = Digest(0xcbf2_9ce4_8422_2325);
    let mut states = 0;
    for p in [50e3, 70e3, 84_556.0, 101_325.0, 150e3, 200e3] {
        let mut t = 233.15;
        while t <= 623.15 {
            let ws = saturation_w(t, p);
            let top = ws.unwrap_or(20.0).min(20.0);
            let mut ws_list: Vec<f64> = (0..=32)
                .map(|i| {
                    if i == 0 {
                        0.0
                    } else {
                        top * 10f64.powf(-0.2 * f64::from(32 - i))
                    }
                })
                .collect();
            ws_list.extend([top * 0.9999, top * 0.999_999]);
            for w in ws_list {
                let state = AirState::from_w(
                    ThermodynamicTemperature::new::<kelvin>(t),
                    w,
                    Pressure::new::<pascal>(p),
                );
                match state.map(|s| s.wet_bulb()) {
                    Ok(Ok(twb)) => digest.add(&twb.get::<kelvin>().to_bits().to_le_bytes()),
                    Ok(Err(e)) | Err(e) => digest.add(e.to_string().as_bytes()),
                }
                states += 1;
            }
            t += 0.0913;
        }
    }
    (digest.0, states)
}

#[test]
fn wet_bulb_bits_are_unchanged_over_a_dense_grid() {
    let (digest, states) = grid_digest();
    if std::env::var_os("SICCANT_PRINT_DIGEST").is_some() {
        println!("digest {digest:#018x} over {states} states");
    }
    assert_eq!(states, 6 * 4272 * 35);
    assert_eq!(digest, 0xe0e2_6206_a68c_98d6);
}
