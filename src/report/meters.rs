//! The meters table: each meter's quarter of a year, as the per-meter figures a report files.

use super::names;
use super::{Cell, Report, Table, columns};
use crate::accounting::meter_quarters::MeterQuarters;
use crate::import::overlap::HandCorrection;
use crate::quantity::Mass;
use chrono::Datelike;

/// The meters report of a year: its table, and a warning for each correction by hand of an
/// imported meter-day of the year (it no longer equals the file's readings).
pub fn report(project: &str, year: i32, rows: &MeterQuarters, hand: &[HandCorrection]) -> Report {
    let mut report = Report::default().table(table(project, year, rows));
    report.warnings = (hand.iter())
        .filter(|h| h.day.year() == year)
        .map(|h| h.to_string())
        .collect();
    report
}

/// The table of a year's meter quarters, with what rests on an assumed fraction noted.
pub fn table(project: &str, year: i32, rows: &MeterQuarters) -> Table {
    let mut t = Table::new(
        "meters",
        format!("Meters by quarter, {}, project {}", year, project),
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
    for ((meter, bucket, unit, basis), r) in rows {
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
        t.note(assumed_note(assumed, year));
    }
    t
}

/// What a verifier looks for first in a meter's figures: tonnes no measured concentration
/// stands behind.
pub fn assumed_note(assumed: Mass, span: impl std::fmt::Display) -> String {
    format!(
        "ASSUMED CONCENTRATION: {} t of CO2 in {span} rest on a CO2 fraction of 1 that no reading stated (recorded without --co2-fraction, or before sinkbook noted whether it was given); state the stream's analysis with `correct SEQ --co2-fraction F`.",
        crate::report::render::tonnes_text(assumed)
    )
}
