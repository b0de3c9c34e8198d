//! A year's metered quantities by meter and quarter, folded entry by entry: the quantity each
//! meter read (mass, or standard volume at its reference conditions), its CO2 fraction weighted
//! by it, how it was converted, and the CO2 it gave (and how much of it on an assumed fraction).

use crate::accounting::metering::assumed_fraction;
use crate::ledger::period::{Bucket, Grouping, apportion};
use crate::ledger::reading_fields::{FractionBasis, MeterType, ReadingError, checked};
use crate::ledger::{Entry, EntryKind};
use crate::quantity::Mass;
use std::collections::BTreeMap;

/// One meter's quarter.
#[derive(Debug, Default)]
pub struct MeterQuarter {
    pub site: String,
    pub kind: Option<EntryKind>,
    pub meter_type: String,
    pub conversion: String,
    pub readings: usize,
    /// Metered mass in grams (mass meters) or standard volume in m³ (volumetric).
    pub quantity: f64,
    /// Quantity × CO2 fraction, for the weighted mean concentration.
    pub weighted_fraction: f64,
    pub co2: Mass,
    /// The part of `co2` whose reading states no CO2 fraction (the default 1 assumed).
    pub assumed: Mass,
}

fn conversion(e: &Entry) -> String {
    match (checked(e.reading.meter_type()), e.reading.density_method()) {
        (Some(MeterType::Volumetric), Some("regulatory")) => {
            "volume × D (40 CFR 98.443) × CO2 vol. fraction".into()
        }
        (Some(MeterType::Volumetric), _) => "volume × ρ (Span–Wagner) × CO2 vol. fraction".into(),
        (_, _) if checked(e.reading.co2_basis()) == Some(FractionBasis::Mol) => {
            "mass × CO2 mass fraction (from mole fraction)".into()
        }
        _ => "mass × CO2 mass fraction".into(),
    }
}

/// The basis of an entry's CO2 fraction: as recorded, else as its meter type implies (an
/// imported mass reading's fraction is by mass, a volume's by mole).
fn basis(e: &Entry) -> &'static str {
    match (
        checked(e.reading.co2_basis()),
        checked(e.reading.meter_type()),
    ) {
        (Some(FractionBasis::Mol), _) | (None, Some(MeterType::Volumetric)) => "mole",
        _ => "mass",
    }
}

/// The unit of an entry's metered quantity: tonnes, or m³ at the reference conditions the
/// entry recorded (standard volumes are never bare).
fn unit(e: &Entry) -> String {
    match (
        checked(e.reading.meter_type()),
        e.reading.reference_conditions(),
    ) {
        (Some(MeterType::Volumetric), Some(c)) => format!("m³ at {c}"),
        (Some(MeterType::Volumetric), None) => "m³ (reference conditions not recorded)".into(),
        _ => "t".into(),
    }
}

/// The metered quantity of an entry: grams for a mass meter, m³ for a volumetric one; a stored
/// value that does not decode is the ledger's inconsistency, never a quantity of 0.
fn metered_quantity(e: &Entry) -> Result<Option<f64>, ReadingError> {
    let bad = |f| e.field_error(f);
    Ok(match e.reading.meter_type().map_err(bad)? {
        Some(MeterType::Mass) => e
            .reading
            .exact_grams("mass")
            .map_err(bad)?
            .map(|g| g.to_f64()),
        Some(MeterType::Volumetric) => e.reading.volume_m3().map_err(bad)?,
        None => None,
    })
}

/// A year's meter quarters, by meter, quarter, unit and basis: one row each, so no row mixes
/// unlike figures.
pub type MeterQuarters = BTreeMap<(String, Bucket, String, &'static str), MeterQuarter>;

/// Adds an effective entry's metered quantity to the rows of its meter's quarters in `year`.
pub fn add(rows: &mut MeterQuarters, e: &Entry, year: i32) -> Result<(), ReadingError> {
    let Some(q) = metered_quantity(e)? else {
        return Ok(());
    };
    let fraction: f64 = checked(e.reading.co2_fraction())
        .or(checked(e.reading.co2_fraction_mean()))
        .map_or(1.0, |f| f.to_f64());
    let meter = e.meter.clone().unwrap_or_else(|| match e.site.as_str() {
        "" => format!("({})", e.reading.pathway().unwrap_or("no site")),
        site => format!("({site})"),
    });
    let total_days = e.period.days() as f64;
    for (bucket, g) in apportion(e.mass.grams(), e.period, Grouping::Quarter) {
        if bucket.year != year {
            continue;
        }
        let days = (bucket.last_day().min(e.period.to) - e.period.from.max(bucket.first_day()))
            .num_days() as f64
            + 1.0;
        let share = q * days / total_days;
        let r = rows
            .entry((meter.clone(), bucket, unit(e), basis(e)))
            .or_default();
        r.site = e.site.clone();
        r.kind = Some(e.kind);
        r.meter_type = checked(e.reading.meter_type())
            .map_or("", MeterType::name)
            .to_string();
        let c = conversion(e);
        if r.conversion.is_empty() || r.conversion == c {
            r.conversion = c;
        } else {
            r.conversion = "mixed (see entries)".into();
        }
        r.readings += 1;
        r.quantity += share;
        r.weighted_fraction += share * fraction;
        r.co2 += Mass::from_grams(g);
        if assumed_fraction(&e.reading) {
            r.assumed += Mass::from_grams(g);
        }
    }
    Ok(())
}
