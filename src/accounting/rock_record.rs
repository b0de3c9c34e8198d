//! The readings of the rock routes' field and laboratory records — a tracer sample, a
//! carbonation batch, a soil core — built from the values given, each checked as the reports
//! will read it back. A refusal names the value ([`Given`]), its text and why; the caller says
//! which option that is.

use crate::accounting::carbonation::{Carbonation, uptake};
use crate::accounting::input::InputError;
use crate::accounting::project_view::evidence;
use crate::accounting::tracer::{Mineralized, TracerError, mineralized_fraction};
use crate::accounting::weathering::composition::{SoilAnalysis, Unit};
use crate::ledger::{Reading, Site, SiteKind, bounds};
use crate::quantity::area::Area;
use crate::quantity::fraction::parse_uncertainty;
use crate::quantity::measure::{DENSITY, parse_depth, parse_measure};
use crate::quantity::share::{pairs, share};
use crate::quantity::{Decimal, Mass, MassReading};

/// A value of a rock record.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Given {
    TracerRatio,
    DicSample,
    DicBackground,
    DicInjectate,
    DicUnit,
    FedMass,
    Co2Before,
    Co2After,
    Uncertainty,
    Depth,
    BulkDensity,
    ConcUnit,
    Conc,
}

/// Why a record's values make no reading.
#[derive(Debug, Clone, PartialEq)]
pub enum RecordError {
    /// A value does not read, or breaks a rule.
    Value {
        given: Given,
        text: String,
        why: String,
    },
    /// A check on a figure no single value holds.
    Check(InputError),
    /// The reading built does not read back: a fault, not the input's.
    Unreadable(String),
}

type Result<T> = std::result::Result<T, RecordError>;

fn value(given: Given, text: &str, why: impl ToString) -> RecordError {
    RecordError::Value {
        given,
        text: text.into(),
        why: why.to_string(),
    }
}

fn number(given: Given, text: &str) -> Result<Decimal> {
    Decimal::parse(text.trim()).map_err(|e| value(given, text, e))
}

fn fraction(given: Given, text: &str) -> Result<Decimal> {
    share(text).map_err(|(v, why)| value(given, &v, why))
}

/// A check's refusal told as the value it rests on: `values` maps the check's field names to
/// the value and its text.
fn refused(e: InputError, values: &[(&str, Given, &str)]) -> RecordError {
    match values.iter().find(|(field, ..)| *field == e.field) {
        Some((_, given, text)) => value(*given, text, format!("must be {}", e.rule)),
        None => RecordError::Check(e),
    }
}

/// The units a DIC may be reported in; the mass balance is a ratio, so any one unit will do
/// as long as all three concentrations share it.
const DIC_UNITS: &[&str] = &["mmol/kg", "mmol/L", "umol/kg", "µmol/kg", "mol/kg", "mg/L"];

/// A tracer sample as typed: X, the three DICs and their unit.
#[derive(Debug, Clone, Copy)]
pub struct TracerTexts<'a> {
    pub tracer_ratio: &'a str,
    pub dic_sample: &'a str,
    pub dic_background: &'a str,
    pub dic_injectate: &'a str,
    pub unit: &'a str,
}

/// A tracer sample's reading and its mineralized fraction, computed now to refuse impossible
/// input (and again by every report from the reading).
pub fn tracer_sample(t: &TracerTexts<'_>) -> Result<(Reading, Mineralized)> {
    let x = number(Given::TracerRatio, t.tracer_ratio)?;
    let [sample, background, injectate] = [
        (Given::DicSample, t.dic_sample),
        (Given::DicBackground, t.dic_background),
        (Given::DicInjectate, t.dic_injectate),
    ]
    .map(|(given, text)| number(given, text));
    let (sample, background, injectate) = (sample?, background?, injectate?);
    if !DIC_UNITS.contains(&t.unit) {
        return Err(value(
            Given::DicUnit,
            t.unit,
            format!("is not a DIC unit (use {})", DIC_UNITS.join(", ")),
        ));
    }
    let mut reading = Reading::default();
    reading.push("tracer_ratio", x.to_string());
    reading.push("dic_sample", sample.to_string());
    reading.push("dic_background", background.to_string());
    reading.push("dic_injectate", injectate.to_string());
    reading.push("dic_unit", t.unit);
    let decoded =
        evidence::tracer_sample(&reading).map_err(|e| RecordError::Unreadable(e.to_string()))?;
    let found = mineralized_fraction(&decoded).map_err(|e| match e {
        TracerError::Input(e) => refused(
            e,
            &[
                ("tracer_sample", Given::TracerRatio, t.tracer_ratio),
                (
                    "tracer_sample/tracer_injectate",
                    Given::TracerRatio,
                    t.tracer_ratio,
                ),
                ("dic_sample", Given::DicSample, t.dic_sample),
                ("dic_background", Given::DicBackground, t.dic_background),
                ("dic_injectate", Given::DicInjectate, t.dic_injectate),
            ],
        ),
        other => value(Given::TracerRatio, t.tracer_ratio, other),
    })?;
    Ok((reading, found))
}

/// A carbonation batch as typed: the solid fed, its CO2 before and after, the uncertainty.
#[derive(Debug, Clone, Copy)]
pub struct CarbonationTexts<'a> {
    pub mass: &'a str,
    pub co2_before: &'a str,
    pub co2_after: &'a str,
    pub uncertainty: Option<&'a str>,
}

/// A carbonation batch's reading (no finding yet) and its uptake; `period` is read after the
/// batch's own values and before the uptake is computed.
pub fn carbonation<P, E: From<RecordError>>(
    t: &CarbonationTexts<'_>,
    period: impl FnOnce() -> std::result::Result<P, E>,
) -> std::result::Result<(Reading, Carbonation, P), E> {
    let fed = MassReading::parse(t.mass).map_err(|e| value(Given::FedMass, t.mass, e))?;
    let fed_g = fed
        .to_mass()
        .map_err(|e| value(Given::FedMass, t.mass, e))?;
    bounds::grams(fed_g).map_err(|e| value(Given::FedMass, t.mass, e))?;
    let before = fraction(Given::Co2Before, t.co2_before)?;
    let after = fraction(Given::Co2After, t.co2_after)?;
    let u = t
        .uncertainty
        .map(|u| parse_uncertainty(u).map_err(|e| value(Given::Uncertainty, u, e)))
        .transpose()?;
    let period = period()?;
    let result = uptake(fed_g.tonnes(), before.to_f64(), after.to_f64()).map_err(|e| {
        refused(
            e,
            &[
                ("fed_t", Given::FedMass, t.mass),
                ("w_before", Given::Co2Before, t.co2_before),
                ("w_after", Given::Co2After, t.co2_after),
                ("uptake_g", Given::FedMass, t.mass),
            ],
        )
    })?;
    let mut reading = Reading::default();
    reading.push("fed_mass", fed.to_string());
    reading.push("co2_before", before.to_string());
    reading.push("co2_after", after.to_string());
    reading.push("basis", "dry");
    if let Some(u) = u {
        reading.push("uncertainty", u.to_string());
    }
    reading.push(
        "method",
        "uptake = M(w_after − w_before)/(1 − w_after), CO2-free solid conserved",
    );
    Ok((reading, result, period))
}

/// No soil is denser than its minerals; quartz, the densest common one, is 2.65 t/m³
/// (common practice).
const MAX_SOIL_DENSITY_KG_M3: f64 = 2650.0;

/// A soil core as typed: depth interval, bulk density, the elements and their unit.
#[derive(Debug, Clone, Copy)]
pub struct SoilTexts<'a> {
    pub depth: &'a str,
    pub bulk_density: &'a str,
    pub unit: &'a str,
    pub conc: &'a str,
    pub baseline: bool,
}

/// A soil core's reading: its depth, bulk density and elements, checked.
pub fn soil_sample(t: &SoilTexts<'_>) -> Result<Reading> {
    let (depth, _) = parse_depth(t.depth).map_err(|why| value(Given::Depth, t.depth, why))?;
    let rho = parse_measure(t.bulk_density, DENSITY, true)
        .map_err(|why| value(Given::BulkDensity, t.bulk_density, why))?;
    if rho.base > MAX_SOIL_DENSITY_KG_M3 {
        return Err(value(
            Given::BulkDensity,
            t.bulk_density,
            "must be at most 2.65 t/m3, the density of quartz: no soil is denser",
        ));
    }
    let unit = Unit::from_name(t.unit).ok_or_else(|| {
        value(
            Given::ConcUnit,
            t.unit,
            "is not a concentration unit (use mol/kg, mg/kg or wt%)",
        )
    })?;
    let conc = pairs(t.conc).map_err(|why| value(Given::Conc, t.conc, why))?;
    let values: Vec<(String, f64)> = conc.iter().map(|(n, v)| (n.clone(), v.to_f64())).collect();
    SoilAnalysis::new(&values, unit).map_err(|e| value(Given::Conc, t.conc, e))?;
    let mut reading = Reading::default();
    reading.push("depth", depth);
    reading.push("bulk_density", rho.to_string());
    reading.push("conc_unit", unit.name());
    for (n, v) in &conc {
        reading.push(n, v.to_string());
    }
    if t.baseline {
        reading.push("baseline", "yes");
    }
    Ok(reading)
}

/// Why a field's registered area gives no application rate.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum AreaError {
    /// The field was registered without an area.
    Missing,
    /// The area registered does not read.
    Unreadable(String),
}

/// A field's registered area; `None` for a site that is not a field.
pub fn field_area(site: &Site) -> std::result::Result<Option<Area>, AreaError> {
    if site.kind != SiteKind::Field {
        return Ok(None);
    }
    let text = site.area.as_deref().ok_or(AreaError::Missing)?;
    Area::parse(text).map(Some).map_err(AreaError::Unreadable)
}

/// A spreading's reading: the feedstock, the rock's mass as given and, on a field, the
/// application rate over the field's registered area.
pub fn application(
    feedstock: &str,
    (rock, rock_g): (&MassReading, Mass),
    site: &Site,
) -> std::result::Result<Reading, AreaError> {
    let area = field_area(site)?.map(|a| a.m2());
    let mut reading = Reading::default();
    reading.push("feedstock", feedstock);
    reading.push("mass", rock.to_string());
    if let Some(m2) = area {
        reading.push("rate", format!("{:.2} t/ha", rock_g.tonnes() / (m2 / 1e4)));
    }
    Ok(reading)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn refusals_name_the_value_not_an_option() {
        let soil = SoilTexts {
            depth: "0-30 cm",
            bulk_density: "2.8 t/m3",
            unit: "mol/kg",
            conc: "Ca=0.1,Ti=0.09",
            baseline: false,
        };
        assert!(matches!(
            soil_sample(&soil),
            Err(RecordError::Value { given: Given::BulkDensity, ref text, .. }) if text == "2.8 t/m3"
        ));
        let tracer = TracerTexts {
            tracer_ratio: "0.5",
            dic_sample: "3",
            dic_background: "1",
            dic_injectate: "10",
            unit: "ppm",
        };
        assert!(matches!(
            tracer_sample(&tracer),
            Err(RecordError::Value {
                given: Given::DicUnit,
                ..
            })
        ));
    }

    #[test]
    fn a_spreading_on_a_field_records_its_rate() {
        let rock = MassReading::parse("625 t").unwrap();
        let g = rock.to_mass().unwrap();
        let mut site = Site {
            project: "EVW".into(),
            code: "EV-F1".into(),
            kind: SiteKind::Field,
            area: Some("12.5 ha".into()),
            uncertainty: None,
            registered_at: chrono::DateTime::UNIX_EPOCH,
        };
        let r = application("EVB-1", (&rock, g), &site).unwrap();
        assert_eq!(r.0.last(), Some(&("rate".into(), "50.00 t/ha".into())));
        site.area = Some("12.5 acres of it".into());
        assert!(matches!(
            application("EVB-1", (&rock, g), &site),
            Err(AreaError::Unreadable(_))
        ));
        site.area = None;
        let missing = application("EVB-1", (&rock, g), &site);
        assert_eq!(missing, Err(AreaError::Missing));
        site.kind = SiteKind::Plant;
        assert_eq!(application("EVB-1", (&rock, g), &site).unwrap().0.len(), 2);
    }

    #[test]
    fn a_baseline_core_is_flagged_in_its_reading() {
        let soil = SoilTexts {
            depth: "0-30 cm",
            bulk_density: "1.3 t/m3",
            unit: "mol/kg",
            conc: "Ca=0.1,Mg=0.08,Na=0.05,K=0.06,Ti=0.09",
            baseline: true,
        };
        let r = soil_sample(&soil).unwrap();
        assert_eq!(r.0.first(), Some(&("depth".into(), "0-30 cm".into())));
        assert_eq!(r.0.last(), Some(&("baseline".into(), "yes".into())));
    }
}
