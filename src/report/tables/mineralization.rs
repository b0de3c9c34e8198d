//! The tables of the mineralization routes: tracer samples, campaigns, the injected CO2 split by
//! period, and the balance of an ex-situ (carbonation) project.

use crate::accounting::project_view::{
    CampaignRead, ProjectFigures, SampleRead, kept_total, mineralization_total,
};
use crate::accounting::tracer::{CampaignStatistics, Mineralized, OutOfRange};
use crate::error::Result;
use crate::ledger::period::Grouping;
use crate::quantity::Mass;
use crate::quantity::mass::round_half_even_f64;
use crate::report::names;
use crate::report::{Cell, Report, Table, columns};

pub fn grouping_name(g: Grouping) -> &'static str {
    match g {
        Grouping::Month => "month",
        Grouping::Quarter => "quarter",
        Grouping::Year => "year",
    }
}

/// `balance` of a basalt-mineralization project: the period table, injected CO2 split by the
/// evidence.
pub fn balance(figures: &ProjectFigures, grouping: Grouping) -> Result<Report> {
    Ok(Report::default().table(period_table(figures, grouping)?))
}

pub fn samples_table(figures: &ProjectFigures) -> Table {
    let project = figures.project();
    let mut t = Table::new(
        "tracer_samples",
        format!("Tracer samples, project {}", project.code),
        columns(&[
            names::DATE,
            names::WELL,
            names::TRACER_RATIO,
            names::DIC_SAMPLE,
            names::DIC_BACKGROUND,
            names::DIC_INJECTATE,
            names::DIC_UNIT,
            names::MINERALIZED_FRACTION,
            names::FINDING,
            names::SEQ,
        ]),
    );
    let mut samples: Vec<&SampleRead> = figures.samples().iter().collect();
    samples.sort_by(|a, b| {
        (a.entry.period.from, &a.entry.site).cmp(&(b.entry.period.from, &b.entry.site))
    });
    let mut reasons = std::collections::BTreeSet::new();
    for s in samples {
        let (e, r) = (&s.entry, &s.entry.reading);
        let (f, finding) = match &s.found {
            Ok(Mineralized::Fraction { f, .. }) => (Cell::Number(*f, 4), Cell::Empty),
            Ok(Mineralized::OutOfRange { f, why }) => {
                reasons.insert(why.to_string());
                (Cell::Number(*f, 4), Cell::text(short_finding(*why)))
            }
            Err(e) => (Cell::Empty, Cell::text(e.to_string())),
        };
        t.push(vec![
            Cell::text(e.period.from.to_string()),
            Cell::text(&e.site),
            Cell::opt_text(r.text("tracer_ratio")),
            Cell::opt_text(r.text("dic_sample")),
            Cell::opt_text(r.text("dic_background")),
            Cell::opt_text(r.text("dic_injectate")),
            Cell::opt_text(r.text("dic_unit")),
            f,
            finding,
            Cell::Int(e.seq as i64),
        ]);
    }
    t.note("f = 1 − (DIC_sample − (1 − X)·DIC_background) / (X·DIC_injectate), X = tracer in the sample over tracer in the injectate (tracer mass balance, the structure of Matter et al. 2016, Science 352:1312). Values outside [0, 1] are kept as computed, never clamped.");
    for r in reasons {
        t.note(format!("Outside [0, 1]: {r}."));
    }
    t
}

/// The finding of a sample outside the mixing model, in a few words.
fn short_finding(why: OutOfRange) -> &'static str {
    match why {
        OutOfRange::MoreCarbonThanMixing => "f < 0: more DIC than mixing supplies",
        OutOfRange::LessCarbonThanBackground => "f > 1: less DIC than background",
    }
}

pub fn campaigns_table(figures: &ProjectFigures) -> Table {
    let (project, campaigns) = (figures.project(), figures.tracer_campaigns());
    let mut t = Table::new(
        "campaigns",
        format!("Tracer campaigns, project {}", project.code),
        columns(&[
            names::DATE,
            names::WELLS,
            names::MINERALIZED_FRACTION_MEAN,
            names::MINERALIZED_FRACTION_SD,
            names::MINERALIZED_FRACTION_U,
            names::MINERALIZED_FRACTION_MIN,
            names::MINERALIZED_FRACTION_MAX,
            names::OUT_OF_RANGE,
            names::APPLIED,
        ]),
    );
    let latest = campaigns.iter().rev().find(|c| c.fraction().is_some());
    for c in campaigns {
        let wells: Vec<&str> = c.wells.iter().map(|w| w.1.as_str()).collect();
        let applied = match (c.fraction(), latest) {
            (None, _) => "no: its mean is outside [0, 1]".to_string(),
            (Some(_), Some(l)) if l.date == c.date => {
                format!("to CO2 injected in entries ended before {}", c.date)
            }
            (Some(_), _) => "superseded by a later campaign".to_string(),
        };
        let stat = |f: fn(&CampaignStatistics) -> f64| {
            c.stats
                .as_ref()
                .map_or(Cell::Empty, |s| Cell::Number(f(s), 4))
        };
        t.push(vec![
            Cell::text(c.date.to_string()),
            Cell::text(wells.join(", ")),
            stat(|s| s.mean),
            c.stats
                .and_then(|s| s.std_dev)
                .map_or(Cell::Empty, |v| Cell::Number(v, 4)),
            c.expanded_u().map_or(Cell::Empty, |u| Cell::Number(u, 4)),
            stat(|s| s.min),
            stat(|s| s.max),
            Cell::Int(c.stats.map_or(0, |s| s.out_of_range) as i64),
            Cell::text(applied),
        ]);
    }
    t.note("A campaign is the tracer samples of one date. Its mean over the wells keeps every well as measured; the latest campaign is the latest evidence and supersedes earlier ones.");
    t.note(SPREAD_NOTE);
    t
}

/// How a campaign's spread becomes an uncertainty.
const SPREAD_NOTE: &str = "± (95 %) of a campaign's mean fraction: t(0.975, n − 1)·s/√n of its wells' fractions (t = 12.706 for two wells; docs/uncertainty.md); a campaign of one well has no spread and gives none. It bounds the mineralized split, not the stored figure the claims start from.";

/// Injected CO2 per period split into mineralized, still dissolved and not yet sampled, beside
/// the stored mass (RR-12 form).
pub fn period_table(figures: &ProjectFigures, grouping: Grouping) -> Result<Table> {
    let (project, campaigns) = (figures.project(), figures.tracer_campaigns());
    let lines = figures.mineralization(grouping)?;
    let mut u_total: Option<Mass> = None;
    let mut t = Table::new(
        "mineralization",
        format!(
            "Mineralization by {}, project {}",
            grouping_name(grouping),
            project.code
        ),
        columns(&[
            names::PERIOD,
            names::INJECTED_T,
            names::SURFACE_LEAKAGE_T,
            names::STORED_T,
            names::CAMPAIGN,
            names::WELLS,
            names::MINERALIZED_FRACTION_MEAN,
            names::MINERALIZED_FRACTION_SD,
            names::MINERALIZED_T,
            names::MINERALIZED_U_T,
            names::STILL_DISSOLVED_T,
            names::NOT_YET_SAMPLED_T,
            names::CUMULATIVE_MINERALIZED_T,
        ]),
    );
    for l in &lines {
        let (m, campaign) = (&l.split, l.split.campaign);
        let read = campaign.and_then(|c| campaigns.iter().find(|r| r.date == c.date));
        let stats = read.and_then(|r| r.stats);
        let covered = m.mineralized + m.still_dissolved;
        let u = read
            .and_then(CampaignRead::expanded_u)
            .map(|u| Mass::from_grams(round_half_even_f64(u * covered.grams() as f64)));
        if let Some(u) = u {
            u_total = Some(u_total.unwrap_or(Mass::ZERO) + u);
        }
        t.push(vec![
            Cell::text(l.bucket.to_string()),
            Cell::Tonnes(m.injected),
            Cell::Tonnes(l.leakage),
            Cell::Tonnes(l.stored),
            campaign.map_or(Cell::Empty, |c| Cell::text(c.date.to_string())),
            stats.map_or(Cell::Empty, |s| Cell::Int(s.n as i64)),
            campaign.map_or(Cell::Empty, |c| Cell::Number(c.fraction, 4)),
            stats
                .and_then(|s| s.std_dev)
                .map_or(Cell::Empty, |v| Cell::Number(v, 4)),
            Cell::Tonnes(m.mineralized),
            u.map_or(Cell::Empty, Cell::Tonnes),
            Cell::Tonnes(m.still_dissolved),
            Cell::Tonnes(m.not_yet_sampled),
            Cell::Tonnes(l.cumulative_mineralized),
        ]);
    }
    let total = mineralization_total(&lines);
    let (leakage, stored) = kept_total(&lines);
    t.push(vec![
        Cell::text("total"),
        Cell::Tonnes(total.injected),
        Cell::Tonnes(leakage),
        Cell::Tonnes(stored),
        Cell::Empty,
        Cell::Empty,
        Cell::Empty,
        Cell::Empty,
        Cell::Tonnes(total.mineralized),
        u_total.map_or(Cell::Empty, Cell::Tonnes),
        Cell::Tonnes(total.still_dissolved),
        Cell::Tonnes(total.not_yet_sampled),
        Cell::Tonnes(total.mineralized),
    ]);
    period_notes(&mut t, campaigns);
    Ok(t)
}

/// What the period table's figures mean, and the campaigns it could not apply or kept with
/// findings.
fn period_notes(t: &mut Table, campaigns: &[CampaignRead]) {
    t.note("The latest campaign's mean fraction applies to CO2 injected in entries (or the parts of them in a period) that ended before its date; CO2 injected since is not yet sampled. Mineralized + still dissolved + not yet sampled = injected, in whole grams.");
    t.note("Stored = injected − surface leakage − leaks and vents on the injection side (RR-12 form). Mineralization splits the injected CO2; leakage is deducted from stored, not from the mineralized share.");
    t.note("Mineralized ± = the campaign's ± (95 %) of its mean fraction × the CO2 it covers (mineralized + still dissolved); the total adds the periods' linearly, since periods read by one campaign share its error. A period whose campaign has one well has none.");
    for c in campaigns.iter().filter(|c| c.fraction().is_none()) {
        let mean = c.stats.map_or(f64::NAN, |s| s.mean);
        t.note(format!(
            "Campaign of {} not applied: its mean fraction {mean:.4} is outside [0, 1].",
            c.date
        ));
    }
    for c in campaigns
        .iter()
        .filter(|c| c.stats.is_some_and(|s| s.out_of_range > 0))
    {
        let wells: Vec<String> = c
            .wells
            .iter()
            .filter(|w| matches!(w.2, Mineralized::OutOfRange { .. }))
            .map(|w| format!("{} (seq {})", w.1, w.0))
            .collect();
        t.note(format!(
            "Finding: campaign of {} has wells outside [0, 1], kept in its mean as measured: {}.",
            c.date,
            wells.join(", ")
        ));
    }
}

/// `balance` of an ex-situ mineralization project: the uptake of each carbonation batch is
/// stored, by period, with the project's emissions beside it and net of them.
pub fn carbonation_balance(figures: &ProjectFigures, grouping: Grouping) -> Result<Report> {
    let project = figures.project();
    let mut t = Table::new(
        "balance",
        format!(
            "Carbonation by {}, project {}",
            grouping_name(grouping),
            project.code
        ),
        columns(&[
            names::PERIOD,
            names::DRY_FEED_T,
            names::PRODUCT_T,
            names::STORED_T,
            names::CUMULATIVE_STORED_T,
            names::EMISSIONS_T,
            names::NET_T,
            names::CUMULATIVE_NET_T,
        ]),
    );
    for l in figures.carbonation(grouping) {
        t.push(vec![
            Cell::text(l.bucket.to_string()),
            Cell::Number(l.fed_g as f64 / 1e6, 3),
            Cell::Number(l.product_g as f64 / 1e6, 3),
            Cell::Tonnes(l.stored),
            Cell::Tonnes(l.cumulative_stored),
            Cell::Tonnes(l.emissions),
            Cell::Tonnes(l.net),
            Cell::Tonnes(l.cumulative_net),
        ]);
    }
    t.note("Stored = uptake = M(w_after − w_before)/(1 − w_after) per batch: the CO2-free solid is conserved, so the product weighs M(1 − w_before)/(1 − w_after) (docs/mineralization.md). Batches spanning periods are split by days.");
    t.note("Net = stored − project emissions; a batch whose solid lost CO2 (w_after < w_before) released M(w_before − w_after)/(1 − w_after), counted among them.");
    for (e, f) in figures.carbonation_findings() {
        t.note(format!(
            "Finding: seq {} at {} ({}): {f}",
            e.seq, e.site, e.period
        ));
    }
    Ok(Report::default().table(t))
}
