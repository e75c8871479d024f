//! Falling-rate drying by internal diffusion (Fick's second law).
//!
//! Moisture ratio `MR = (X_mean - Xe) / (X0 - Xe)` for a slab, an infinite
//! cylinder and a sphere, from Crank's series solutions ([`series`]) or from a
//! finite-volume solver ([`finite_volume`]) that admits a moisture- and
//! temperature-dependent diffusivity, shrinkage and a surface film resistance.
//! [`estimate`] fits an effective diffusivity to drying data and an Arrhenius
//! law to diffusivities at several temperatures.
//!
//! Source: J. Crank, *The Mathematics of Diffusion*, 2nd ed., Oxford 1975,
//! chapters 4 (plane sheet), 5 (cylinder) and 6 (sphere).

pub mod estimate;
pub mod finite_volume;
pub mod series;

pub use estimate::{
    arrhenius_fit, diffusivity_from_slope, diffusivity_nonlinear, ArrheniusFit, DiffusivityFit,
};
pub use finite_volume::{solve_drying, DiffusionProblem, DiffusionRun, SolverSettings, Surface};
pub use series::CrankSeries;

use uom::si::diffusion_coefficient::square_meter_per_second;
use uom::si::f64::{DiffusionCoefficient, Length, MolarEnergy, ThermodynamicTemperature};
use uom::si::length::meter;
use uom::si::molar_energy::joule_per_mole;
use uom::si::thermodynamic_temperature::kelvin;

use super::kinetics::{positive, KineticsError};

/// Molar gas constant, J/(mol K) (CODATA 2018 exact value).
pub const GAS_CONSTANT_J_PER_MOL_K: f64 = 8.314_462_618;

/// The shape of a drying body, by the exponent of its radial coordinate.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Shape {
    /// A plane sheet (flux through its faces only).
    Slab,
    /// An infinite cylinder (radial flux).
    Cylinder,
    /// A sphere.
    Sphere,
}

impl Shape {
    /// Exponent `s` in `r^s` (face area grows as r^s): 0, 1, 2.
    pub fn exponent(self) -> usize {
        match self {
            Shape::Slab => 0,
            Shape::Cylinder => 1,
            Shape::Sphere => 2,
        }
    }

    /// Trade word for messages and tables.
    pub fn name(self) -> &'static str {
        match self {
            Shape::Slab => "slab",
            Shape::Cylinder => "cylinder",
            Shape::Sphere => "sphere",
        }
    }
}

/// A drying body: a shape and its diffusion length.
///
/// The diffusion length is the half-thickness of a slab drying from both
/// faces, the full thickness of a slab drying from one face (the other face
/// sealed, a plane of symmetry), or the radius of a cylinder or sphere.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Body {
    pub shape: Shape,
    /// Diffusion length in metres (see above).
    pub length_m: f64,
}

impl Body {
    /// A slab of `thickness` drying from one face (`both_faces = false`) or both.
    pub fn slab(thickness: Length, both_faces: bool) -> Result<Body, KineticsError> {
        let t = positive("thickness", thickness.get::<meter>())?;
        Ok(Body {
            shape: Shape::Slab,
            length_m: if both_faces { 0.5 * t } else { t },
        })
    }

    /// An infinite cylinder of `radius`.
    pub fn cylinder(radius: Length) -> Result<Body, KineticsError> {
        Ok(Body {
            shape: Shape::Cylinder,
            length_m: positive("radius", radius.get::<meter>())?,
        })
    }

    /// A sphere of `radius`.
    pub fn sphere(radius: Length) -> Result<Body, KineticsError> {
        Ok(Body {
            shape: Shape::Sphere,
            length_m: positive("radius", radius.get::<meter>())?,
        })
    }

    /// Fourier number `D t / l^2` for diffusivity `d` (m^2/s) and time `t` (s).
    pub fn fourier(&self, d_m2_per_s: f64, time_s: f64) -> f64 {
        d_m2_per_s * time_s / (self.length_m * self.length_m)
    }
}

/// Effective moisture diffusivity as a function of moisture and temperature:
///
/// `D(X, T) = D_ref * exp(-Ea/R * (1/T - 1/T_ref)) * exp(a * (X - X_ref))`
///
/// The Arrhenius factor is the usual temperature law for effective
/// diffusivity in foods and porous solids (e.g. A. S. Mujumdar (ed.),
/// *Handbook of Industrial Drying*, 4th ed., ch. 1); the exponential moisture
/// factor is a common empirical form. With `Ea = 0` and `a = 0` it is constant.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Diffusivity {
    /// Diffusivity at `T_ref` and `X_ref`, m^2/s.
    pub reference_m2_per_s: f64,
    /// Activation energy, J/mol (0 for no temperature dependence).
    pub activation_energy_j_per_mol: f64,
    /// Reference temperature, K.
    pub reference_temperature_k: f64,
    /// Moisture coefficient `a`, per unit dry-basis moisture.
    pub moisture_coefficient: f64,
    /// Reference moisture `X_ref`, dry basis.
    pub reference_moisture: f64,
}

impl Diffusivity {
    /// A constant diffusivity; error when it is not positive.
    pub fn constant(d: DiffusionCoefficient) -> Result<Diffusivity, KineticsError> {
        let value = d.get::<square_meter_per_second>();
        if !(value.is_finite() && value > 0.0) {
            return Err(KineticsError::NegativeDiffusivity { value });
        }
        Ok(Diffusivity {
            reference_m2_per_s: value,
            activation_energy_j_per_mol: 0.0,
            reference_temperature_k: 293.15,
            moisture_coefficient: 0.0,
            reference_moisture: 0.0,
        })
    }

    /// Add an Arrhenius temperature dependence with `activation_energy`,
    /// the reference value holding at `reference_temperature`.
    pub fn with_arrhenius(
        mut self,
        activation_energy: MolarEnergy,
        reference_temperature: ThermodynamicTemperature,
    ) -> Result<Diffusivity, KineticsError> {
        self.activation_energy_j_per_mol = super::kinetics::non_negative(
            "activation energy",
            activation_energy.get::<joule_per_mole>(),
        )?;
        self.reference_temperature_k = positive(
            "reference temperature",
            reference_temperature.get::<kelvin>(),
        )?;
        Ok(self)
    }

    /// Add an exponential moisture dependence `exp(a (X - X_ref))`.
    pub fn with_moisture_dependence(
        mut self,
        coefficient: f64,
        reference_moisture: f64,
    ) -> Result<Diffusivity, KineticsError> {
        if !coefficient.is_finite() || !reference_moisture.is_finite() {
            return Err(KineticsError::OutOfRange {
                name: "moisture coefficient",
                value: coefficient,
                reason: "must be finite",
            });
        }
        self.moisture_coefficient = coefficient;
        self.reference_moisture = reference_moisture;
        Ok(self)
    }

    /// `D` in m^2/s at dry-basis moisture `x` and temperature `t_k` (K).
    pub fn at(&self, x: f64, t_k: f64) -> f64 {
        self.at_scaled(x, self.thermal_factor(t_k))
    }

    /// The Arrhenius factor `exp(-Ea/R (1/T - 1/T_ref))` at `t_k` (K).
    pub fn thermal_factor(&self, t_k: f64) -> f64 {
        if self.activation_energy_j_per_mol == 0.0 {
            1.0
        } else {
            (-self.activation_energy_j_per_mol / GAS_CONSTANT_J_PER_MOL_K
                * (1.0 / t_k - 1.0 / self.reference_temperature_k))
                .exp()
        }
    }

    /// `D` at moisture `x` with a precomputed [`Diffusivity::thermal_factor`].
    pub fn at_scaled(&self, x: f64, thermal: f64) -> f64 {
        let moisture = if self.moisture_coefficient == 0.0 {
            1.0
        } else {
            (self.moisture_coefficient * (x - self.reference_moisture)).exp()
        };
        self.reference_m2_per_s * thermal * moisture
    }

    /// `dD/dX` at (x, t_k), m^2/s per unit moisture.
    pub fn slope(&self, x: f64, t_k: f64) -> f64 {
        self.moisture_coefficient * self.at(x, t_k)
    }
}

/// Product temperature over time, for the temperature factor of [`Diffusivity`].
#[derive(Debug, Clone, PartialEq)]
pub enum ProductTemperature {
    /// Constant product temperature, K.
    Constant(f64),
    /// Piecewise-linear schedule of (time s, temperature K), times increasing;
    /// held constant outside the table.
    Schedule(Vec<(f64, f64)>),
}

impl ProductTemperature {
    /// Temperature in K at time `t_s`.
    pub fn at(&self, t_s: f64) -> f64 {
        match self {
            ProductTemperature::Constant(t) => *t,
            ProductTemperature::Schedule(points) => schedule_value(points, t_s),
        }
    }

    /// Check temperatures are positive and schedule times increase.
    pub fn validate(&self) -> Result<(), KineticsError> {
        match self {
            ProductTemperature::Constant(t) => positive("product temperature", *t).map(|_| ()),
            ProductTemperature::Schedule(points) => {
                if points.is_empty() {
                    return Err(KineticsError::TooFewPoints {
                        what: "a temperature schedule",
                        needed: 1,
                        found: 0,
                    });
                }
                for (i, pair) in points.windows(2).enumerate() {
                    if pair[1].0 <= pair[0].0 {
                        return Err(KineticsError::TimeNotIncreasing {
                            index: i + 1,
                            previous_s: pair[0].0,
                            time_s: pair[1].0,
                        });
                    }
                }
                points
                    .iter()
                    .try_for_each(|p| positive("product temperature", p.1).map(|_| ()))
            }
        }
    }
}

fn schedule_value(points: &[(f64, f64)], t_s: f64) -> f64 {
    match points.iter().position(|p| p.0 > t_s) {
        None => points.last().map_or(f64::NAN, |p| p.1),
        Some(0) => points[0].1,
        Some(i) => {
            let (t0, v0) = points[i - 1];
            let (t1, v1) = points[i];
            v0 + (v1 - v0) * (t_s - t0) / (t1 - t0)
        }
    }
}
