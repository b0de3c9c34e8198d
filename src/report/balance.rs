//! The tables of a geological mass balance: the balance by RR or ISO 27916 with its permit
//! notes, and the leakage events and reversals it lists one by one.

use super::names;
use super::render::tonnes_text;
use super::{Cell, Table, columns};
use crate::accounting::balance::BalanceLine;
use crate::ledger::{Entry, EntryKind, Project};

fn permit_cells(l: &BalanceLine) -> [Cell; 2] {
    [
        l.permit_used_pct.map_or(Cell::Empty, Cell::Percent),
        l.headroom.map_or(Cell::Empty, Cell::Tonnes),
    ]
}

pub fn rr_table(project: &Project, lines: &[BalanceLine], by: &str) -> Table {
    let mut t = Table::new(
        "balance",
        format!(
            "Mass balance (40 CFR 98.443) by {by}, project {}",
            project.code
        ),
        columns(&[
            names::PERIOD,
            names::RECEIVED_T,
            names::INJECTED_T,
            names::PRODUCED_T,
            names::SEPARATED_T.programs(),
            names::ENTRAINED_T.programs(),
            names::SURFACE_LEAKAGE_T,
            names::LEAKS_AND_VENTS_INJECTION_T,
            names::LEAKS_AND_VENTS_PRODUCTION_T,
            names::SEQUESTERED_T,
            names::SEQUESTERED_U_T,
            names::SEQUESTERED_U_PCT,
            names::EQUATION,
            names::CUMULATIVE_INJECTED_T.programs(),
            names::CUMULATIVE_SEQUESTERED_T,
            names::PERMIT_USED_PCT,
            names::HEADROOM_T,
            names::EMISSIONS_T,
        ]),
    );
    for l in lines {
        let x = &l.terms;
        let [used, headroom] = permit_cells(l);
        t.push(vec![
            Cell::text(l.bucket.to_string()),
            Cell::Tonnes(x.received()),
            Cell::Tonnes(x.injected),
            Cell::Tonnes(x.produced()),
            Cell::Tonnes(x.separated),
            Cell::Tonnes(x.entrained),
            Cell::Tonnes(x.surface_leakage),
            Cell::Tonnes(x.leaks_injection_side),
            Cell::Tonnes(x.leaks_production_side),
            Cell::Tonnes(l.stored),
            Cell::Tonnes(l.uncertainty.abs_u()),
            l.uncertainty.rel_u_pct().map_or(Cell::Empty, Cell::Percent),
            Cell::text(l.equation),
            Cell::Tonnes(l.cumulative_injected),
            Cell::Tonnes(l.cumulative_stored),
            used,
            headroom,
            Cell::Tonnes(x.emissions),
        ]);
    }
    t.note("RR-11: sequestered = injected − produced − surface leakage − leaks/vents on both sides, for a project that produces fluids (EOR), in every period; RR-12: injected − surface leakage − leaks/vents, for one that does not. Received = receipts − redeliveries (RR-1 to RR-3); produced = (1 + X) × CO2 separated (entrained fraction X), its ± (1 + X) × the separator's.");
    t
}

pub fn iso_table(project: &Project, lines: &[BalanceLine], by: &str) -> Table {
    let mut t = Table::new(
        "balance",
        format!("Mass balance (ISO 27916) by {by}, project {}", project.code),
        columns(&[
            names::PERIOD,
            names::INPUT_T,
            names::OPERATIONAL_LOSSES_T,
            names::LOSSES_FROM_EOR_COMPLEX_T,
            names::STORED_T,
            names::STORED_U_T,
            names::STORED_U_PCT,
            names::CUMULATIVE_STORED_T,
            names::RECYCLED_T,
            names::PERMIT_USED_PCT,
            names::HEADROOM_T,
            names::EMISSIONS_T,
        ]),
    );
    for l in lines {
        let x = &l.terms;
        let [used, headroom] = permit_cells(l);
        t.push(vec![
            Cell::text(l.bucket.to_string()),
            Cell::Tonnes(x.received()),
            Cell::Tonnes(x.operational_losses()),
            Cell::Tonnes(x.complex_losses()),
            Cell::Tonnes(l.stored),
            Cell::Tonnes(l.uncertainty.abs_u()),
            l.uncertainty.rel_u_pct().map_or(Cell::Empty, Cell::Percent),
            Cell::Tonnes(l.cumulative_stored),
            Cell::Tonnes(x.separated),
            used,
            headroom,
            Cell::Tonnes(x.emissions),
        ]);
    }
    t.note("Stored = input (receipts − redeliveries) − operational losses (leaks and vents) − losses from the EOR complex (surface leakage and CO2 entrained in produced fluids). CO2 separated and re-injected is recycled inside the complex and not counted again.");
    t
}

/// Flags a permit exceeded, whether by the figures or by a record made with --over-permit.
pub fn permit_notes(t: &mut Table, project: &Project, lines: &[BalanceLine], over_permit: &[u64]) {
    match (project.permit_capacity, lines.last()) {
        (Some(cap), Some(last)) if last.cumulative_stored > cap => t.note(format!(
            "PERMIT EXCEEDED: cumulative stored {} t is above the permitted capacity {} t.",
            tonnes_text(last.cumulative_stored),
            tonnes_text(cap)
        )),
        (Some(cap), _) => t.note(format!(
            "Permitted capacity {} t{}.",
            tonnes_text(cap),
            project
                .permit_ref
                .as_deref()
                .map(|r| format!(" under permit {r}"))
                .unwrap_or_default()
        )),
        (None, _) => t.note("No permitted capacity registered for this project."),
    }
    if let Some(max) = project.permit_annual {
        for y in lines
            .iter()
            .map(|l| l.bucket.year)
            .collect::<std::collections::BTreeSet<_>>()
        {
            let injected: crate::quantity::Mass = lines
                .iter()
                .filter(|l| l.bucket.year == y)
                .map(|l| l.terms.injected)
                .sum();
            if injected > max {
                t.note(format!(
                    "PERMIT EXCEEDED: injection in {y} was {} t, above the annual maximum {} t.",
                    tonnes_text(injected),
                    tonnes_text(max)
                ));
            }
        }
    }
    let over: Vec<String> = over_permit.iter().map(u64::to_string).collect();
    if !over.is_empty() {
        t.note(format!(
            "Recorded over the permit (--over-permit): seq {}.",
            over.join(", ")
        ));
    }
}

/// Surface leakage by pathway, each event with how it was quantified.
pub fn leakage_table<'a>(
    project: &Project,
    entries: impl Iterator<Item = &'a Entry>,
) -> Option<Table> {
    let mut t = Table::new(
        "leakage",
        format!("Surface leakage by pathway, project {}", project.code),
        columns(&[
            names::PATHWAY,
            names::SITE,
            names::PERIOD,
            names::QUANTIFIED_BY,
            names::CO2_T,
            names::SEQ,
        ]),
    );
    let mut leaks: Vec<&Entry> = entries.filter(|e| e.kind == EntryKind::Leakage).collect();
    leaks.sort_by(|a, b| (a.reading.pathway(), a.period).cmp(&(b.reading.pathway(), b.period)));
    for e in &leaks {
        // A rate per hour runs 24 h a day; a rate per day counts its days alone.
        let rate = e.reading.text("rate").map(|r| match r.ends_with("/h") {
            true => format!("{r} × 24 h × {} d", e.period.days()),
            false => format!("{r} × {} d", e.period.days()),
        });
        let how = match (rate, e.reading.text("backdated_to_survey")) {
            (Some(r), Some(s)) => format!("{r}, start backdated to the no-leak survey of {s}"),
            (Some(r), None) => r,
            (None, _) => "metered".to_string(),
        };
        t.push(vec![
            Cell::opt_text(e.reading.pathway()),
            Cell::text(&e.site),
            Cell::text(e.period.to_string()),
            Cell::text(how),
            Cell::Tonnes(e.mass),
            Cell::Int(e.seq as i64),
        ]);
    }
    (!leaks.is_empty()).then_some(t)
}

/// Each reversal with where the CO2 left: the site, the pathway, or both (a pathway such as a
/// fault or a legacy well need not be a site of the project).
pub fn reversals_table<'a>(
    project: &Project,
    entries: impl Iterator<Item = &'a Entry>,
) -> Option<Table> {
    let mut t = Table::new(
        "reversals",
        format!("Reversals, project {}", project.code),
        columns(&[
            names::PATHWAY,
            names::SITE,
            names::DATE,
            names::CO2_T,
            names::REASON,
            names::SEQ,
        ]),
    );
    for e in entries.filter(|e| e.kind == EntryKind::Reversal) {
        t.push(vec![
            Cell::opt_text(e.reading.pathway()),
            Cell::text(&e.site),
            Cell::text(e.period.from.to_string()),
            Cell::Tonnes(e.mass),
            Cell::opt_text(e.reason.as_deref()),
            Cell::Int(e.seq as i64),
        ]);
    }
    (!t.rows.is_empty()).then_some(t)
}
