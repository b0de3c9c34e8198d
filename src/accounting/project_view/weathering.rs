//! Enhanced weathering: the soil campaigns of each field read against its baseline and the
//! feedstock applied, rolled up by period into gross, deductions, removal, emissions and net.
//! The deduction parameters are the project's dated settings: each campaign takes those in
//! force on the last day of its claim period, so a parameter set from July changes only the
//! periods ending after it.

use super::{ProjectFigures, ViewError};
use crate::accounting::weathering::campaign::{
    CampaignLine, CampaignResult, DissolutionMethod, Field, Inputs, RollupLine, Settings,
    campaigns, rollup,
};
use crate::accounting::weathering::composition::Immobile;
use crate::accounting::weathering::removal::{Cation, Deduction, Deductions, RemovalError};
use crate::accounting::weathering::three_end_member::Resolution;
use crate::ledger::SiteKind;
use crate::ledger::period::{Bucket, Grouping};
use crate::ledger::setting::{SettingName, in_force};
use crate::quantity::Mass;
use crate::quantity::area::Area;
use chrono::NaiveDate;

/// The settings `balance`, `totals`, `chart` and `reconcile` read campaigns with: every default
/// (the deduction parameters are then replaced by the project's, see
/// [`ProjectFigures::project_deductions`]).
pub fn default_settings() -> Settings {
    Settings {
        method: DissolutionMethod::ThreeEndMember,
        immobile: Immobile::Ti,
        mobile: Cation::ALL.to_vec(),
        resolution: Resolution::DEFAULT,
        deductions: Deductions::default(),
    }
}

/// The project setting that holds a deduction's parameter.
pub fn deduction_setting(d: Deduction) -> SettingName {
    match d {
        Deduction::StrongAcid => SettingName::StrongAcid,
        Deduction::CationRetention => SettingName::CationRetention,
        Deduction::SecondaryCarbonate => SettingName::SecondaryCarbonate,
        Deduction::OceanReequilibration => SettingName::OceanEfficiency,
    }
}

/// The emissions a field-by-field table counts: those at the fields in scope, and (over the
/// whole project) those recorded at other sites.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct EmissionsInScope {
    pub recorded: Mass,
    pub elsewhere: Mass,
}

/// The project to date: each field's latest campaign that gave a number, less every emission
/// recorded.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct CampaignTotal {
    pub applied_g: i64,
    pub potential: Mass,
    pub gross: Mass,
    pub deducted: [Mass; 4],
    pub emissions: Mass,
    pub net: Mass,
}

impl ProjectFigures {
    /// Each soil campaign of the fields (or the one field), read with `s`.
    pub fn weathering_campaigns(
        &self,
        s: &Settings,
        only: Option<&str>,
    ) -> Result<Vec<CampaignLine>, ViewError> {
        let wanted = |site: &str| only.is_none_or(|f| f == site);
        let fields: Vec<Field> = self
            .sites()
            .iter()
            .filter(|s| s.kind == SiteKind::Field && wanted(&s.code))
            .map(|s| Field {
                code: s.code.clone(),
                area_m2: s
                    .area
                    .as_deref()
                    .and_then(|a| Area::parse(a).ok())
                    .map(|a| a.m2()),
            })
            .collect();
        let applications: Vec<_> = self
            .view
            .applications
            .iter()
            .filter(|a| wanted(&a.field))
            .cloned()
            .collect();
        let cores: Vec<_> = self
            .view
            .cores
            .iter()
            .filter(|c| wanted(&c.field))
            .cloned()
            .collect();
        let emissions = self.view.emissions.per_site_end();
        campaigns(
            &Inputs {
                fields: &fields,
                feedstocks: &self.view.feedstocks,
                applications: &applications,
                cores: &cores,
                emissions: &emissions,
            },
            s,
        )
        .map_err(ViewError::Campaign)
    }

    /// The deduction parameters in force on `day`: each the project's setting where one is,
    /// with its date and source, else the default with its source.
    pub fn deductions_on(&self, day: NaiveDate) -> Result<Deductions, ViewError> {
        let mut d = Deductions::default();
        for k in Deduction::ALL {
            let Some(s) = in_force(&self.view.settings, deduction_setting(k), day) else {
                continue;
            };
            let bad = |what: String| ViewError::Setting {
                project: s.project.clone(),
                what: format!("setting {} ({}): {what}", s.seq, s.name.name()),
            };
            let v: f64 = s
                .value
                .parse()
                .map_err(|_| bad(format!("value {:?} is not a number", s.value)))?;
            let source = s
                .source
                .clone()
                .unwrap_or_else(|| "no source recorded".into());
            d = d
                .set_from(k, v, source, Some(s.from()))
                .map_err(|e| bad(e.to_string()))?;
        }
        Ok(d)
    }

    /// The claim period a campaign of `date` is credited to, and the day it reads its
    /// deduction parameters on (the period's last day, or `--through` where earlier).
    pub fn deductions_day(&self, date: NaiveDate) -> (Bucket, NaiveDate) {
        let b = self.claim_period().bucket(date);
        (b, self.settings_day(b))
    }

    /// Re-reads each campaign with the deduction parameters of its claim period, each given
    /// parameter of `what_if` overriding the project's; returns each distinct set of parameters
    /// used with the claim periods that use it.
    pub fn project_deductions(
        &self,
        lines: &mut [CampaignLine],
        what_if: &dyn Fn(Deductions) -> Result<Deductions, RemovalError>,
    ) -> Result<Vec<(Deductions, Vec<Bucket>)>, ViewError> {
        let mut used: Vec<(Deductions, Vec<Bucket>)> = Vec::new();
        for l in lines {
            let (bucket, day) = self.deductions_day(l.date);
            let bad = |e: RemovalError| ViewError::Setting {
                project: self.project().code.clone(),
                what: format!("deductions in force on {day}: {e}"),
            };
            let d = what_if(self.deductions_on(day)?).map_err(bad)?;
            l.deduct(&d).map_err(bad)?;
            match used.iter_mut().find(|(u, _)| *u == d) {
                Some((_, periods)) if periods.contains(&bucket) => {}
                Some((_, periods)) => periods.push(bucket),
                None => used.push((d, vec![bucket])),
            }
        }
        Ok(used)
    }

    /// The deduction parameters the claim periods of `periods` use (those in force on each
    /// one's last day), each distinct set with its periods; with no campaign, today's.
    pub fn deductions_used(
        &self,
        periods: &[Bucket],
    ) -> Result<Vec<(Deductions, Vec<Bucket>)>, ViewError> {
        let mut used: Vec<(Deductions, Vec<Bucket>)> = Vec::new();
        for b in periods {
            let d = self.deductions_on(self.settings_day(*b))?;
            match used.iter_mut().find(|(u, _)| *u == d) {
                Some((_, ps)) => ps.push(*b),
                None => used.push((d, vec![*b])),
            }
        }
        if used.is_empty() {
            used.push((self.deductions_on(NaiveDate::MAX)?, Vec::new()));
        }
        Ok(used)
    }

    /// By period, with every default setting but the project's deduction parameters, and how
    /// many campaigns gave no number.
    pub fn weathering_rollup(
        &self,
        grouping: Grouping,
    ) -> Result<(Vec<RollupLine>, usize), ViewError> {
        let mut lines = self.weathering_campaigns(&default_settings(), None)?;
        self.project_deductions(&mut lines, &Ok)?;
        let unread = lines
            .iter()
            .filter(|l| matches!(l.reading, CampaignResult::Finding(_)))
            .count();
        let emissions = self.view.emissions.per_period(grouping);
        let roll = rollup(&lines, &self.view.applications, &emissions, grouping);
        Ok((roll, unread))
    }

    /// Whether `code` is a field of the project.
    pub fn is_field(&self, code: &str) -> bool {
        self.sites()
            .iter()
            .any(|s| s.code == code && s.kind == SiteKind::Field)
    }

    /// Emissions at the fields in scope, and those at sites that are not fields.
    pub fn emissions_in_scope(&self, only: Option<&str>) -> EmissionsInScope {
        let fields: Vec<&str> = self
            .sites()
            .iter()
            .filter(|s| s.kind == SiteKind::Field)
            .map(|s| s.code.as_str())
            .collect();
        let sum = |keep: &dyn Fn(&str) -> bool| self.view.emissions.at_sites(keep);
        EmissionsInScope {
            recorded: sum(&|site| only.is_none_or(|f| f == site)),
            elsewhere: sum(&|site| only.is_none() && !fields.contains(&site)),
        }
    }
}

/// Each field's latest campaign that gave a number, summed, less `recorded` emissions.
pub fn campaign_total(lines: &[CampaignLine], recorded: Mass) -> CampaignTotal {
    let mut latest: Vec<&CampaignLine> = Vec::new();
    for l in lines.iter().rev() {
        if matches!(l.reading, CampaignResult::Resolved(_))
            && !latest.iter().any(|x| x.field == l.field)
        {
            latest.push(l);
        }
    }
    let mut t = CampaignTotal {
        applied_g: 0,
        potential: Mass::ZERO,
        gross: Mass::ZERO,
        deducted: [Mass::ZERO; 4],
        emissions: recorded,
        net: Mass::ZERO,
    };
    for l in &latest {
        if let CampaignResult::Resolved(r) = &l.reading {
            t.applied_g += l.applied_g;
            t.potential += l.potential;
            t.gross += r.gross.total;
            for (s, (_, m)) in t.deducted.iter_mut().zip(r.removal.deducted) {
                *s += m;
            }
            t.net += r.removal.net;
        }
    }
    t.net = t.net - recorded;
    t
}
