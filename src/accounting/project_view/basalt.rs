//! Basalt (in-situ) mineralization: the tracer campaigns, and the CO2 injected in each period
//! split by the latest campaign into mineralized, still dissolved and not yet sampled, beside
//! what the period stores (RR-12 form).

use super::{ProjectFigures, ViewError, evidence};
use crate::accounting::balance::BalanceMethod;
use crate::accounting::balance::each_piece;
use crate::accounting::input::{InputError, Rule};
use crate::accounting::tracer::{
    Campaign, CampaignStatistics, Injection, Mineralized, PeriodMineralization, TracerError,
    apply_campaigns, campaign_statistics, mineralized_fraction,
};
use crate::accounting::uncertainty::replicate_mean;
use crate::ledger::Entry;
use crate::ledger::period::{Bucket, Grouping};
use crate::quantity::Mass;
use chrono::NaiveDate;
use std::collections::BTreeMap;

/// A tracer sample and the fraction it gives (or why it gives none).
#[derive(Debug, Clone)]
pub struct SampleRead {
    pub entry: Entry,
    pub found: Result<Mineralized, TracerError>,
}

impl SampleRead {
    pub(super) fn of(e: &Entry) -> Result<SampleRead, ViewError> {
        let sample = evidence::tracer_of(e)?;
        Ok(SampleRead {
            entry: e.clone(),
            found: mineralized_fraction(&sample),
        })
    }
}

/// One campaign: the tracer samples of one date, across wells.
#[derive(Debug, Clone)]
pub struct CampaignRead {
    pub date: NaiveDate,
    /// (seq, well, what it found).
    pub wells: Vec<(u64, String, Mineralized)>,
    pub stats: Option<CampaignStatistics>,
}

impl CampaignRead {
    /// The fraction the campaign says, if it can be applied: its mean, in [0, 1].
    pub fn fraction(&self) -> Option<f64> {
        self.stats
            .map(|s| s.mean)
            .filter(|m| (0.0..=1.0).contains(m))
    }

    /// The mean fraction's expanded uncertainty (95 %) from the spread of the wells:
    /// t(0.975, n − 1)·s/√n; none for a campaign of one well.
    pub fn expanded_u(&self) -> Option<f64> {
        let f: Vec<f64> = self.wells.iter().map(|w| w.2.f()).collect();
        replicate_mean(&f).map(|(_, u)| u)
    }
}

pub(super) fn campaigns(samples: &[SampleRead]) -> Vec<CampaignRead> {
    let mut by: BTreeMap<NaiveDate, Vec<(u64, String, Mineralized)>> = BTreeMap::new();
    for s in samples {
        if let Ok(m) = s.found {
            let e = &s.entry;
            by.entry(e.period.from)
                .or_default()
                .push((e.seq, e.site.clone(), m));
        }
    }
    by.into_iter()
        .map(|(date, wells)| {
            let f: Vec<Mineralized> = wells.iter().map(|w| w.2).collect();
            CampaignRead {
                date,
                stats: campaign_statistics(&f).ok(),
                wells,
            }
        })
        .collect()
}

/// One period of a basalt project.
#[derive(Debug, Clone, PartialEq)]
pub struct MineralizationLine {
    pub bucket: Bucket,
    pub split: PeriodMineralization<NaiveDate>,
    /// Surface leakage and injection-side leaks and vents.
    pub leakage: Mass,
    pub stored: Mass,
    pub cumulative_mineralized: Mass,
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

impl ProjectFigures {
    pub fn samples(&self) -> &[SampleRead] {
        &self.view.samples
    }

    pub fn tracer_campaigns(&self) -> &[CampaignRead] {
        &self.campaigns
    }

    /// Injected CO2 per period split by the campaigns, with the campaign that applied.
    fn split_by_period(
        &self,
        grouping: Grouping,
    ) -> Result<BTreeMap<Bucket, PeriodMineralization<NaiveDate>>, ViewError> {
        match &self.view.basalt {
            Some(fold) => fold.split(grouping),
            None => Ok(BTreeMap::new()),
        }
    }

    /// Every period that injected or stored anything, split by the evidence.
    pub fn mineralization(&self, grouping: Grouping) -> Result<Vec<MineralizationLine>, ViewError> {
        let by = self.split_by_period(grouping)?;
        let stored: BTreeMap<Bucket, (Mass, Mass)> = self
            .geological(grouping, BalanceMethod::Rr)
            .into_iter()
            .map(|l| {
                let leaks = l.terms.surface_leakage + l.terms.leaks_injection_side;
                (l.bucket, (leaks, l.stored))
            })
            .collect();
        let mut buckets: Vec<Bucket> = by.keys().chain(stored.keys()).copied().collect();
        buckets.sort();
        buckets.dedup();
        let mut cumulative = Mass::ZERO;
        Ok(buckets
            .into_iter()
            .map(|b| {
                let split = by.get(&b).copied().unwrap_or(nothing_yet(b));
                let (leakage, stored) = stored.get(&b).copied().unwrap_or_default();
                cumulative += split.mineralized;
                MineralizationLine {
                    bucket: b,
                    split,
                    leakage,
                    stored,
                    cumulative_mineralized: cumulative,
                }
            })
            .collect())
    }
}

/// A basalt project's injections split by the latest usable campaign as they are fed, by
/// period at every grouping: each piece of an entry (split by days between periods) is split
/// on its own, in whole grams, as [`apply_campaigns`] splits it. The campaigns are read before
/// the injections (the view reads tracer samples first), so a campaign recorded after an
/// injection still splits it.
#[derive(Debug)]
pub(super) struct BasaltFold {
    latest: Vec<Campaign<NaiveDate>>,
    by: [BTreeMap<Bucket, PeriodMineralization<NaiveDate>>; 3],
    /// Pieces fed at each grouping, and the first that was refused (a negative mass).
    pieces: [usize; 3],
    refused: [Option<TracerError>; 3],
}

impl BasaltFold {
    pub(super) fn new(campaigns: &[CampaignRead]) -> BasaltFold {
        let latest = campaigns
            .iter()
            .filter_map(|c| {
                c.fraction().map(|fraction| Campaign {
                    date: c.date,
                    fraction,
                })
            })
            .max_by_key(|c| c.date);
        BasaltFold {
            latest: latest.into_iter().collect(),
            by: Default::default(),
            pieces: [0; 3],
            refused: [None, None, None],
        }
    }

    /// Takes one injection entry.
    pub(super) fn add(&mut self, e: &Entry) -> Result<(), ViewError> {
        for (i, grouping) in [Grouping::Month, Grouping::Quarter, Grouping::Year]
            .into_iter()
            .enumerate()
        {
            let mut failed = None;
            each_piece(e.mass.grams(), e.period, grouping, |b, g| {
                let n = self.pieces[i];
                self.pieces[i] += 1;
                if g < 0 {
                    self.refused[i].get_or_insert(TracerError::Input(InputError {
                        field: format!("injections[{n}].mass_g"),
                        value: g as f64,
                        rule: Rule::NonNegative,
                    }));
                    return;
                }
                let end = e.period.to.min(b.last_day());
                let piece = Injection {
                    end,
                    mass: Mass::from_grams(g),
                };
                match apply_campaigns(&[piece], &self.latest) {
                    Ok(split) => {
                        let slot = self.by[i].entry(b).or_insert(nothing_yet(b));
                        for s in split {
                            slot.injected += s.injected;
                            slot.mineralized += s.mineralized;
                            slot.still_dissolved += s.still_dissolved;
                            slot.not_yet_sampled += s.not_yet_sampled;
                            slot.campaign = slot.campaign.or(s.campaign);
                        }
                    }
                    Err(err) => failed = Some(err),
                }
            });
            if let Some(err) = failed {
                return Err(ViewError::Tracer(err));
            }
        }
        Ok(())
    }

    fn split(
        &self,
        grouping: Grouping,
    ) -> Result<BTreeMap<Bucket, PeriodMineralization<NaiveDate>>, ViewError> {
        let i = match grouping {
            Grouping::Month => 0,
            Grouping::Quarter => 1,
            Grouping::Year => 2,
        };
        match &self.refused[i] {
            Some(err) => Err(ViewError::Tracer(err.clone())),
            None => Ok(self.by[i].clone()),
        }
    }
}

/// The sum of the periods' lines (dated by the last period's end; no campaign).
pub fn mineralization_total(lines: &[MineralizationLine]) -> PeriodMineralization<NaiveDate> {
    let mut t = PeriodMineralization {
        end: lines.last().map_or(NaiveDate::MIN, |l| l.split.end),
        injected: Mass::ZERO,
        mineralized: Mass::ZERO,
        still_dissolved: Mass::ZERO,
        not_yet_sampled: Mass::ZERO,
        campaign: None,
    };
    for l in lines {
        t.injected += l.split.injected;
        t.mineralized += l.split.mineralized;
        t.still_dissolved += l.split.still_dissolved;
        t.not_yet_sampled += l.split.not_yet_sampled;
    }
    t
}

/// Leakage and stored summed over the lines.
pub fn kept_total(lines: &[MineralizationLine]) -> (Mass, Mass) {
    lines.iter().fold((Mass::ZERO, Mass::ZERO), |(l, s), x| {
        (l + x.leakage, s + x.stored)
    })
}
