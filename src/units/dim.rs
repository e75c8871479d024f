//! Dimension vectors over the seven SI base dimensions.

use std::fmt;
use std::ops::{Div, Mul};

/// Exponents of the SI base dimensions, in the order
/// length, mass, time, electric current, temperature, amount of substance, luminous intensity.
#[derive(Clone, Copy, PartialEq, Eq, Hash, Default, Debug)]
pub struct Dim(pub [i8; 7]);

impl Dim {
    pub const NONE: Dim = Dim([0, 0, 0, 0, 0, 0, 0]);
    pub const LENGTH: Dim = Dim([1, 0, 0, 0, 0, 0, 0]);
    pub const MASS: Dim = Dim([0, 1, 0, 0, 0, 0, 0]);
    pub const TIME: Dim = Dim([0, 0, 1, 0, 0, 0, 0]);
    pub const CURRENT: Dim = Dim([0, 0, 0, 1, 0, 0, 0]);
    pub const TEMPERATURE: Dim = Dim([0, 0, 0, 0, 1, 0, 0]);
    pub const AMOUNT: Dim = Dim([0, 0, 0, 0, 0, 1, 0]);
    pub const LUMINOUS: Dim = Dim([0, 0, 0, 0, 0, 0, 1]);
    pub const AREA: Dim = Dim([2, 0, 0, 0, 0, 0, 0]);
    pub const VOLUME: Dim = Dim([3, 0, 0, 0, 0, 0, 0]);
    pub const VELOCITY: Dim = Dim([1, 0, -1, 0, 0, 0, 0]);
    pub const PRESSURE: Dim = Dim([-1, 1, -2, 0, 0, 0, 0]);
    pub const ENERGY: Dim = Dim([2, 1, -2, 0, 0, 0, 0]);
    pub const POWER: Dim = Dim([2, 1, -3, 0, 0, 0, 0]);
    pub const DENSITY: Dim = Dim([-3, 1, 0, 0, 0, 0, 0]);
    /// J/kg, also m^2/s^2.
    pub const SPECIFIC_ENERGY: Dim = Dim([2, 0, -2, 0, 0, 0, 0]);
    /// J/(kg K).
    pub const SPECIFIC_HEAT: Dim = Dim([2, 0, -2, 0, -1, 0, 0]);
    /// m^3/kg.
    pub const SPECIFIC_VOLUME: Dim = Dim([3, -1, 0, 0, 0, 0, 0]);
    /// kg/(m^2 s).
    pub const MASS_FLUX: Dim = Dim([-2, 1, -1, 0, 0, 0, 0]);
    /// kg/s.
    pub const MASS_FLOW: Dim = Dim([0, 1, -1, 0, 0, 0, 0]);
    /// m^3/s.
    pub const VOLUME_FLOW: Dim = Dim([3, 0, -1, 0, 0, 0, 0]);
    /// W/m^2.
    pub const HEAT_FLUX: Dim = Dim([0, 1, -3, 0, 0, 0, 0]);
    /// W/(m^2 K).
    pub const HEAT_TRANSFER_COEFFICIENT: Dim = Dim([0, 1, -3, 0, -1, 0, 0]);
    /// W/(m K).
    pub const THERMAL_CONDUCTIVITY: Dim = Dim([1, 1, -3, 0, -1, 0, 0]);
    /// Pa s.
    pub const DYNAMIC_VISCOSITY: Dim = Dim([-1, 1, -1, 0, 0, 0, 0]);
    /// m^2/s (diffusivity, kinematic viscosity).
    pub const DIFFUSIVITY: Dim = Dim([2, 0, -1, 0, 0, 0, 0]);
    /// J/mol.
    pub const MOLAR_ENERGY: Dim = Dim([2, 1, -2, 0, 0, -1, 0]);
    /// kg/m^2 (load per tray area).
    pub const AREAL_DENSITY: Dim = Dim([-2, 1, 0, 0, 0, 0, 0]);

    /// True when every exponent is zero.
    pub fn is_dimensionless(self) -> bool {
        self == Dim::NONE
    }

    /// Raise to an integer power.
    pub fn powi(self, n: i32) -> Dim {
        let mut out = self.0;
        for e in &mut out {
            *e = (*e as i32 * n) as i8;
        }
        Dim(out)
    }

    /// Integer root, when every exponent divides evenly.
    pub fn root(self, n: i32) -> Option<Dim> {
        let mut out = self.0;
        for e in &mut out {
            if (*e as i32) % n != 0 {
                return None;
            }
            *e = ((*e as i32) / n) as i8;
        }
        Some(Dim(out))
    }

    /// The reciprocal dimension.
    pub fn recip(self) -> Dim {
        self.powi(-1)
    }

    /// SI unit string, e.g. `kg m^-1 s^-2` rendered as `kg/(m*s^2)`.
    pub fn si_unit(self) -> String {
        const SYM: [&str; 7] = ["m", "kg", "s", "A", "K", "mol", "cd"];
        // Order numerator as kg m s A K mol cd, as engineers write it.
        const ORDER: [usize; 7] = [1, 0, 2, 3, 4, 5, 6];
        let mut num = Vec::new();
        let mut den = Vec::new();
        for &i in &ORDER {
            let e = self.0[i];
            let part = |p: i8| {
                if p == 1 {
                    SYM[i].to_string()
                } else {
                    format!("{}^{}", SYM[i], p)
                }
            };
            if e > 0 {
                num.push(part(e));
            } else if e < 0 {
                den.push(part(-e));
            }
        }
        let n = if num.is_empty() {
            "1".to_string()
        } else {
            num.join("*")
        };
        match den.len() {
            0 => {
                if num.is_empty() {
                    String::new()
                } else {
                    n
                }
            }
            1 => format!("{n}/{}", den[0]),
            _ => format!("{n}/({})", den.join("*")),
        }
    }
}

impl Mul for Dim {
    type Output = Dim;
    /// Dimensions multiply by adding exponents.
    #[allow(clippy::suspicious_arithmetic_impl)]
    fn mul(self, rhs: Dim) -> Dim {
        let mut out = self.0;
        for (a, b) in out.iter_mut().zip(rhs.0) {
            *a += b;
        }
        Dim(out)
    }
}

impl Div for Dim {
    type Output = Dim;
    /// Dimensions divide by subtracting exponents.
    #[allow(clippy::suspicious_arithmetic_impl)]
    fn div(self, rhs: Dim) -> Dim {
        self * rhs.recip()
    }
}

impl fmt::Display for Dim {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        if self.is_dimensionless() {
            f.write_str("1")
        } else {
            f.write_str(&self.si_unit())
        }
    }
}
