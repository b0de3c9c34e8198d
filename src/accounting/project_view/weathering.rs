//! Enhanced weathering: the soil campaigns of each field read against its baseline and the
//! feedstock applied, rolled up by period into gross, deductions, removal, emissions and net.

use super::{ProjectFigures, ViewError};
use crate::accounting::weathering::campaign::{
    CampaignLine, DissolutionMethod, Emission, Field, Inputs, Reading, RollupLine, Settings,
    campaigns, rollup,
};
use crate::accounting::weathering::composition::Immobile;
use crate::accounting::weathering::removal::{Cation, Deductions};
use crate::accounting::weathering::three_end_member::Resolution;
use crate::ledger::period::Grouping;
use crate::ledger::{EntryKind, SiteKind};
use crate::quantity::Mass;
use crate::quantity::area::Area;

/// The settings `balance`, `totals`, `chart` and `reconcile` read campaigns with: every default.
pub fn default_settings() -> Settings {
    Settings {
        method: DissolutionMethod::ThreeEndMember,
        immobile: Immobile::Ti,
        mobile: Cation::ALL.to_vec(),
        resolution: Resolution::DEFAULT,
        deductions: Deductions::default(),
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
    fn emissions(&self) -> Vec<Emission<'_>> {
        self.entries()
            .filter(|e| e.kind == EntryKind::Emission)
            .map(|e| Emission {
                site: &e.site,
                period: e.period,
                mass: e.mass,
            })
            .collect()
    }

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
        let emissions = self.emissions();
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

    /// By period, with every default setting, and how many campaigns gave no number.
    pub fn weathering_rollup(
        &self,
        grouping: Grouping,
    ) -> Result<(Vec<RollupLine>, usize), ViewError> {
        let lines = self.weathering_campaigns(&default_settings(), None)?;
        let unread = lines
            .iter()
            .filter(|l| matches!(l.reading, Reading::Finding(_)))
            .count();
        let roll = rollup(&lines, &self.view.applications, &self.emissions(), grouping);
        Ok((roll, unread))
    }

    /// Emissions at the fields in scope, and those at sites that are not fields.
    pub fn emissions_in_scope(&self, only: Option<&str>) -> EmissionsInScope {
        let fields: Vec<&str> = self
            .sites()
            .iter()
            .filter(|s| s.kind == SiteKind::Field)
            .map(|s| s.code.as_str())
            .collect();
        let sum = |keep: &dyn Fn(&str) -> bool| -> Mass {
            self.entries()
                .filter(|e| e.kind == EntryKind::Emission && keep(&e.site))
                .map(|e| e.mass)
                .sum()
        };
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
        if matches!(l.reading, Reading::Resolved(_)) && !latest.iter().any(|x| x.field == l.field) {
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
        if let Reading::Resolved(r) = &l.reading {
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
