//! `meters`: for each meter and quarter of a year, the quantity read, its CO2 concentration,
//! the meter type and how it was converted — the per-meter figures a report files.

use super::Context;
use super::setup::known_project;
use crate::accounting::metering::assumed_fraction;
use crate::error::{Error, Result};
use crate::import::overlap::hand_corrections;
use crate::ledger::correction::effective;
use crate::ledger::period::{Bucket, Grouping, apportion};
use crate::ledger::reading_fields::{FractionBasis, MeterType, checked};
use crate::ledger::{Entry, EntryKind};
use crate::quantity::Mass;
use crate::report::names;
use crate::report::{Cell, Report, Table, columns};
use chrono::Datelike;
use clap::Args;
use std::collections::BTreeMap;

#[derive(Debug, Args)]
pub struct MetersArgs {
    /// Project code (e.g. TFS)
    pub project: String,
    /// The reporting year
    #[arg(long)]
    pub year: i32,
}

/// One meter's quarter.
#[derive(Default)]
struct Row {
    site: String,
    kind: Option<EntryKind>,
    meter_type: String,
    conversion: String,
    readings: usize,
    /// Metered mass in grams (mass meters) or standard volume in m³ (volumetric).
    quantity: f64,
    /// Quantity × CO2 fraction, for the weighted mean concentration.
    weighted_fraction: f64,
    co2: Mass,
    /// The part of `co2` whose reading states no CO2 fraction (the default 1 assumed).
    assumed: Mass,
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

/// The metered quantity of an entry: grams for a mass meter, m³ for a volumetric one.
fn metered_quantity(e: &Entry) -> Result<Option<f64>> {
    let bad = |f| Error::from(e.field_error(f));
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

pub fn meters(ctx: &Context, a: MetersArgs) -> Result<Report> {
    if !(1900..=9999).contains(&a.year) {
        return Err(Error::field(
            "--year",
            &a.year.to_string(),
            "is not a plausible reporting year",
        ));
    }
    let all = ctx.open()?.read(|tx| {
        known_project(tx, &a.project)?;
        tx.entries(&a.project)
    })?;
    // A row is one meter's quarter in one unit and one basis, so no cell mixes unlike figures.
    let mut rows: BTreeMap<(String, Bucket, String, &str), Row> = BTreeMap::new();
    for e in effective(&all) {
        let Some(q) = metered_quantity(e)? else {
            continue;
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
            if bucket.year != a.year {
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
    }
    let mut t = Table::new(
        "meters",
        format!("Meters by quarter, {}, project {}", a.year, a.project),
        columns(&[
            names::METER,
            names::SITE,
            names::KIND,
            names::QUARTER,
            names::METER_TYPE,
            names::ENTRIES,
            names::QUANTITY_READ,
            names::UNIT,
            names::CO2_FRACTION_MEAN,
            names::CO2_BASIS,
            names::CONVERSION,
            names::CO2_T,
            names::CO2_ON_AN_ASSUMED_FRACTION_T,
        ]),
    );
    let mut assumed = Mass::ZERO;
    for ((meter, bucket, unit, basis), r) in &rows {
        let quantity = if r.meter_type == "volumetric" {
            r.quantity
        } else {
            r.quantity / 1e6
        };
        t.push(vec![
            Cell::text(meter),
            Cell::text(&r.site),
            Cell::text(r.kind.map_or("", |k| k.name())),
            Cell::text(bucket.to_string()),
            Cell::text(&r.meter_type),
            Cell::Int(r.readings as i64),
            Cell::Number(quantity, 3),
            Cell::text(unit),
            Cell::Number(
                if r.quantity > 0.0 {
                    r.weighted_fraction / r.quantity
                } else {
                    0.0
                },
                4,
            ),
            Cell::text(*basis),
            Cell::text(&r.conversion),
            Cell::Tonnes(r.co2),
            Cell::Tonnes(r.assumed),
        ]);
        assumed += r.assumed;
    }
    t.note("Quantity read is the meter's own figure (mass, or standard volume at the reading's reference conditions); the mean CO2 fraction is weighted by it, by mass or by mole as the basis says (a meter read on both bases has a row for each). Entries spanning quarters are split by days.");
    if assumed.is_positive() {
        t.note(assumed_note(assumed, a.year));
    }
    let mut report = Report::default().table(t);
    report.warnings = hand_corrections(&all, effective(&all))
        .into_iter()
        .filter(|h| h.day.year() == a.year)
        .map(|h| h.to_string())
        .collect();
    Ok(report)
}

/// What a verifier looks for first in a meter's figures: tonnes no measured concentration
/// stands behind.
pub(super) fn assumed_note(assumed: Mass, span: impl std::fmt::Display) -> String {
    format!(
        "ASSUMED CONCENTRATION: {} t of CO2 in {span} rest on a CO2 fraction of 1 that no reading stated (recorded without --co2-fraction, or before sinkbook noted whether it was given); state the stream's analysis with `correct SEQ --co2-fraction F`.",
        crate::report::render::tonnes_text(assumed)
    )
}
