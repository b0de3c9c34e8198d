//! `mineralization`: how much of the CO2 injected into basalt has turned to rock, campaign by
//! campaign and period by period; and the route's own balance tables for basalt (in-situ) and
//! ex-situ mineralization projects.

use super::Context;
use super::record_rock::{carbonation_of, tracer_fraction};
use super::reports::By;
use super::setup::known_project;
use crate::accounting::balance::{BalanceMethod, balance as geological};
use crate::accounting::tracer::{
    Campaign, CampaignStatistics, Injection, Mineralized, OutOfRange, PeriodMineralization,
    apply_campaigns, campaign_statistics,
};
use crate::error::{Error, Result};
use crate::ledger::correction::effective;
use crate::ledger::period::{Bucket, Grouping, apportion};
use crate::ledger::{Entry, EntryKind, Method, Project, SealedEntry};
use crate::quantity::Mass;
use crate::report::{Cell, Report, Table, columns};
use chrono::NaiveDate;
use clap::Args;
use std::collections::BTreeMap;

impl From<By> for Grouping {
    fn from(by: By) -> Grouping {
        match by {
            By::Month => Grouping::Month,
            By::Quarter => Grouping::Quarter,
            By::Year => Grouping::Year,
        }
    }
}

pub(super) fn grouping_name(g: Grouping) -> &'static str {
    match g {
        Grouping::Month => "month",
        Grouping::Quarter => "quarter",
        Grouping::Year => "year",
    }
}

#[derive(Debug, Args)]
pub struct MineralizationArgs {
    pub project: String,
    #[arg(long, value_enum, default_value_t = By::Quarter)]
    pub by: By,
}

/// A project of `method`, with its entries, or a refusal naming the project.
pub fn route_project(
    ctx: &Context,
    code: &str,
    method: Method,
    command: &str,
) -> Result<(Project, Vec<SealedEntry>)> {
    ctx.open()?.read(|tx| {
        let p = known_project(tx, code)?;
        if p.method != method {
            return Err(Error::field(
                "project",
                code,
                format!(
                    "has method {}; `{command}` reads {method} projects",
                    p.method
                ),
            ));
        }
        Ok((p, tx.entries(code)?))
    })
}

pub fn mineralization(ctx: &Context, a: MineralizationArgs) -> Result<Report> {
    let (project, all) = route_project(
        ctx,
        &a.project,
        Method::BasaltMineralization,
        "mineralization",
    )?;
    let live: Vec<&Entry> = effective(&all).collect();
    let campaigns = campaigns(&live);
    Ok(Report::default()
        .table(samples_table(&project, &live))
        .table(campaigns_table(&project, &campaigns))
        .table(period_table(&project, &live, &campaigns, a.by.into())?))
}

/// `balance` of a basalt-mineralization project: the period table, injected CO2 split by the
/// evidence.
pub fn balance(project: &Project, all: &[SealedEntry], grouping: Grouping) -> Result<Report> {
    let live: Vec<&Entry> = effective(all).collect();
    let campaigns = campaigns(&live);
    Ok(Report::default().table(period_table(project, &live, &campaigns, grouping)?))
}

/// One campaign: the tracer samples of one date, across wells.
struct CampaignRead<'a> {
    date: NaiveDate,
    wells: Vec<(&'a Entry, Mineralized)>,
    stats: Option<CampaignStatistics>,
}

impl CampaignRead<'_> {
    /// The fraction the campaign says, if it can be applied: its mean, in [0, 1].
    fn fraction(&self) -> Option<f64> {
        self.stats
            .map(|s| s.mean)
            .filter(|m| (0.0..=1.0).contains(m))
    }
}

fn campaigns<'a>(live: &[&'a Entry]) -> Vec<CampaignRead<'a>> {
    let mut by: BTreeMap<NaiveDate, Vec<(&Entry, Mineralized)>> = BTreeMap::new();
    for e in live.iter().filter(|e| e.kind == EntryKind::TracerSample) {
        if let Ok(m) = tracer_fraction(&e.reading) {
            by.entry(e.period.from).or_default().push((e, m));
        }
    }
    by.into_iter()
        .map(|(date, wells)| {
            let f: Vec<Mineralized> = wells.iter().map(|w| w.1).collect();
            CampaignRead {
                date,
                stats: campaign_statistics(&f).ok(),
                wells,
            }
        })
        .collect()
}

fn samples_table(project: &Project, live: &[&Entry]) -> Table {
    let mut t = Table::new(
        "tracer_samples",
        format!("Tracer samples, project {}", project.code),
        columns(&[
            ("Date", "date"),
            ("Well", "site"),
            ("Tracer ratio X", "tracer_ratio"),
            ("DIC sample", "dic_sample"),
            ("DIC background", "dic_background"),
            ("DIC injectate", "dic_injectate"),
            ("Unit", "dic_unit"),
            ("Mineralized fraction", "mineralized_fraction"),
            ("Finding", "finding"),
            ("Seq", "seq"),
        ]),
    );
    let mut samples: Vec<&&Entry> = live
        .iter()
        .filter(|e| e.kind == EntryKind::TracerSample)
        .collect();
    samples.sort_by(|a, b| (a.period.from, &a.site).cmp(&(b.period.from, &b.site)));
    let mut reasons = std::collections::BTreeSet::new();
    for e in samples {
        let r = &e.reading;
        let (f, finding) = match tracer_fraction(r) {
            Ok(Mineralized::Fraction { f, .. }) => (Cell::Number(f, 4), Cell::Empty),
            Ok(Mineralized::OutOfRange { f, why }) => {
                reasons.insert(why.to_string());
                (Cell::Number(f, 4), Cell::text(short_finding(why)))
            }
            Err(e) => (Cell::Empty, Cell::text(e.to_string())),
        };
        t.push(vec![
            Cell::text(e.period.from.to_string()),
            Cell::text(&e.site),
            Cell::opt_text(r.get("tracer_ratio")),
            Cell::opt_text(r.get("dic_sample")),
            Cell::opt_text(r.get("dic_background")),
            Cell::opt_text(r.get("dic_injectate")),
            Cell::opt_text(r.get("dic_unit")),
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

fn campaigns_table(project: &Project, campaigns: &[CampaignRead<'_>]) -> Table {
    let mut t = Table::new(
        "campaigns",
        format!("Tracer campaigns, project {}", project.code),
        columns(&[
            ("Date", "date"),
            ("Wells", "wells"),
            ("Mean fraction", "mineralized_fraction"),
            ("Std dev", "mineralized_fraction_sd"),
            ("Min", "mineralized_fraction_min"),
            ("Max", "mineralized_fraction_max"),
            ("Outside [0, 1]", "out_of_range"),
            ("Applied", "applied"),
        ]),
    );
    let latest = campaigns.iter().rev().find(|c| c.fraction().is_some());
    for c in campaigns {
        let wells: Vec<&str> = c.wells.iter().map(|w| w.0.site.as_str()).collect();
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
            stat(|s| s.min),
            stat(|s| s.max),
            Cell::Int(c.stats.map_or(0, |s| s.out_of_range) as i64),
            Cell::text(applied),
        ]);
    }
    t.note("A campaign is the tracer samples of one date. Its mean over the wells keeps every well as measured; the latest campaign is the latest evidence and supersedes earlier ones.");
    t
}

/// A period before anything was injected or sampled.
fn nothing_yet(b: Bucket) -> PeriodMineralization<NaiveDate> {
    PeriodMineralization {
        end: b.last_day(),
        injected: Mass::ZERO,
        mineralized: Mass::ZERO,
        still_dissolved: Mass::ZERO,
        not_yet_sampled: Mass::ZERO,
        campaign: None,
    }
}

type PeriodSplit = BTreeMap<Bucket, (PeriodMineralization<NaiveDate>, Option<Campaign<NaiveDate>>)>;

/// Injected CO2 per period split by the campaigns into mineralized, still dissolved and not yet
/// sampled, with the campaign that applied.
fn split_by_period(
    live: &[&Entry],
    campaigns: &[CampaignRead<'_>],
    grouping: Grouping,
) -> Result<PeriodSplit> {
    let mut pieces: Vec<(Bucket, Injection<NaiveDate>)> = Vec::new();
    for e in live.iter().filter(|e| e.kind == EntryKind::Injection) {
        for (b, g) in apportion(e.mass.grams(), e.period, grouping) {
            let end = e.period.to.min(b.last_day());
            pieces.push((
                b,
                Injection {
                    end,
                    mass: Mass::from_grams(g),
                },
            ));
        }
    }
    let usable: Vec<Campaign<NaiveDate>> = campaigns
        .iter()
        .filter_map(|c| {
            c.fraction().map(|fraction| Campaign {
                date: c.date,
                fraction,
            })
        })
        .collect();
    let injections: Vec<Injection<NaiveDate>> = pieces.iter().map(|p| p.1).collect();
    let split = apply_campaigns(&injections, &usable).map_err(|e| Error::Refused(e.to_string()))?;
    let mut by: BTreeMap<Bucket, (PeriodMineralization<NaiveDate>, Option<Campaign<NaiveDate>>)> =
        BTreeMap::new();
    for ((b, _), s) in pieces.iter().zip(&split) {
        let slot = by.entry(*b).or_insert((nothing_yet(*b), None));
        slot.0.injected += s.injected;
        slot.0.mineralized += s.mineralized;
        slot.0.still_dissolved += s.still_dissolved;
        slot.0.not_yet_sampled += s.not_yet_sampled;
        slot.1 = slot.1.or(s.campaign);
    }
    Ok(by)
}

/// The mineralized CO2 by period, for reconciling a basalt project with a monitoring report.
pub fn mineralized_by_period(
    all: &[SealedEntry],
    grouping: Grouping,
) -> Result<Vec<(Bucket, Mass)>> {
    let live: Vec<&Entry> = effective(all).collect();
    let split = split_by_period(&live, &campaigns(&live), grouping)?;
    Ok(split
        .into_iter()
        .map(|(b, (m, _))| (b, m.mineralized))
        .collect())
}

/// Injected CO2 per period split into mineralized, still dissolved and not yet sampled, beside
/// the stored mass (RR-12 form).
fn period_table(
    project: &Project,
    live: &[&Entry],
    campaigns: &[CampaignRead<'_>],
    grouping: Grouping,
) -> Result<Table> {
    let by = split_by_period(live, campaigns, grouping)?;
    let stored: BTreeMap<Bucket, (Mass, Mass)> = geological(
        project,
        live.iter().copied(),
        grouping,
        BalanceMethod::Rr,
        &|_| 0.0,
    )
    .into_iter()
    .map(|l| {
        let leaks = l.terms.surface_leakage + l.terms.leaks_injection_side;
        (l.bucket, (leaks, l.stored))
    })
    .collect();
    let mut t = Table::new(
        "mineralization",
        format!(
            "Mineralization by {}, project {}",
            grouping_name(grouping),
            project.code
        ),
        columns(&[
            ("Period", "period"),
            ("Injected (t)", "injected_t"),
            ("Leakage (t)", "leakage_t"),
            ("Stored (t)", "stored_t"),
            ("Campaign", "campaign"),
            ("Wells", "wells"),
            ("Fraction (mean)", "mineralized_fraction"),
            ("Std dev", "mineralized_fraction_sd"),
            ("Mineralized (t)", "mineralized_t"),
            ("Still dissolved (t)", "dissolved_t"),
            ("Not yet sampled (t)", "not_yet_sampled_t"),
            ("Cumulative mineralized (t)", "cumulative_mineralized_t"),
        ]),
    );
    let mut buckets: Vec<Bucket> = by.keys().chain(stored.keys()).copied().collect();
    buckets.sort();
    buckets.dedup();
    let mut total = [Mass::ZERO; 6];
    for b in buckets {
        let (m, campaign) = by.get(&b).copied().unwrap_or((nothing_yet(b), None));
        let (leaks, kept) = stored.get(&b).copied().unwrap_or_default();
        let read = campaign.and_then(|c| campaigns.iter().find(|r| r.date == c.date));
        let stats = read.and_then(|r| r.stats);
        let row = [
            m.injected,
            leaks,
            kept,
            m.mineralized,
            m.still_dissolved,
            m.not_yet_sampled,
        ];
        for (sum, v) in total.iter_mut().zip(row) {
            *sum += v;
        }
        t.push(vec![
            Cell::text(b.to_string()),
            Cell::Tonnes(m.injected),
            Cell::Tonnes(leaks),
            Cell::Tonnes(kept),
            campaign.map_or(Cell::Empty, |c| Cell::text(c.date.to_string())),
            stats.map_or(Cell::Empty, |s| Cell::Int(s.n as i64)),
            campaign.map_or(Cell::Empty, |c| Cell::Number(c.fraction, 4)),
            stats
                .and_then(|s| s.std_dev)
                .map_or(Cell::Empty, |v| Cell::Number(v, 4)),
            Cell::Tonnes(m.mineralized),
            Cell::Tonnes(m.still_dissolved),
            Cell::Tonnes(m.not_yet_sampled),
            Cell::Tonnes(total[3]),
        ]);
    }
    t.push(vec![
        Cell::text("total"),
        Cell::Tonnes(total[0]),
        Cell::Tonnes(total[1]),
        Cell::Tonnes(total[2]),
        Cell::Empty,
        Cell::Empty,
        Cell::Empty,
        Cell::Empty,
        Cell::Tonnes(total[3]),
        Cell::Tonnes(total[4]),
        Cell::Tonnes(total[5]),
        Cell::Tonnes(total[3]),
    ]);
    t.note("The latest campaign's mean fraction applies to CO2 injected in entries (or the parts of them in a period) that ended before its date; CO2 injected since is not yet sampled. Mineralized + still dissolved + not yet sampled = injected, in whole grams.");
    t.note("Stored = injected − surface leakage − leaks and vents on the injection side (RR-12 form). Mineralization splits the injected CO2; leakage is deducted from stored, not from the mineralized share.");
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
            .filter(|w| matches!(w.1, Mineralized::OutOfRange { .. }))
            .map(|w| format!("{} (seq {})", w.0.site, w.0.seq))
            .collect();
        t.note(format!(
            "Finding: campaign of {} has wells outside [0, 1], kept in its mean as measured: {}.",
            c.date,
            wells.join(", ")
        ));
    }
    Ok(t)
}

/// The carbonation uptake by period: what the regulator's totals count as stored for an
/// ex-situ project.
pub fn uptake_by_period(all: &[SealedEntry], grouping: Grouping) -> Vec<(Bucket, Mass)> {
    let mut by: BTreeMap<Bucket, Mass> = BTreeMap::new();
    for e in effective(all).filter(|e| e.kind == EntryKind::Carbonation) {
        for (b, g) in apportion(e.mass.grams(), e.period, grouping) {
            *by.entry(b).or_default() += Mass::from_grams(g);
        }
    }
    by.into_iter().collect()
}

/// `balance` of an ex-situ mineralization project: the uptake of each carbonation batch is
/// stored, by period, with the project's emissions beside it and net of them.
pub fn carbonation_balance(
    project: &Project,
    all: &[SealedEntry],
    grouping: Grouping,
) -> Result<Report> {
    #[derive(Default, Clone, Copy)]
    struct Line {
        fed_g: i64,
        product_g: i64,
        stored: Mass,
        emissions: Mass,
    }
    let mut by: BTreeMap<Bucket, Line> = BTreeMap::new();
    let mut findings = Vec::new();
    for e in effective(all) {
        match e.kind {
            EntryKind::Carbonation => {
                let (fed_t, product_t) = carbonation_of(e)?;
                let parts = [
                    apportion((fed_t * 1e6).round_ties_even() as i64, e.period, grouping),
                    apportion(
                        (product_t * 1e6).round_ties_even() as i64,
                        e.period,
                        grouping,
                    ),
                    apportion(e.mass.grams(), e.period, grouping),
                ];
                for (k, part) in parts.into_iter().enumerate() {
                    for (b, g) in part {
                        let l = by.entry(b).or_default();
                        match k {
                            0 => l.fed_g += g,
                            1 => l.product_g += g,
                            _ => l.stored += Mass::from_grams(g),
                        }
                    }
                }
                if let Some(f) = e.reading.get("finding") {
                    findings.push(format!("seq {} at {} ({}): {f}", e.seq, e.site, e.period));
                }
            }
            EntryKind::Emission => {
                for (b, g) in apportion(e.mass.grams(), e.period, grouping) {
                    by.entry(b).or_default().emissions += Mass::from_grams(g);
                }
            }
            _ => {}
        }
    }
    let mut t = Table::new(
        "balance",
        format!(
            "Carbonation by {}, project {}",
            grouping_name(grouping),
            project.code
        ),
        columns(&[
            ("Period", "period"),
            ("Dry feed (t)", "fed_t"),
            ("Product (t)", "product_t"),
            ("Stored (t)", "stored_t"),
            ("Cumulative stored (t)", "cumulative_stored_t"),
            ("Project emissions (t)", "emissions_t"),
            ("Net (t)", "net_t"),
            ("Cumulative net (t)", "cumulative_net_t"),
        ]),
    );
    let (mut stored, mut net) = (Mass::ZERO, Mass::ZERO);
    for (b, l) in by {
        stored += l.stored;
        net += l.stored - l.emissions;
        t.push(vec![
            Cell::text(b.to_string()),
            Cell::Number(l.fed_g as f64 / 1e6, 3),
            Cell::Number(l.product_g as f64 / 1e6, 3),
            Cell::Tonnes(l.stored),
            Cell::Tonnes(stored),
            Cell::Tonnes(l.emissions),
            Cell::Tonnes(l.stored - l.emissions),
            Cell::Tonnes(net),
        ]);
    }
    t.note("Stored = uptake = M(w_after − w_before)/(1 − w_after) per batch: the CO2-free solid is conserved, so the product weighs M(1 − w_before)/(1 − w_after) (docs/mineralization.md). Batches spanning periods are split by days.");
    t.note("Net = stored − project emissions.");
    for f in findings {
        t.note(format!("Finding: {f}"));
    }
    Ok(Report::default().table(t))
}
