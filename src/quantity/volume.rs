//! Standard gas volumes, always with their reference conditions, and their mass of CO2 by the
//! Span–Wagner density at those conditions or by the regulatory density of 40 CFR 98.443.

use super::conditions::{ATM_PA, PA_PER_PSI, atmosphere, parse_pressure, parse_temperature};
use super::decimal::Decimal;
use super::mass::split_number_unit;
use std::fmt;
use uom::si::pressure::pascal;
use uom::si::thermodynamic_temperature::kelvin;

/// 1 ft³ in m³, exact (NIST SP 811, Appendix B).
pub const M3_PER_FT3: f64 = 0.028316846592;
/// 40 CFR 98.443: density of CO2, 0.0018682 t per standard m³ at 60 °F and 1 atm (read).
pub const REGULATORY_DENSITY_KG_PER_M3: f64 = 1.8682;

/// Where a volume is measured: temperature and absolute pressure.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ReferenceConditions {
    pub temperature_k: f64,
    pub pressure_pa: f64,
}

impl ReferenceConditions {
    /// 60 °F and 14.696 psia: the default for standard cubic feet.
    pub fn scf_default() -> Self {
        Self {
            temperature_k: (60.0 - 32.0) * 5.0 / 9.0 + 273.15,
            pressure_pa: 14.696 * PA_PER_PSI,
        }
    }

    /// 15 °C and 101.325 kPa (standard cubic metre).
    pub fn sm3() -> Self {
        Self {
            temperature_k: 288.15,
            pressure_pa: ATM_PA,
        }
    }

    /// 0 °C and 101.325 kPa (normal cubic metre).
    pub fn nm3() -> Self {
        Self {
            temperature_k: 273.15,
            pressure_pa: ATM_PA,
        }
    }

    /// Whether these are the conditions of the regulatory density, 60 °F and 1 atm (14.696 psia,
    /// the customary rounding of 1 atm, is within the 1e-5 allowed).
    pub fn is_regulatory(self) -> bool {
        let t = Self::scf_default().temperature_k;
        (self.temperature_k - t).abs() < 1e-6 && ((self.pressure_pa - ATM_PA) / ATM_PA).abs() < 1e-5
    }
}

impl fmt::Display for ReferenceConditions {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(
            f,
            "{:.3} K, {:.3} kPa",
            self.temperature_k,
            self.pressure_pa / 1e3
        )
    }
}

/// The volume units, each with its size in m³ and its default reference conditions.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum VolumeUnit {
    Scf,
    Mscf,
    MMscf,
    Sm3,
    Nm3,
    /// Cubic metres at conditions that must be stated.
    M3,
}

impl VolumeUnit {
    const ALL: [VolumeUnit; 6] = [
        Self::Scf,
        Self::Mscf,
        Self::MMscf,
        Self::Sm3,
        Self::Nm3,
        Self::M3,
    ];

    pub fn symbol(self) -> &'static str {
        match self {
            Self::Scf => "scf",
            Self::Mscf => "Mscf",
            Self::MMscf => "MMscf",
            Self::Sm3 => "Sm3",
            Self::Nm3 => "Nm3",
            Self::M3 => "m3",
        }
    }

    pub fn from_symbol(s: &str) -> Option<Self> {
        Self::ALL.into_iter().find(|u| u.symbol() == s)
    }

    pub fn m3_per_unit(self) -> f64 {
        match self {
            Self::Scf => M3_PER_FT3,
            Self::Mscf => 1e3 * M3_PER_FT3,
            Self::MMscf => 1e6 * M3_PER_FT3,
            Self::Sm3 | Self::Nm3 | Self::M3 => 1.0,
        }
    }

    fn default_conditions(self) -> Option<ReferenceConditions> {
        match self {
            Self::Scf | Self::Mscf | Self::MMscf => Some(ReferenceConditions::scf_default()),
            Self::Sm3 => Some(ReferenceConditions::sm3()),
            Self::Nm3 => Some(ReferenceConditions::nm3()),
            Self::M3 => None,
        }
    }
}

/// The spellings accepted, for help and errors.
pub const VOLUME_UNITS_HELP: &str = "scf, Mscf, MMscf (60 °F, 14.696 psia), Sm3 (15 °C, 101.325 kPa), Nm3 (0 °C, 101.325 kPa), m3@T,p";

/// Why a volume was refused.
#[derive(Debug, Clone, PartialEq)]
pub enum VolumeError {
    Number(String),
    UnknownUnit(String),
    NeedsConditions,
    Conditions(String),
    NotPositive,
    RegulatoryNeedsStandard(ReferenceConditions),
    Density(crate::eos::EosError),
}

impl fmt::Display for VolumeError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Self::Number(e) => write!(f, "{e}"),
            Self::UnknownUnit(u) => write!(f, "unknown volume unit {u:?} (use {VOLUME_UNITS_HELP})"),
            Self::NeedsConditions => f.write_str(
                "a volume of gas needs its reference conditions: write e.g. 1200 m3@15C,101.325kPa, or use Sm3, Nm3 or scf",
            ),
            Self::Conditions(e) => write!(f, "reference conditions: {e}"),
            Self::NotPositive => f.write_str("must be greater than zero"),
            Self::RegulatoryNeedsStandard(c) => write!(
                f,
                "the regulatory density (40 CFR 98.443) is for volumes at 60 °F and 1 atm; this volume is at {c}"
            ),
            Self::Density(e) => write!(f, "{e}"),
        }
    }
}

/// A gas volume as written, with the conditions it was measured at.
#[derive(Debug, Clone, PartialEq)]
pub struct StandardVolume {
    pub number: Decimal,
    pub unit: VolumeUnit,
    pub conditions: ReferenceConditions,
    /// The conditions as the user wrote them, if they did.
    pub conditions_text: Option<String>,
}

/// How a volume becomes a mass.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum DensityMethod {
    /// Span–Wagner (1996) density at the volume's reference conditions.
    Eos,
    /// D = 0.0018682 t/m³ at 60 °F and 1 atm, 40 CFR 98.443.
    Regulatory,
}

impl DensityMethod {
    pub fn name(self) -> &'static str {
        match self {
            Self::Eos => "eos",
            Self::Regulatory => "regulatory",
        }
    }

    /// The method and its source, as outputs name it.
    pub fn source(self) -> &'static str {
        match self {
            Self::Eos => "Span & Wagner (1996) equation of state",
            Self::Regulatory => "40 CFR 98.443, D = 0.0018682 t/m³ at 60 °F, 1 atm",
        }
    }
}

/// A volume's mass with the density that produced it.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct VolumeMass {
    pub m3: f64,
    pub density_kg_per_m3: f64,
    pub kg: f64,
}

impl StandardVolume {
    /// Parses `2.5 MMscf`, `2.5 MMscf@60F,14.73psia`, `1200 m3@15C,101.325kPa`.
    pub fn parse(text: &str) -> Result<Self, VolumeError> {
        let (quantity, conditions_text) = match text.split_once('@') {
            Some((q, c)) => (q, Some(c.trim().to_string())),
            None => (text, None),
        };
        let (n, u) = split_number_unit(quantity);
        let number = Decimal::parse(n).map_err(|e| VolumeError::Number(e.to_string()))?;
        let unit = VolumeUnit::from_symbol(u).ok_or_else(|| VolumeError::UnknownUnit(u.into()))?;
        if !number.is_positive() {
            return Err(VolumeError::NotPositive);
        }
        let conditions = match &conditions_text {
            Some(c) => parse_conditions(c)?,
            None => unit
                .default_conditions()
                .ok_or(VolumeError::NeedsConditions)?,
        };
        Ok(Self {
            number,
            unit,
            conditions,
            conditions_text,
        })
    }

    pub fn m3(&self) -> f64 {
        self.number.to_f64() * self.unit.m3_per_unit()
    }

    /// The mass of CO2 in the volume (pure CO2; apply the stream's CO2 fraction afterwards).
    pub fn mass(&self, method: DensityMethod) -> Result<VolumeMass, VolumeError> {
        let density = match method {
            DensityMethod::Regulatory if self.conditions.is_regulatory() => {
                REGULATORY_DENSITY_KG_PER_M3
            }
            DensityMethod::Regulatory => {
                return Err(VolumeError::RegulatoryNeedsStandard(self.conditions));
            }
            DensityMethod::Eos => {
                crate::eos::density(self.conditions.temperature_k, self.conditions.pressure_pa)
                    .map_err(VolumeError::Density)?
                    .density_kg_per_m3
            }
        };
        let m3 = self.m3();
        Ok(VolumeMass {
            m3,
            density_kg_per_m3: density,
            kg: m3 * density,
        })
    }
}

impl fmt::Display for StandardVolume {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "{} {}", self.number, self.unit.symbol())?;
        if let Some(c) = &self.conditions_text {
            write!(f, "@{c}")?;
        }
        Ok(())
    }
}

/// `60F,14.73psia` → conditions; temperature first, then absolute pressure.
fn parse_conditions(text: &str) -> Result<ReferenceConditions, VolumeError> {
    let (t, p) = text.split_once(',').ok_or_else(|| {
        VolumeError::Conditions(format!(
            "{text:?}: write temperature,pressure (e.g. 60F,14.73psia)"
        ))
    })?;
    let t = parse_temperature(t)
        .map_err(|e| VolumeError::Conditions(format!("temperature {t:?}: {e}")))?;
    let p = parse_pressure(p, atmosphere())
        .map_err(|e| VolumeError::Conditions(format!("pressure {p:?}: {e}")))?;
    Ok(ReferenceConditions {
        temperature_k: t.get::<kelvin>(),
        pressure_pa: p.get::<pascal>(),
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn one_tonne_is_18_903_mscf_by_the_regulatory_density() {
        // 1 t CO2 at 60 °F, 1 atm = 18.903 Mscf — computed from D = 0.0018682 t/m³ (REFERENCES.md,
        // 40 CFR 98.443 read) and 1 ft³ = 0.028316846592 m³ (NIST SP 811, read).
        let v = StandardVolume::parse("18.903 Mscf").unwrap();
        let m = v.mass(DensityMethod::Regulatory).unwrap();
        assert!((m.kg - 1000.0).abs() < 0.02, "{}", m.kg);
        let mscf_per_t = 1000.0 / REGULATORY_DENSITY_KG_PER_M3 / M3_PER_FT3 / 1e3;
        assert!((mscf_per_t - 18.903).abs() < 5e-4, "{mscf_per_t}");
    }

    #[test]
    fn conditions_are_parsed_and_required() {
        let v = StandardVolume::parse("2.5 MMscf@60F,14.73psia").unwrap();
        assert!((v.conditions.pressure_pa - 14.73 * PA_PER_PSI).abs() < 1e-6);
        assert!(!v.conditions.is_regulatory());
        assert!(matches!(
            v.mass(DensityMethod::Regulatory),
            Err(VolumeError::RegulatoryNeedsStandard(_))
        ));
        assert_eq!(
            StandardVolume::parse("1200 m3"),
            Err(VolumeError::NeedsConditions)
        );
        let m3 = StandardVolume::parse("1200 m3@15C,101.325kPa").unwrap();
        assert_eq!(m3.conditions, ReferenceConditions::sm3());
        assert!(
            StandardVolume::parse("5 scf")
                .unwrap()
                .conditions
                .is_regulatory()
        );
        assert!(matches!(
            StandardVolume::parse("5 gal"),
            Err(VolumeError::UnknownUnit(_))
        ));
        assert!(matches!(
            StandardVolume::parse("5 scf@60F"),
            Err(VolumeError::Conditions(_))
        ));
        assert_eq!(
            StandardVolume::parse("0 scf"),
            Err(VolumeError::NotPositive)
        );
    }

    #[test]
    fn eos_density_at_standard_conditions() {
        // 15 °C, 101.325 kPa → 1.8718 kg/m³ — computed with the Span–Wagner equation (REFERENCES.md).
        let m = StandardVolume::parse("1000 Sm3")
            .unwrap()
            .mass(DensityMethod::Eos)
            .unwrap();
        assert!(
            (m.density_kg_per_m3 / 1.8718 - 1.0).abs() < 1e-4,
            "{}",
            m.density_kg_per_m3
        );
        // 60 °F, 1 atm → 1.8682 kg/m³, the same figure as the regulatory D — computed (REFERENCES.md).
        let s = StandardVolume::parse("1 scf")
            .unwrap()
            .mass(DensityMethod::Eos)
            .unwrap();
        assert!(
            (s.density_kg_per_m3 / 1.8682 - 1.0).abs() < 1e-4,
            "{}",
            s.density_kg_per_m3
        );
    }

    proptest::proptest! {
        #[test]
        fn never_panics(s in "\\PC{0,40}") {
            if let Ok(v) = StandardVolume::parse(&s) {
                let _ = v.mass(DensityMethod::Eos);
            }
        }
    }
}
