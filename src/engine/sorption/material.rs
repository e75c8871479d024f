//! Materials: what the dryer designer needs to know about a product.

use uom::si::f64::{Length, MassDensity, SpecificHeatCapacity, ThermodynamicTemperature};
use uom::si::length::millimeter;
use uom::si::mass_density::kilogram_per_cubic_meter;
use uom::si::specific_heat_capacity::joule_per_kilogram_kelvin;
use uom::si::thermodynamic_temperature::{degree_celsius, kelvin};

use super::{Isotherm, IsothermKind, SorptionError};

/// The shape that governs internal moisture diffusion.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum Geometry {
    /// A slab dried from one or both faces; `thickness` is the full thickness.
    Slab { thickness: Length },
    /// A sphere (granules, grains, pellets).
    Sphere { diameter: Length },
    /// A long cylinder (extrudates, noodles).
    Cylinder { diameter: Length },
}

impl Geometry {
    /// The shape's name.
    pub fn shape(&self) -> &'static str {
        match self {
            Geometry::Slab { .. } => "slab",
            Geometry::Sphere { .. } => "sphere",
            Geometry::Cylinder { .. } => "cylinder",
        }
    }

    /// The characteristic size: thickness of a slab, diameter otherwise.
    pub fn size(&self) -> Length {
        match *self {
            Geometry::Slab { thickness } => thickness,
            Geometry::Sphere { diameter } | Geometry::Cylinder { diameter } => diameter,
        }
    }
}

/// A product to be dried.
#[derive(Clone, Debug, PartialEq)]
pub struct Material {
    pub name: String,
    pub isotherm: Isotherm,
    /// Density of the dry solid matter itself (no pores).
    pub solid_density: MassDensity,
    /// Bulk density of the dry product as loaded (kg dry solid per m^3 of bed).
    pub bulk_density: MassDensity,
    /// Specific heat of the dry solid.
    pub cp_solid: SpecificHeatCapacity,
    /// Specific heat of the water held in the product.
    pub cp_water: SpecificHeatCapacity,
    pub geometry: Geometry,
    /// Critical moisture content (kg/kg dry basis), the end of constant-rate drying, if known.
    pub critical_moisture_db: Option<f64>,
    /// Highest product temperature allowed (quality, safety); designs above it are warned about.
    pub max_product_temperature: Option<ThermodynamicTemperature>,
    pub notes: String,
    pub source: String,
}

impl Material {
    /// Check a material's numbers: densities and specific heats positive,
    /// bulk density not above the solid density, geometry size positive,
    /// critical moisture non-negative.
    pub fn validate(&self) -> Result<(), SorptionError> {
        let bad = |text: String| {
            Err(SorptionError::BadData(format!(
                "material {}: {text}",
                self.name
            )))
        };
        let solid = self.solid_density.get::<kilogram_per_cubic_meter>();
        let bulk = self.bulk_density.get::<kilogram_per_cubic_meter>();
        if !(is_positive(solid) && is_positive(bulk)) {
            return bad(format!(
                "densities must be positive (solid {solid} kg/m^3, bulk {bulk} kg/m^3)"
            ));
        }
        if bulk > solid {
            return bad(format!(
                "bulk density {bulk} kg/m^3 exceeds the solid density {solid} kg/m^3"
            ));
        }
        let cps = [self.cp_solid, self.cp_water].map(|c| c.get::<joule_per_kilogram_kelvin>());
        if cps.iter().any(|&c| !is_positive(c)) {
            return bad(format!(
                "specific heats must be positive ({} and {} J/(kg K))",
                cps[0], cps[1]
            ));
        }
        if !is_positive(self.geometry.size().value) {
            return bad("the geometry size must be positive".into());
        }
        if self
            .critical_moisture_db
            .is_some_and(|x| x.is_nan() || x < 0.0)
        {
            return bad("the critical moisture content must be zero or positive".into());
        }
        Ok(())
    }

    /// Specific heat of the moist product per kg of dry solid,
    /// `cp_s + X cp_w` (common practice: the water and solid heat capacities add).
    pub fn cp_moist_per_kg_dry(&self, x_db: f64) -> SpecificHeatCapacity {
        self.cp_solid + self.cp_water * x_db
    }

    /// A warning when `t` exceeds the material's maximum product temperature.
    pub fn temperature_warning(&self, t: ThermodynamicTemperature) -> Option<String> {
        let limit = self.max_product_temperature?;
        (t.get::<kelvin>() > limit.get::<kelvin>()).then(|| {
            format!(
                "product temperature {:.1} degC exceeds the maximum {:.1} degC set for {}",
                t.get::<degree_celsius>(),
                limit.get::<degree_celsius>(),
                self.name
            )
        })
    }
}

/// Demo materials. EVERY NUMBER HERE IS INVENTED for examples and tests: the
/// isotherm parameters are of a typical size for such products but describe
/// no real product. Do not design with them.
pub fn demo_materials() -> Vec<Material> {
    vec![fruit_slices(), grain(), clay_granules()]
}

/// True for a number above zero (false for NaN).
fn is_positive(v: f64) -> bool {
    v > 0.0
}

fn celsius(t: f64) -> ThermodynamicTemperature {
    ThermodynamicTemperature::new::<kelvin>(t + 273.15)
}

fn density(v: f64) -> MassDensity {
    MassDensity::new::<kilogram_per_cubic_meter>(v)
}

fn cp(v: f64) -> SpecificHeatCapacity {
    SpecificHeatCapacity::new::<joule_per_kilogram_kelvin>(v)
}

const INVENTED: &str = "invented demo data; describes no real product";

fn built(kind: IsothermKind, params: &[f64], t_ref_c: f64) -> Isotherm {
    match Isotherm::new(kind, params, celsius(t_ref_c)) {
        Ok(iso) => iso,
        Err(e) => unreachable!("demo isotherm parameters are checked by tests: {e}"),
    }
}

fn fruit_slices() -> Material {
    Material {
        name: "demo_fruit_slices".into(),
        isotherm: built(IsothermKind::Gab, &[0.11, 3.5, 0.95, 6_000.0, 800.0], 40.0),
        solid_density: density(1_550.0),
        bulk_density: density(180.0),
        cp_solid: cp(1_500.0),
        cp_water: cp(4_180.0),
        geometry: Geometry::Slab {
            thickness: Length::new::<millimeter>(5.0),
        },
        critical_moisture_db: Some(3.0),
        max_product_temperature: Some(celsius(70.0)),
        notes: "sugary fruit slices on trays; browns above 70 degC (invented)".into(),
        source: INVENTED.into(),
    }
}

fn grain() -> Material {
    Material {
        name: "demo_grain".into(),
        isotherm: built(IsothermKind::ModifiedHenderson, &[0.035, 60.0, 1.9], 25.0),
        solid_density: density(1_400.0),
        bulk_density: density(720.0),
        cp_solid: cp(1_600.0),
        cp_water: cp(4_180.0),
        geometry: Geometry::Sphere {
            diameter: Length::new::<millimeter>(4.0),
        },
        critical_moisture_db: None,
        max_product_temperature: Some(celsius(60.0)),
        notes: "cereal-like kernels in a deep bed (invented)".into(),
        source: INVENTED.into(),
    }
}

fn clay_granules() -> Material {
    Material {
        name: "demo_clay_granules".into(),
        isotherm: built(IsothermKind::Oswin, &[0.012, 0.45], 25.0),
        solid_density: density(2_600.0),
        bulk_density: density(1_100.0),
        cp_solid: cp(850.0),
        cp_water: cp(4_180.0),
        geometry: Geometry::Sphere {
            diameter: Length::new::<millimeter>(2.0),
        },
        critical_moisture_db: Some(0.12),
        max_product_temperature: None,
        notes: "mineral granules, weakly hygroscopic (invented)".into(),
        source: INVENTED.into(),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn demo_materials_are_valid_and_marked_invented() {
        for m in demo_materials() {
            m.validate().unwrap();
            assert!(m.source.contains("invented"));
            assert!(m.isotherm.equilibrium_moisture(0.5, celsius(40.0)).is_ok());
        }
    }

    #[test]
    fn bad_material_numbers_are_errors() {
        let mut m = grain();
        m.bulk_density = density(2_000.0);
        assert!(m
            .validate()
            .unwrap_err()
            .to_string()
            .contains("exceeds the solid density"));
    }

    #[test]
    fn hot_product_warns() {
        let m = fruit_slices();
        assert!(m.temperature_warning(celsius(65.0)).is_none());
        assert!(m
            .temperature_warning(celsius(75.0))
            .unwrap()
            .contains("exceeds the maximum 70.0 degC"));
    }
}
