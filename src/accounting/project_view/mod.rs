//! One place that decides what a project stores, period by period, by its method: geological
//! (40 CFR 98.443 or ISO 27916), basalt (injected and kept, split into mineralized), ex-situ
//! (carbonation uptake net of the project's emissions), weathering (net removal). `balance`,
//! `totals`, `reconcile`, `chart` and the claims all read their figures here.
//!
//! The view is a fold: the caller reads the project's evidence (calibrations, tracer samples)
//! first, then feeds its effective entries (those no correction replaces) one at a time in seq
//! order with [`ProjectView::add`], each decoded once, then asks [`ProjectView::finish`] for
//! the figures. What it holds grows with periods and meters, not with entries.

mod across;
mod basalt;
mod emissions;
mod error;
pub mod evidence;
mod ex_situ;
#[cfg(test)]
mod fold_tests;
mod geological;
mod reconcile;
mod reported;
mod rock_uncertainty;
mod sealed;
mod series;
mod through;
mod totals;
mod weathering;

pub use across::{AcrossError, AcrossProjects, across};
pub use basalt::{CampaignRead, MineralizationLine, SampleRead, kept_total, mineralization_total};
pub use error::ViewError;
pub use ex_situ::CarbonationLine;
pub use reconcile::ReconcileError;
pub use reported::{bearing, reporting_period};
pub use rock_uncertainty::{Unestimated, UptakeU};
pub use series::{Series, cumulative};
pub use totals::{ByRoute, ProjectTotals, Route, TotalsLine};
pub use weathering::{
    CampaignTotal, EmissionsInScope, campaign_total, deduction_setting, default_settings,
};

use super::balance::{BalanceMethod, BalanceSums};
use super::buffer_pool::BufferPool;
use super::claims::{ClaimBasis, PoolEvent, claim_pool, period_claim_net_of, rules};
use super::conservative::DeductionRule;
use super::metering::assumed_fraction;
use super::permanence::{Claim, ClaimRules};
use super::uncertainty::Estimate;
use super::weathering::campaign::{Application, Core, Feedstock};
use crate::ledger::feedstock::Feedstock as Registered;
use crate::ledger::period::{Bucket, Grouping};
use crate::ledger::seal::late_for;
use crate::ledger::setting::{Setting, SettingName, in_force};
use crate::ledger::{Entry, EntryKind, Method, Project, Site};
use crate::quantity::Mass;
use basalt::BasaltFold;
use chrono::{DateTime, NaiveDate, Utc};
use emissions::EmissionSums;
use evidence::Batch;
use geological::Calibrations;
use std::collections::BTreeMap;

/// Each claim period's claim, the pool after them, and its events.
pub type ClaimPool = (Vec<(Bucket, Claim)>, BufferPool, Vec<PoolEvent>);

/// What the view is built from besides the entries: the registrations and settings in force,
/// and the evidence the metered entries are read with.
pub struct Registrations {
    pub project: Project,
    pub sites: Vec<Site>,
    pub settings: Vec<Setting>,
    pub feedstocks: Vec<Registered>,
    /// The project's effective entries of the [`EVIDENCE`] kinds, in seq order, read before
    /// the fold: a calibration applies by activity date, so one recorded after a reading sets
    /// its uncertainty; the latest tracer campaign splits every injection before it. The fold
    /// checks that the entries fed include exactly these.
    pub evidence: Vec<Entry>,
}

impl Registrations {
    /// The registrations the ledger held at `as_of` (all of them without one): sites,
    /// settings and feedstocks recorded later are left out.
    pub fn held_at(mut self, as_of: Option<DateTime<Utc>>) -> Registrations {
        let held = |t: DateTime<Utc>| as_of.is_none_or(|a| t <= a);
        self.sites.retain(|s| held(s.registered_at));
        self.settings.retain(|s| held(s.recorded_at));
        self.feedstocks.retain(|f| held(f.registered_at));
        self
    }
}

/// The kinds the view reads before the others (see [`Registrations::evidence`]).
pub const EVIDENCE: [EntryKind; 2] = [EntryKind::Calibration, EntryKind::TracerSample];

/// A project's figures, fed entry by entry. The metered entries are folded into sums by
/// period, term and meter as they arrive; only the few entries the reports list one by one
/// (late adjustments, leakage events, reversals) and the rock routes' evidence are kept.
pub struct ProjectView {
    project: Project,
    sites: Vec<Site>,
    settings: Vec<Setting>,
    feedstocks: Vec<Feedstock>,
    /// The evidence read first, and how many of its entries the fold has met.
    evidence: Vec<Entry>,
    evidence_met: usize,
    calibrations: Calibrations,
    balance: BalanceSums,
    emissions: EmissionSums,
    basalt: Option<BasaltFold>,
    /// Effective entries the reports list one by one, in seq order.
    listed: Vec<Entry>,
    over_permit: Vec<u64>,
    /// Balance-term tonnes on an assumed CO2 fraction and their entries; balance-term entries
    /// that state no uncertainty anywhere.
    assumed: (Mass, usize),
    unstated: usize,
    samples: Vec<SampleRead>,
    batches: Vec<(Entry, Batch)>,
    applications: Vec<Application>,
    cores: Vec<Core>,
    /// Count activity only up to this day (`--through`).
    through: Option<NaiveDate>,
}

impl ProjectView {
    /// A view counting activity up to and including `through` where given (see [`through`]);
    /// claim periods then take the settings in force on their last day or on that day,
    /// whichever is earlier.
    pub fn new(r: Registrations, through: Option<NaiveDate>) -> Result<ProjectView, ViewError> {
        let feedstocks = r
            .feedstocks
            .iter()
            .map(evidence::analysed)
            .collect::<Result<_, _>>()?;
        let evidence: Vec<Entry> = r
            .evidence
            .iter()
            .filter_map(|e| match through {
                Some(day) => through::entry_through(e, day).map(|c| c.into_owned()),
                None => Some(e.clone()),
            })
            .collect();
        let samples = evidence
            .iter()
            .filter(|e| e.kind == EntryKind::TracerSample)
            .map(SampleRead::of)
            .collect::<Result<Vec<_>, _>>()?;
        let basalt = (r.project.method == Method::BasaltMineralization)
            .then(|| BasaltFold::new(&basalt::campaigns(&samples)));
        Ok(ProjectView {
            calibrations: Calibrations::new(&evidence),
            project: r.project,
            sites: r.sites,
            settings: r.settings,
            feedstocks,
            evidence,
            evidence_met: 0,
            balance: BalanceSums::default(),
            emissions: EmissionSums::default(),
            basalt,
            listed: Vec::new(),
            over_permit: Vec::new(),
            assumed: (Mass::ZERO, 0),
            unstated: 0,
            samples,
            batches: Vec::new(),
            applications: Vec::new(),
            cores: Vec::new(),
            through,
        })
    }

    /// Takes one effective entry, in seq order; its reading is decoded now, once.
    pub fn add(&mut self, e: &Entry) -> Result<(), ViewError> {
        let whole = e;
        let e = match self.through {
            Some(day) => match through::entry_through(whole, day) {
                Some(e) => e,
                None => return Ok(()),
            },
            None => std::borrow::Cow::Borrowed(whole),
        };
        let e = e.as_ref();
        match e.kind {
            EntryKind::Calibration | EntryKind::TracerSample => self.meet_evidence(e)?,
            EntryKind::Carbonation => {
                let mut b = evidence::batch_of(e)?;
                if let Some(day) = self.through {
                    b = through::batch_through(b, whole.period, day);
                }
                self.batches.push((e.clone(), b));
            }
            EntryKind::Application => self.applications.push(evidence::application_of(e)?),
            EntryKind::SoilSample => self.cores.push(evidence::core_of(e)?),
            EntryKind::Emission => self.emissions.add(e),
            EntryKind::Injection => {
                if let Some(b) = &mut self.basalt {
                    b.add(e)?;
                }
            }
            _ => {}
        }
        let mut rel_u = 0.0;
        if e.kind.is_balance_term() {
            match self.calibrations.rel_uncertainty(e, &self.sites) {
                Some(u) => rel_u = u,
                None => self.unstated += 1,
            }
            if assumed_fraction(&e.reading) {
                self.assumed = (self.assumed.0 + e.mass, self.assumed.1 + 1);
            }
        }
        self.balance.add(e, rel_u);
        if e.reading.flag("over_permit") {
            self.over_permit.push(e.seq);
        }
        if late_for(e).is_some() || matches!(e.kind, EntryKind::Leakage | EntryKind::Reversal) {
            self.listed.push(e.clone());
        }
        Ok(())
    }

    /// An entry of an evidence kind must be the next of the evidence read first.
    fn meet_evidence(&mut self, e: &Entry) -> Result<(), ViewError> {
        match self.evidence.get(self.evidence_met) {
            Some(expected) if expected == e => {
                self.evidence_met += 1;
                Ok(())
            }
            _ => Err(self.evidence_differs(format!("seq {} ({})", e.seq, e.kind))),
        }
    }

    fn evidence_differs(&self, what: String) -> ViewError {
        ViewError::EvidenceDiffers {
            project: self.project.code.clone(),
            what,
        }
    }

    /// The figures, once every effective entry has been fed.
    pub fn finish(self) -> Result<ProjectFigures, ViewError> {
        if let Some(e) = self.evidence.get(self.evidence_met) {
            return Err(self.evidence_differs(format!("seq {} ({}) was not fed", e.seq, e.kind)));
        }
        let campaigns = basalt::campaigns(&self.samples);
        Ok(ProjectFigures {
            view: self,
            campaigns,
        })
    }
}

/// What a project stores, asked period by period.
pub struct ProjectFigures {
    view: ProjectView,
    campaigns: Vec<CampaignRead>,
}

impl ProjectFigures {
    pub fn project(&self) -> &Project {
        &self.view.project
    }

    pub fn sites(&self) -> &[Site] {
        &self.view.sites
    }

    /// The effective entries the reports list one by one, in seq order: the late adjustments
    /// (any kind), the leakage events and the reversals.
    pub fn listed(&self) -> impl Iterator<Item = &Entry> {
        self.view.listed.iter()
    }

    /// The seqs of the entries recorded over the permit (`--over-permit`).
    pub fn over_permit(&self) -> &[u64] {
        &self.view.over_permit
    }

    /// The one granularity at which the project's claims are made (`project set
    /// --claim-period`, a year unless set): the figures of the claims table, the buffer pool
    /// and `totals` (uncertainty added in quadrature does not add across periods, so claims
    /// made by month, quarter and year would be three different figures).
    pub fn claim_period(&self) -> Grouping {
        match in_force(
            &self.view.settings,
            SettingName::ClaimPeriod,
            NaiveDate::MAX,
        )
        .map(|s| s.value.as_str())
        {
            Some("month") => Grouping::Month,
            Some("quarter") => Grouping::Quarter,
            _ => Grouping::Year,
        }
    }

    /// The claim rules of a period: the settings in force on its last day.
    /// With `--through`, the settings in force on that day where it comes first.
    pub fn rules(&self, period: Bucket, deduction: DeductionRule) -> ClaimRules {
        self.rules_on(self.settings_day(period), deduction)
    }

    /// The day a period's claim reads its settings on: its last day, or the `--through` day
    /// where that comes first.
    fn settings_day(&self, period: Bucket) -> NaiveDate {
        let last = period.last_day();
        self.view.through.map_or(last, |t| t.min(last))
    }

    /// The claim rules of the settings in force on `day`.
    pub fn rules_on(&self, day: NaiveDate, deduction: DeductionRule) -> ClaimRules {
        rules(&self.view.settings, day, deduction)
    }

    /// The backdated settings the claims of `periods` use (those taking effect before the
    /// day they were recorded), each with the periods whose last day it is in force on.
    pub fn backdated(&self, periods: &[Bucket]) -> Vec<(&Setting, Vec<Bucket>)> {
        let mut used: Vec<(&Setting, Vec<Bucket>)> = Vec::new();
        for p in periods {
            for name in SettingName::ALL {
                let Some(s) = in_force(&self.view.settings, *name, self.settings_day(*p)) else {
                    continue;
                };
                if !s.backdated() {
                    continue;
                }
                match used.iter_mut().find(|(u, _)| u.seq == s.seq) {
                    Some((_, ps)) => ps.push(*p),
                    None => used.push((s, vec![*p])),
                }
            }
        }
        used
    }

    /// Each period's stored figure, with its uncertainty (95 %), as the project's method
    /// counts it: what claims start from, what `totals` adds up and what `chart` plots. A rock
    /// route's uncertainty comes from its inputs (see [`ProjectFigures::unestimated`] for
    /// what has none).
    pub fn stored(&self, grouping: Grouping) -> Result<Vec<(Bucket, Estimate)>, ViewError> {
        Ok(match self.view.project.method {
            Method::SalineAquifer
            | Method::DepletedField
            | Method::Eor
            | Method::BasaltMineralization => self
                .geological(grouping, BalanceMethod::Rr)
                .into_iter()
                .map(|l| (l.bucket, l.uncertainty))
                .collect(),
            Method::ExSituMineralization => {
                let u = self.carbonation_uncertainty(grouping);
                self.carbonation(grouping)
                    .into_iter()
                    .map(|l| {
                        let g = u.get(&l.bucket).map_or(0.0, |u| u.abs_u_grams);
                        let abs_u = Mass::from_grams(crate::quantity::mass::round_half_even_f64(g));
                        (l.bucket, Estimate::absolute(l.net, abs_u))
                    })
                    .collect()
            }
            Method::EnhancedWeathering => self
                .weathering_rollup(grouping)?
                .0
                .into_iter()
                .map(|l| (l.bucket, l.uncertainty))
                .collect(),
        })
    }

    /// The project's emissions by period where its stored figure is not net of them: a
    /// geological project's (40 CFR 98.443 and ISO 27916 report them beside storage), empty for
    /// the rock routes, whose net already deducts them.
    pub fn emissions_beside_storage(&self, grouping: Grouping) -> BTreeMap<Bucket, Mass> {
        match Route::of(self.view.project.method) {
            Route::Geological => self
                .geological(grouping, BalanceMethod::Rr)
                .into_iter()
                .map(|l| (l.bucket, l.terms.emissions))
                .collect(),
            Route::Mineralized | Route::Weathering => BTreeMap::new(),
        }
    }

    /// Each period's claim, from stored to claimable, net of the project's emissions.
    pub fn claims(
        &self,
        grouping: Grouping,
        deduction: DeductionRule,
    ) -> Result<Vec<(Bucket, Claim)>, ViewError> {
        let emissions = self.emissions_beside_storage(grouping);
        Ok(self
            .stored(grouping)?
            .iter()
            .map(|(b, u)| {
                let e = emissions.get(b).copied().unwrap_or(Mass::ZERO);
                (*b, period_claim_net_of(u, e, &self.rules(*b, deduction)))
            })
            .collect())
    }

    /// Each claim period's stored figure (a geological project's by `method`) and the
    /// reversals dated in it.
    pub fn claim_basis(&self, method: BalanceMethod) -> Result<Vec<ClaimBasis>, ViewError> {
        let period = self.claim_period();
        let stored: Vec<(Bucket, Estimate)> = match self.view.project.method {
            Method::SalineAquifer | Method::DepletedField | Method::Eor => self
                .geological(period, method)
                .into_iter()
                .map(|l| (l.bucket, l.uncertainty))
                .collect(),
            _ => self.stored(period)?,
        };
        let emissions = self.emissions_beside_storage(period);
        let mut by: BTreeMap<Bucket, ClaimBasis> = stored
            .into_iter()
            .map(|(bucket, stored)| {
                let basis = ClaimBasis {
                    bucket,
                    stored,
                    reversed: Mass::ZERO,
                    reversals: Vec::new(),
                    emissions: emissions.get(&bucket).copied().unwrap_or(Mass::ZERO),
                };
                (bucket, basis)
            })
            .collect();
        for e in self.reversals() {
            let bucket = period.bucket(e.period.from);
            let b = by.entry(bucket).or_insert_with(|| ClaimBasis {
                bucket,
                stored: Estimate::absolute(Mass::ZERO, Mass::ZERO),
                reversed: Mass::ZERO,
                reversals: Vec::new(),
                emissions: Mass::ZERO,
            });
            b.reversed += e.mass;
            b.reversals.push(e.seq);
        }
        Ok(by.into_values().collect())
    }

    /// The claims of each claim period and the buffer pool after them (see [`claim_pool`]).
    pub fn claim_pool(
        &self,
        method: BalanceMethod,
        deduction: DeductionRule,
    ) -> Result<ClaimPool, ViewError> {
        Ok(claim_pool(&self.claim_basis(method)?, |b| {
            self.rules(b, deduction)
        }))
    }

    /// The tonnes of the mass balance's metered terms (received, redelivered, injected,
    /// produced, leaked, vented) that rest on a CO2 fraction no reading stated, and the number
    /// of entries they come from.
    pub fn on_assumed_fraction(&self) -> (Mass, usize) {
        self.view.assumed
    }

    /// Every reversal recorded.
    fn reversals(&self) -> impl Iterator<Item = &Entry> {
        self.listed().filter(|e| e.kind == EntryKind::Reversal)
    }
}

/// The figures of a claim, stored to claimable, in the order the claims table shows them.
pub fn claim_figures(c: &Claim) -> [Mass; 9] {
    [
        c.stored,
        c.project_emissions,
        c.net_of_emissions,
        c.uncertainty_deduction,
        c.conservative,
        c.durability_discount,
        c.durable,
        c.buffer_withheld,
        c.claimable,
    ]
}

/// The claims' figures summed over their periods.
pub fn claims_total(claims: &[(Bucket, Claim)]) -> [Mass; 9] {
    let mut total = [Mass::ZERO; 9];
    for (_, c) in claims {
        for (t, x) in total.iter_mut().zip(claim_figures(c)) {
            *t += x;
        }
    }
    total
}

#[cfg(test)]
mod held_tests {
    use super::*;
    use crate::ledger::SiteKind;

    #[test]
    fn registrations_recorded_after_the_date_asked_are_left_out() {
        let at = |d: i64| DateTime::UNIX_EPOCH + chrono::Duration::days(d);
        let site = |code: &str, day| Site {
            project: "P".into(),
            code: code.into(),
            kind: SiteKind::InjectionWell,
            area: None,
            uncertainty: None,
            registered_at: at(day),
        };
        let r = || Registrations {
            project: Project::example("P", Method::SalineAquifer),
            sites: vec![site("W1", 1), site("W2", 3)],
            settings: vec![],
            feedstocks: vec![],
            evidence: vec![],
        };
        let codes = |r: Registrations| r.sites.into_iter().map(|s| s.code).collect::<Vec<_>>();
        assert_eq!(codes(r().held_at(Some(at(2)))), ["W1"]);
        assert_eq!(codes(r().held_at(Some(at(3)))), ["W1", "W2"]);
        assert_eq!(codes(r().held_at(None)), ["W1", "W2"]);
    }
}
