//! `meters`: for each meter and quarter of a year, the quantity read, its CO2 concentration,
//! the meter type and how it was converted — the per-meter figures a report files.

use super::Context;
use super::setup::known_project;
use crate::accounting::metering::assumed_fraction;
use crate::error::{Error, Result};
use crate::import::overlap::HandCorrection;
use crate::ledger::period::{Bucket, Grouping, apportion};
use crate::ledger::{Entry, EntryKind};
use crate::quantity::{Mass, MassReading};
use crate::report::names;
use crate::report::{Cell, Report, Table, columns};
use crate::store::Tx;
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
    match (e.reading.get("meter_type"), e.reading.get("density_method")) {
        (Some("volumetric"), Some("regulatory")) => {
            "volume × D (40 CFR 98.443) × CO2 vol. fraction".into()
        }
        (Some("volumetric"), _) => "volume × ρ (Span–Wagner) × CO2 vol. fraction".into(),
        (_, _) if e.reading.get("co2_basis") == Some("mol") => {
            "mass × CO2 mass fraction (from mole fraction)".into()
        }
        _ => "mass × CO2 mass fraction".into(),
    }
}

/// The basis of an entry's CO2 fraction: as recorded, else as its meter type implies (an
/// imported mass reading's fraction is by mass, a volume's by mole).
fn basis(e: &Entry) -> &'static str {
    match (e.reading.get("co2_basis"), e.reading.get("meter_type")) {
        (Some("mol"), _) | (None, Some("volumetric")) => "mole",
        _ => "mass",
    }
}

/// The unit of an entry's metered quantity: tonnes, or m³ at the reference conditions the
/// entry recorded (standard volumes are never bare).
fn unit(e: &Entry) -> String {
    match (
        e.reading.get("meter_type"),
        e.reading.get("reference_conditions"),
    ) {
        (Some("volumetric"), Some(c)) => format!("m³ at {c}"),
        (Some("volumetric"), None) => "m³ (reference conditions not recorded)".into(),
        _ => "t".into(),
    }
}

/// The metered quantity of an entry: grams for a mass meter, m³ for a volumetric one.
fn metered_quantity(e: &Entry) -> Option<f64> {
    match e.reading.get("meter_type")? {
        "mass" => MassReading::parse(e.reading.get("mass")?)
            .ok()?
            .grams_exact()
            .ok()
            .map(|g| g.to_f64()),
        "volumetric" => e.reading.get("volume_m3")?.parse().ok(),
        _ => None,
    }
}

/// The rows of the table, by meter, quarter, unit and basis.
type Rows = BTreeMap<(String, Bucket, String, &'static str), Row>;

/// Adds an effective entry's metered quantity to the rows of its meter's quarters in `year`.
fn add_row(rows: &mut Rows, e: &Entry, year: i32) {
    let Some(q) = metered_quantity(e) else {
        return;
    };
    let fraction: f64 = e
        .reading
        .get("co2_fraction")
        .or(e.reading.get("co2_fraction_mean"))
        .and_then(|f| f.parse().ok())
        .unwrap_or(1.0);
    let meter = e.meter.clone().unwrap_or_else(|| match e.site.as_str() {
        "" => format!("({})", e.reading.get("pathway").unwrap_or("no site")),
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
        r.meter_type = e.reading.get("meter_type").unwrap_or("").to_string();
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

/// The effective entries that correct an imported meter-day by hand (`by_hand`: those
/// without a file that correct something), each line walked back by seq to the entry that
/// came from a file.
fn hand_corrections(
    tx: &mut Tx<'_>,
    project: &str,
    by_hand: Vec<Entry>,
) -> Result<Vec<HandCorrection>> {
    let mut found = Vec::new();
    for e in by_hand {
        let mut at = e.corrects;
        while let Some(seq) = at {
            let Some(t) = tx.entry_at(project, seq)? else {
                break;
            };
            if let Some(ev) = &t.entry.evidence {
                found.push(HandCorrection {
                    seq: e.seq,
                    meter: e.meter.clone().unwrap_or_default(),
                    day: e.period.from,
                    imported_seq: t.entry.seq,
                    file: ev.file_name.clone(),
                });
                break;
            }
            at = t.entry.corrects;
        }
    }
    Ok(found)
}

pub fn meters(ctx: &Context, a: MetersArgs) -> Result<Report> {
    if !(1900..=9999).contains(&a.year) {
        return Err(Error::field(
            "--year",
            &a.year.to_string(),
            "is not a plausible reporting year",
        ));
    }
    // A row is one meter's quarter in one unit and one basis, so no cell mixes unlike figures.
    let mut rows: Rows = BTreeMap::new();
    let hand = ctx.open()?.read(|tx| {
        known_project(tx, &a.project)?;
        let mut by_hand = Vec::new();
        tx.for_each_effective_entry(&a.project, None, |s| {
            let e = &s.entry;
            if e.evidence.is_none() && e.corrects.is_some() {
                by_hand.push(e.clone());
            }
            add_row(&mut rows, e, a.year);
            Ok(())
        })?;
        hand_corrections(tx, &a.project, by_hand)
    })?;
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
    report.warnings = hand
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
