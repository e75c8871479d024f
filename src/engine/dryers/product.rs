//! How a product dries under local air: the shared exchange between a product
//! surface and a stream of air passing it once.

use std::fmt;
use std::sync::Arc;

use uom::si::available_energy::joule_per_kilogram;
use uom::si::f64::AvailableEnergy;

use super::{non_negative, positive, DryerError};
use crate::engine::air::saturation::saturated_vapour_pressure;
use crate::engine::air::thermo::{liquid_enthalpy, vapour_enthalpy, EPSILON};
use crate::engine::air::{AirError, AirState};
use crate::engine::solve::{brent, Tolerance};

/// 0 degC in kelvin, the reference temperature of product enthalpies.
pub const T_REF_K: f64 = 273.15;

/// Equilibrium moisture content of the product, dry basis.
#[derive(Clone)]
pub enum Equilibrium {
    /// A fixed value, for quick estimates.
    Constant(f64),
    /// A function of air temperature (K) and relative humidity (0..1), for
    /// example a fitted isotherm.
    Curve(Arc<dyn Fn(f64, f64) -> f64 + Send + Sync>),
}

impl fmt::Debug for Equilibrium {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Equilibrium::Constant(x) => write!(f, "Constant({x})"),
            Equilibrium::Curve(_) => f.write_str("Curve(..)"),
        }
    }
}

/// Shape of the falling-rate period as a fraction of the constant rate.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum FallingRate {
    /// Rate proportional to free moisture: `f = (X - X*) / (Xc - X*)`.
    Linear,
    /// `f = ((X - X*) / (Xc - X*))^n`, n > 0.
    Power(f64),
}

/// A product as the dryer models need it.
#[derive(Clone, Debug)]
pub struct Product {
    /// Specific heat of the dry solid, J/(kg K).
    pub cp_solid_j_per_kg_k: f64,
    /// Critical moisture content, dry basis: the constant-rate period ends here.
    pub x_critical_db: f64,
    pub equilibrium: Equilibrium,
    pub falling: FallingRate,
    /// Maximum product temperature, K, if the product declares one.
    pub t_max_k: Option<f64>,
}

impl Product {
    /// Check the product's parameters.
    pub fn validate(&self) -> Result<(), DryerError> {
        positive("cp_solid", self.cp_solid_j_per_kg_k)?;
        non_negative("x_critical", self.x_critical_db)?;
        if let Equilibrium::Constant(x) = self.equilibrium {
            non_negative("x_equilibrium", x)?;
        }
        if let FallingRate::Power(n) = self.falling {
            positive("falling-rate exponent", n)?;
        }
        Ok(())
    }

    /// Equilibrium moisture in air `air`, dry basis.
    pub fn equilibrium_db(&self, air: &AirState) -> f64 {
        match &self.equilibrium {
            Equilibrium::Constant(x) => *x,
            Equilibrium::Curve(f) => f(air.t_kelvin(), air.relative_humidity()).max(0.0),
        }
    }

    /// Fraction of the constant rate at moisture `x` in air `air` (1 above Xc, 0 at X*).
    pub fn rate_fraction(&self, x_db: f64, air: &AirState) -> f64 {
        let x_eq = self.equilibrium_db(air);
        if x_db >= self.x_critical_db {
            return 1.0;
        }
        let span = self.x_critical_db - x_eq;
        if span <= 0.0 || x_db <= x_eq {
            return 0.0;
        }
        let free = ((x_db - x_eq) / span).clamp(0.0, 1.0);
        match self.falling {
            FallingRate::Linear => free,
            FallingRate::Power(n) => free.powf(n),
        }
    }

    /// Enthalpy of product per kg dry solid, J/kg (liquid water and solid at 0 degC are zero).
    pub fn enthalpy_j_per_kg(&self, x_db: f64, t_k: f64) -> f64 {
        self.cp_solid_j_per_kg_k * (t_k - T_REF_K) + x_db * liquid_enthalpy(t_k)
    }

    /// Product temperature with enthalpy `h` (J/kg dry solid) at moisture `x`, by Newton's method.
    pub fn temperature_k(
        &self,
        x_db: f64,
        h_j_per_kg: f64,
        guess_k: f64,
    ) -> Result<f64, DryerError> {
        let mut t = guess_k;
        for _ in 0..50 {
            let f = self.enthalpy_j_per_kg(x_db, t) - h_j_per_kg;
            let slope = self.cp_solid_j_per_kg_k
                + x_db * (liquid_enthalpy(t + 0.5) - liquid_enthalpy(t - 0.5));
            let step = f / slope;
            t -= step;
            if step.abs() < 1e-10 {
                return Ok(t);
            }
        }
        Err(DryerError::NotConverged {
            what: "product temperature from enthalpy",
            detail: format!("h = {h_j_per_kg} J/kg"),
        })
    }
}

/// Heat and mass transfer coefficients of a product surface.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Surface {
    /// Heat transfer coefficient, W/(m^2 K).
    pub h_w_per_m2_k: f64,
    /// Lewis number of the air, thermal diffusivity over vapour diffusivity (about 0.85 for air-water vapour).
    pub lewis: f64,
}

/// What passed between the product and the air.
#[derive(Clone, Copy, Debug)]
pub struct Exchange {
    /// Heat from the air to the product, W.
    pub heat_w: f64,
    /// Water evaporated from the product, kg/s.
    pub water_kg_per_s: f64,
    /// Enthalpy of that water as vapour at the product temperature, J/kg.
    pub vapour_j_per_kg: f64,
    /// Latent heat at the product temperature, J/kg.
    pub latent_j_per_kg: f64,
    /// Air after passing the product.
    pub air_out: AirState,
    /// Water that condensed from the air (fog) and settled on the product, kg/s;
    /// already netted out of `water_kg_per_s`.
    pub condensed_kg_per_s: f64,
}

/// Saturation humidity ratio over a wet surface at `t_k` and total pressure `p_pa`
/// (capped just below the total pressure at and above the boiling point).
pub fn surface_humidity_ratio(t_k: f64, p_pa: f64) -> f64 {
    let pv = saturated_vapour_pressure(t_k, p_pa).min(0.99 * p_pa);
    EPSILON * pv / (p_pa - pv)
}

/// Temperature of a fully wet surface in air `air`, K: the root of
/// `h (T - Tw) = k_y (w_s(Tw) - w) (h_v(Tw) - h_l(Tw))` with `k_y = h / (c_s Le^(2/3))`,
/// so it depends on the Lewis number only (Chilton-Colburn).
pub fn wet_surface_k(air: &AirState, lewis: f64) -> Result<f64, DryerError> {
    let t = air.t_kelvin();
    let w = air.humidity_ratio();
    let p = air.p_pascal();
    let cs = air.humid_heat().value;
    let ratio = 1.0 / (cs * lewis.powf(2.0 / 3.0));
    let residual = |tw: f64| {
        let ws = surface_humidity_ratio(tw, p);
        let latent = vapour_enthalpy(tw, 0.0) - liquid_enthalpy(tw);
        (t - tw) - ratio * (ws - w) * latent
    };
    let lo = air.dew_point().map(|d| d.value).unwrap_or(t - 100.0).min(t) - 1e-9;
    if residual(t) >= 0.0 {
        return Ok(t);
    }
    brent(residual, lo, t, Tolerance::new(1e-10, 1e-12)).map_err(|e| DryerError::NotConverged {
        what: "wet-surface temperature",
        detail: e.to_string(),
    })
}

/// Exchange between a product (moisture `x_db`, temperature `t_k`) with area `area_m2`
/// and air `air_in` flowing past it at `dry_air_kg_per_s`.
///
/// Heat: `q = m c_s (T_in - Ts)(1 - exp(-h A / (m c_s)))`.
/// Water: `e = f(X) m (w_s(Td) - w_in)(1 - exp(-k_y A / m))` with `k_y = h / (c_s Le^(2/3))`
/// and `Td = min(Ts, Tw)`: a product colder than the wet-surface temperature `Tw`
/// dries more slowly (preheat), a wet product dries at the constant rate, and below
/// the critical moisture the rate is `f(X)` times the constant rate, as the
/// falling-rate law says, while the product warms towards the air.
/// The air leaves with `w_in + e/m` and enthalpy `h_in + (e h_v(Ts) - q)/m`, so
/// energy and water are conserved exactly.
pub fn exchange(
    product: &Product,
    x_db: f64,
    t_k: f64,
    air_in: &AirState,
    dry_air_kg_per_s: f64,
    area_m2: f64,
    surface: Surface,
) -> Result<Exchange, DryerError> {
    let m = dry_air_kg_per_s;
    let cs = air_in.humid_heat().value;
    let ntu_h = surface.h_w_per_m2_k * area_m2 / (m * cs);
    let heat_w = m * cs * (air_in.t_kelvin() - t_k) * (-(-ntu_h).exp_m1());
    let k_y = surface.h_w_per_m2_k / (cs * surface.lewis.powf(2.0 / 3.0));
    let f = product.rate_fraction(x_db, air_in);
    let ntu_m = k_y * area_m2 / m;
    let p = air_in.p_pascal();
    let t_drive = t_k.min(wet_surface_k(air_in, surface.lewis)?);
    let ws = surface_humidity_ratio(t_drive, p);
    let water = f * m * (ws - air_in.humidity_ratio()) * (-(-ntu_m).exp_m1());
    let hv = vapour_enthalpy(t_k, 0.0);
    let w_out = air_in.humidity_ratio() + water / m;
    let h_out = air_in.enthalpy().value + (water * hv - heat_w) / m;
    let air_out = AirState::from_enthalpy_and_w(
        AvailableEnergy::new::<joule_per_kilogram>(h_out),
        w_out,
        air_in.pressure(),
    );
    let exchange = Exchange {
        heat_w,
        water_kg_per_s: water,
        vapour_j_per_kg: hv,
        latent_j_per_kg: hv - liquid_enthalpy(t_k),
        air_out: *air_in,
        condensed_kg_per_s: 0.0,
    };
    match air_out {
        Ok(air_out) => Ok(Exchange {
            air_out,
            ..exchange
        }),
        Err(AirError::HumidityRatioAboveSaturation { .. }) => {
            condense(exchange, air_in, m, h_out, w_out, t_k)
        }
        Err(e) => Err(saturation_error(e, air_in)),
    }
}

/// Air that would leave above saturation (cold product downstream in a deep bed,
/// or air cooled by a cold feed) forms fog: it leaves saturated at the temperature
/// where its enthalpy, with the condensate as liquid, is `h_out`, and the
/// condensate settles on the product. Energy and water stay conserved: the
/// product takes the condensate with its liquid enthalpy.
fn condense(
    ex: Exchange,
    air_in: &AirState,
    m: f64,
    h_out: f64,
    w_out: f64,
    t_k: f64,
) -> Result<Exchange, DryerError> {
    let p = air_in.pressure();
    let saturated = |t: f64| {
        AirState::from_rh(
            uom::si::f64::ThermodynamicTemperature::new::<uom::si::thermodynamic_temperature::kelvin>(
                t,
            ),
            1.0,
            p,
        )
    };
    let residual = |t: f64| match saturated(t) {
        Ok(s) => s.enthalpy().value + (w_out - s.humidity_ratio()) * liquid_enthalpy(t) - h_out,
        Err(_) => f64::NAN,
    };
    let hi = air_in.t_kelvin().max(t_k) + 1.0;
    let lo = (air_in.t_kelvin().min(t_k) - 60.0).max(T_REF_K + 0.01);
    let t = brent(residual, lo, hi, Tolerance::new(1e-10, 1e-12)).map_err(|e| {
        DryerError::AirSaturates {
            what: format!(
                "air at {:.1} degC leaves above saturation and its fog temperature was not found ({e}); raise the air flow or its temperature",
                air_in.t_kelvin() - T_REF_K
            ),
        }
    })?;
    let air_out = saturated(t).map_err(|e| saturation_error(e, air_in))?;
    let condensed = m * (w_out - air_out.humidity_ratio()).max(0.0);
    Ok(Exchange {
        heat_w: ex.heat_w - condensed * (ex.vapour_j_per_kg - liquid_enthalpy(t)),
        water_kg_per_s: ex.water_kg_per_s - condensed,
        air_out,
        condensed_kg_per_s: condensed,
        ..ex
    })
}

fn saturation_error(e: AirError, air_in: &AirState) -> DryerError {
    match e {
        AirError::HumidityRatioAboveSaturation { .. } => DryerError::AirSaturates {
            what: format!(
                "air at {:.1} degC would leave above saturation; raise the air flow or its temperature",
                air_in.t_kelvin() - T_REF_K
            ),
        },
        other => DryerError::Air(other),
    }
}
