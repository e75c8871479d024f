//! The isotherm equations: equilibrium moisture content (dry basis, kg/kg) as a
//! function of water activity and temperature, one function per published model.
//!
//! Parameter vectors are in the order of [`IsothermKind::param_names`]. The
//! temperature enters in kelvin for GAB (Arrhenius-type terms) and the original
//! Henderson equation, and in degrees Celsius for the modified models, as they
//! were published (ASABE D245.6, *Moisture relationships of plant-based
//! agricultural products*). Moisture is a dry-basis fraction here; tables that
//! give moisture in % dry basis have different `A` (and `B`) values.

/// Gas constant, J/(mol K) (CODATA 2018, exact since the 2019 SI).
pub const GAS_CONSTANT: f64 = 8.314_462_618;

/// Molar mass of water, kg/mol (IAPWS).
pub const WATER_MOLAR_MASS: f64 = 0.018_015_268;

/// The published isotherm models.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub enum IsothermKind {
    /// Guggenheim-Anderson-de Boer, with Arrhenius-type `C(T)` and `K(T)`.
    Gab,
    /// Brunauer-Emmett-Teller (infinite layers).
    Bet,
    /// BET restricted to `n` layers.
    BetLayers,
    /// Oswin (isothermal).
    Oswin,
    /// Modified Oswin, linear temperature term.
    ModifiedOswin,
    /// Henderson (absolute temperature).
    Henderson,
    /// Modified Henderson (Thompson), `(T + B)` term.
    ModifiedHenderson,
    /// Modified Halsey (Iglesias & Chirife), `exp(A + B T)` term.
    ModifiedHalsey,
    /// Modified Chung-Pfost, `(T + B)` term.
    ModifiedChungPfost,
    /// Peleg's two-term power law (isothermal).
    Peleg,
    /// Smith (isothermal).
    Smith,
}

/// Every model, in the order used for documentation and comparison tables.
pub const ALL_KINDS: [IsothermKind; 11] = [
    IsothermKind::Gab,
    IsothermKind::Bet,
    IsothermKind::BetLayers,
    IsothermKind::Oswin,
    IsothermKind::ModifiedOswin,
    IsothermKind::Henderson,
    IsothermKind::ModifiedHenderson,
    IsothermKind::ModifiedHalsey,
    IsothermKind::ModifiedChungPfost,
    IsothermKind::Peleg,
    IsothermKind::Smith,
];

/// What a parameter must satisfy.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Sign {
    /// Strictly positive.
    Positive,
    /// At least one (the layer count of n-layer BET).
    AtLeastOne,
    /// Any finite number.
    Any,
}

impl IsothermKind {
    /// The model's name as written in the literature.
    pub fn name(self) -> &'static str {
        match self {
            IsothermKind::Gab => "GAB",
            IsothermKind::Bet => "BET",
            IsothermKind::BetLayers => "n-layer BET",
            IsothermKind::Oswin => "Oswin",
            IsothermKind::ModifiedOswin => "modified Oswin",
            IsothermKind::Henderson => "Henderson",
            IsothermKind::ModifiedHenderson => "modified Henderson",
            IsothermKind::ModifiedHalsey => "modified Halsey",
            IsothermKind::ModifiedChungPfost => "modified Chung-Pfost",
            IsothermKind::Peleg => "Peleg",
            IsothermKind::Smith => "Smith",
        }
    }

    /// Parameter names, in the order of parameter vectors.
    ///
    /// GAB: `Xm` (kg/kg), `C`, `K` at the reference temperature, `dHc`, `dHk`
    /// (J/mol, the Arrhenius-type heats of the `C` and `K` terms).
    pub fn param_names(self) -> &'static [&'static str] {
        match self {
            IsothermKind::Gab => &["Xm", "C", "K", "dHc", "dHk"],
            IsothermKind::Bet => &["Xm", "C"],
            IsothermKind::BetLayers => &["Xm", "C", "n"],
            IsothermKind::Oswin => &["A", "B"],
            IsothermKind::Henderson => &["k", "n"],
            IsothermKind::Peleg => &["A", "B", "C", "D"],
            IsothermKind::Smith => &["A", "B"],
            _ => &["A", "B", "C"],
        }
    }

    /// Unit text of each parameter, for docs and tables.
    pub fn param_units(self) -> &'static [&'static str] {
        match self {
            IsothermKind::Gab => &["kg/kg", "-", "-", "J/mol", "J/mol"],
            IsothermKind::Bet => &["kg/kg", "-"],
            IsothermKind::BetLayers => &["kg/kg", "-", "-"],
            IsothermKind::Oswin => &["kg/kg", "-"],
            IsothermKind::ModifiedOswin => &["kg/kg", "kg/kg/degC", "-"],
            IsothermKind::Henderson => &["1/K", "-"],
            IsothermKind::ModifiedHenderson => &["1/degC", "degC", "-"],
            IsothermKind::ModifiedHalsey => &["-", "1/degC", "-"],
            IsothermKind::ModifiedChungPfost => &["degC", "degC", "-"],
            IsothermKind::Peleg => &["kg/kg", "kg/kg", "-", "-"],
            IsothermKind::Smith => &["kg/kg", "kg/kg"],
        }
    }

    /// The sign each parameter must have.
    pub fn param_signs(self) -> &'static [Sign] {
        use Sign::{Any, AtLeastOne, Positive};
        match self {
            IsothermKind::Gab => &[Positive, Positive, Positive, Any, Any],
            IsothermKind::Bet => &[Positive, Positive],
            IsothermKind::BetLayers => &[Positive, Positive, AtLeastOne],
            IsothermKind::Oswin => &[Positive, Positive],
            IsothermKind::ModifiedOswin => &[Any, Any, Positive],
            IsothermKind::Henderson => &[Positive, Positive],
            IsothermKind::ModifiedHenderson => &[Positive, Any, Positive],
            IsothermKind::ModifiedHalsey => &[Any, Any, Positive],
            IsothermKind::ModifiedChungPfost => &[Positive, Any, Positive],
            IsothermKind::Peleg => &[Positive, Positive, Positive, Positive],
            IsothermKind::Smith => &[Any, Positive],
        }
    }

    /// Indices of the parameters that carry the temperature dependence; a fit
    /// to data at one temperature holds them at zero (no temperature effect)
    /// and marks the isotherm as valid at that temperature only.
    pub fn temperature_params(self) -> &'static [usize] {
        match self {
            IsothermKind::Gab => &[3, 4],
            IsothermKind::ModifiedOswin | IsothermKind::ModifiedHalsey => &[1],
            IsothermKind::ModifiedHenderson | IsothermKind::ModifiedChungPfost => &[1],
            _ => &[],
        }
    }

    /// Whether the model's equation contains temperature at all.
    pub fn has_temperature(self) -> bool {
        !self.temperature_params().is_empty() || self == IsothermKind::Henderson
    }

    /// Typical water-activity range over which the model is reported to fit
    /// (from memory of the sorption literature reviews; common practice).
    pub fn activity_range(self) -> (f64, f64) {
        match self {
            IsothermKind::Bet => (0.05, 0.45),
            IsothermKind::BetLayers => (0.05, 0.6),
            IsothermKind::Gab => (0.05, 0.9),
            IsothermKind::Smith => (0.3, 0.95),
            IsothermKind::ModifiedChungPfost => (0.2, 0.9),
            IsothermKind::Henderson | IsothermKind::ModifiedHenderson => (0.1, 0.9),
            IsothermKind::Peleg => (0.0, 0.95),
            _ => (0.05, 0.9),
        }
    }

    /// Equilibrium moisture (kg/kg dry basis) at activity `aw` and temperature
    /// `t_k` (kelvin), for parameters `p`, with `t_ref_k` the GAB reference
    /// temperature. May be non-finite or negative outside the model's range;
    /// the caller checks.
    pub fn moisture(self, p: &[f64], aw: f64, t_k: f64, t_ref_k: f64) -> f64 {
        let t_c = t_k - 273.15;
        match self {
            IsothermKind::Gab => gab(p, aw, t_k, t_ref_k),
            IsothermKind::Bet => bet(p[0], p[1], aw),
            IsothermKind::BetLayers => bet_layers(p[0], p[1], p[2], aw),
            IsothermKind::Oswin => p[0] * (aw / (1.0 - aw)).powf(p[1]),
            IsothermKind::ModifiedOswin => (p[0] + p[1] * t_c) * (aw / (1.0 - aw)).powf(1.0 / p[2]),
            IsothermKind::Henderson => (-(1.0 - aw).ln() / (p[0] * t_k)).powf(1.0 / p[1]),
            IsothermKind::ModifiedHenderson => {
                (-(1.0 - aw).ln() / (p[0] * (t_c + p[1]))).powf(1.0 / p[2])
            }
            IsothermKind::ModifiedHalsey => ((p[0] + p[1] * t_c).exp() / -aw.ln()).powf(1.0 / p[2]),
            IsothermKind::ModifiedChungPfost => -((t_c + p[1]) * -aw.ln() / p[0]).ln() / p[2],
            IsothermKind::Peleg => p[0] * aw.powf(p[2]) + p[1] * aw.powf(p[3]),
            IsothermKind::Smith => p[0] - p[1] * (1.0 - aw).ln(),
        }
    }
}

/// GAB constants at temperature `t_k`: `C = C_ref exp(dHc/R (1/T - 1/T_ref))`,
/// likewise `K`; returns `(C, K)`.
pub fn gab_constants(p: &[f64], t_k: f64, t_ref_k: f64) -> (f64, f64) {
    let arrhenius = |dh: f64| (dh / GAS_CONSTANT * (1.0 / t_k - 1.0 / t_ref_k)).exp();
    (p[1] * arrhenius(p[3]), p[2] * arrhenius(p[4]))
}

/// GAB: `X = Xm C K aw / ((1 - K aw)(1 - K aw + C K aw))`.
fn gab(p: &[f64], aw: f64, t_k: f64, t_ref_k: f64) -> f64 {
    let (c, k) = gab_constants(p, t_k, t_ref_k);
    let ka = k * aw;
    p[0] * c * ka / ((1.0 - ka) * (1.0 - ka + c * ka))
}

/// BET: `X = Xm C aw / ((1 - aw)(1 + (C - 1) aw))`.
fn bet(xm: f64, c: f64, aw: f64) -> f64 {
    xm * c * aw / ((1.0 - aw) * (1.0 + (c - 1.0) * aw))
}

/// n-layer BET:
/// `X = Xm C aw (1 - (n+1) aw^n + n aw^(n+1)) / ((1 - aw)(1 + (C-1) aw - C aw^(n+1)))`.
fn bet_layers(xm: f64, c: f64, n: f64, aw: f64) -> f64 {
    let an = aw.powf(n);
    let top = xm * c * aw * (1.0 - (n + 1.0) * an + n * an * aw);
    let bottom = (1.0 - aw) * (1.0 + (c - 1.0) * aw - c * an * aw);
    if bottom == 0.0 {
        // aw -> 1 limit: X -> Xm C n (n + 1) / (2 (1 + C n)) (L'Hopital twice).
        return xm * c * n * (n + 1.0) / (2.0 * (1.0 + c * n));
    }
    top / bottom
}

#[cfg(test)]
mod tests {
    use super::*;

    const T40: f64 = 313.15;

    /// Identity from the literature: GAB with K = 1 is the BET equation.
    #[test]
    fn gab_with_k_one_is_bet() {
        let gab_p = [0.07, 12.0, 1.0, 0.0, 0.0];
        for aw in [0.05, 0.2, 0.35, 0.5, 0.7, 0.9] {
            let g = IsothermKind::Gab.moisture(&gab_p, aw, T40, T40);
            let b = IsothermKind::Bet.moisture(&[0.07, 12.0], aw, T40, T40);
            assert!((g - b).abs() < 1e-14 * b, "aw {aw}: {g} vs {b}");
        }
    }

    /// Identity: the linearised BET form `aw/((1-aw) X) = 1/(Xm C) + (C-1)/(Xm C) aw`
    /// is a straight line in aw with that slope and intercept.
    #[test]
    fn bet_linearised_form_is_a_line() {
        let (xm, c) = (0.065, 18.0);
        for aw in [0.05, 0.15, 0.3, 0.45] {
            let x = IsothermKind::Bet.moisture(&[xm, c], aw, T40, T40);
            let lhs = aw / ((1.0 - aw) * x);
            let rhs = 1.0 / (xm * c) + (c - 1.0) / (xm * c) * aw;
            assert!((lhs - rhs).abs() < 1e-12 * rhs);
        }
    }

    /// n-layer BET tends to BET as n grows (the infinite-layer limit).
    #[test]
    fn bet_layers_tends_to_bet() {
        let b = IsothermKind::Bet.moisture(&[0.06, 10.0], 0.4, T40, T40);
        let n = IsothermKind::BetLayers.moisture(&[0.06, 10.0, 200.0], 0.4, T40, T40);
        assert!((b - n).abs() < 1e-12);
        // With one layer it is the Langmuir isotherm Xm C aw / (1 + C aw).
        let one = IsothermKind::BetLayers.moisture(&[0.06, 10.0, 1.0], 0.4, T40, T40);
        assert!((one - 0.06 * 10.0 * 0.4 / (1.0 + 4.0)).abs() < 1e-14);
    }

    /// Each closed form agrees with its own published implicit form.
    #[test]
    fn explicit_forms_satisfy_implicit_forms() {
        let (aw, t_c) = (0.6, 30.0);
        let t_k = t_c + 273.15;
        let x = IsothermKind::ModifiedHalsey.moisture(&[-2.0, -0.01, 1.8], aw, t_k, t_k);
        assert!((aw - (-(-2.0 - 0.01 * t_c).exp() / x.powf(1.8)).exp()).abs() < 1e-12);
        let x = IsothermKind::ModifiedHenderson.moisture(&[4e-4, 60.0, 2.0], aw, t_k, t_k);
        assert!((1.0 - aw - (-4e-4 * (t_c + 60.0) * x.powf(2.0)).exp()).abs() < 1e-12);
        let x = IsothermKind::ModifiedChungPfost.moisture(&[400.0, 50.0, 12.0], aw, t_k, t_k);
        assert!((aw - (-(400.0 / (t_c + 50.0)) * (-12.0 * x).exp()).exp()).abs() < 1e-12);
        let x = IsothermKind::Henderson.moisture(&[1e-3, 2.0], aw, t_k, t_k);
        assert!((1.0 - aw - (-1e-3 * t_k * x * x).exp()).abs() < 1e-12);
    }
}
