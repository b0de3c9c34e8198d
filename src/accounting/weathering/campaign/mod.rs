//! A field's soil campaigns, each read against the field's baseline soil and the feedstock
//! applied before it: the dissolved fraction by the method chosen, gross CO2, each deduction,
//! the field's emissions, net. Figures are cumulative to the campaign: every core sees all the
//! feedstock ever applied, so each campaign restates the field's removal to date, and
//! [`rollup`] credits the change since the field's previous campaign to the campaign's period.

mod dissolution;
mod rollup;

pub use rollup::{RollupLine, rollup};

use super::Analysis;
use super::composition::{FeedstockAnalysis, Immobile, SoilAnalysis};
use super::removal::{Cation, Deductions, Gross, Removal, RemovalError, gross_co2, removal};
use super::three_end_member::{EndMember, Resolution};
use crate::accounting::input::grams;
use crate::accounting::uncertainty::Estimate;
use crate::ledger::Period;
use crate::quantity::Mass;
pub use crate::quantity::measure::Depth;
use chrono::NaiveDate;
use dissolution::{bulk_tau, replicate_spread, three_end_member};
use std::collections::BTreeMap;

/// How the dissolved fraction is read from the soil.
#[derive(Debug, Clone, Copy, PartialEq, Eq, clap::ValueEnum)]
pub enum DissolutionMethod {
    /// Mass transfer coefficient of the bulk soil against the mixture at application
    /// (Brimhall & Dietrich 1987): understates dissolution, see docs/weathering.md
    Tau,
    /// Soil, fresh and weathered feedstock (Suhrhoff et al. 2025, eq. S13a–e)
    ThreeEndMember,
}

impl DissolutionMethod {
    pub fn name(self) -> &'static str {
        match self {
            DissolutionMethod::Tau => "tau",
            DissolutionMethod::ThreeEndMember => "three-end-member",
        }
    }
}

/// Everything a reading of the campaigns depends on besides the ledger.
#[derive(Debug, Clone, PartialEq)]
pub struct Settings {
    pub method: DissolutionMethod,
    pub immobile: Immobile,
    /// The cations whose loss is measured (summed by charge) and credited.
    pub mobile: Vec<Cation>,
    pub resolution: Resolution,
    pub deductions: Deductions,
}

/// A field and its area, if registered.
#[derive(Debug, Clone, PartialEq)]
pub struct Field {
    pub code: String,
    pub area_m2: Option<f64>,
}

/// A registered feedstock, analysed.
#[derive(Debug, Clone, PartialEq)]
pub struct Feedstock {
    pub code: String,
    pub analysis: FeedstockAnalysis,
    /// kg/m³.
    pub density: f64,
}

/// Feedstock spread on a field.
#[derive(Debug, Clone, PartialEq)]
pub struct Application {
    pub field: String,
    pub date: NaiveDate,
    pub feedstock: String,
    /// Dry mass of rock, exact grams.
    pub rock_g: i64,
}

/// One soil core as recorded.
#[derive(Debug, Clone, PartialEq)]
pub struct Core {
    pub seq: u64,
    pub field: String,
    pub date: NaiveDate,
    pub depth: Depth,
    /// kg/m³.
    pub bulk_density: f64,
    pub analysis: SoilAnalysis,
    pub baseline: bool,
}

/// An emission recorded at a site, with the last day it covers.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Emission<'a> {
    pub site: &'a str,
    pub period: Period,
    pub mass: Mass,
}

/// What a campaign's cores say.
#[derive(Debug, Clone, PartialEq)]
pub enum CampaignResult {
    Resolved(Resolved),
    /// No number, and why (report/tables words it).
    Finding(Finding),
}

/// Why a campaign gives no number.
#[derive(Debug, Clone, PartialEq)]
pub enum Finding {
    /// τ reads the applied rate, and the field has no area registered.
    NoFieldArea,
    /// Any other reason, in words a person can act on (none names an option).
    Reading(String),
}

/// A campaign read to the end.
#[derive(Debug, Clone, PartialEq)]
pub struct Resolved {
    pub dissolved_fraction: f64,
    /// Feedstock the cores hold, t/ha (three-end-member only): a check on the applications.
    pub found_t_per_ha: Option<f64>,
    pub gross: Gross,
    pub removal: Removal,
    /// Removal after deductions, less the field's emissions to date.
    pub net: Mass,
    /// The dissolved fraction's expanded uncertainty (95 %) from replicate cores, or why there
    /// is none.
    pub spread: Result<f64, String>,
    /// Removal after deductions had all the feedstock dissolved: what one unit of dissolved
    /// fraction is worth, so U(removal) = U(fraction) × this.
    pub removal_whole: Mass,
}

impl Resolved {
    /// Removal after deductions with its 95 % uncertainty, or why it has none.
    pub fn removal_estimate(&self) -> Result<Estimate, String> {
        let u = self.spread.clone()? * self.removal_whole.grams() as f64;
        Ok(Estimate::absolute(
            self.removal.net,
            Mass::from_grams(crate::quantity::mass::round_half_even_f64(u)),
        ))
    }
}

/// One field's campaign, cumulative to its date.
#[derive(Debug, Clone, PartialEq)]
pub struct CampaignLine {
    pub field: String,
    pub date: NaiveDate,
    /// The seqs of the cores read (a composite when several).
    pub cores: Vec<u64>,
    pub baseline: Option<NaiveDate>,
    pub feedstock: Option<String>,
    /// Feedstock applied to the field before the campaign, exact grams of rock.
    pub applied_g: i64,
    pub rate_t_per_ha: Option<f64>,
    /// The feedstock's CO2 potential for the mass applied (Renforth 2019, η = 2).
    pub potential: Mass,
    /// Emissions recorded at the field whose periods ended by the campaign.
    pub emissions: Mass,
    pub reading: CampaignResult,
}

impl CampaignLine {
    pub fn applied_t(&self) -> f64 {
        self.applied_g as f64 / 1e6
    }

    /// The same campaign with other deduction parameters: gross stays, removal and net follow.
    pub fn deduct(&mut self, deductions: &Deductions) -> Result<(), RemovalError> {
        if let CampaignResult::Resolved(r) = &mut self.reading {
            r.removal = removal(r.gross.total, deductions)?;
            let whole_gross = if r.dissolved_fraction > 0.0 {
                r.gross.total.scale(1.0 / r.dissolved_fraction)
            } else {
                r.removal_whole
            };
            r.removal_whole = removal(whole_gross, deductions)?.net;
            r.net = r.removal.net - self.emissions;
        }
        Ok(())
    }
}

/// Why the campaigns cannot be read at all (as opposed to a finding about one of them).
#[derive(Debug, Clone, PartialEq)]
pub enum CampaignError {
    /// A core of a field with no baseline soil before it.
    NoBaseline { field: String, date: NaiveDate },
    /// The immobile element chosen is not analysed in a material.
    MissingImmobile { material: String, element: Immobile },
    /// A cation chosen is not analysed in a core.
    MissingMobile { material: String, cation: Cation },
    /// A feedstock applied that is not registered.
    UnknownFeedstock { code: String },
}

// Worded in report/tables/rock_findings.rs, where the options it points to are named.
impl std::error::Error for CampaignError {}

/// The ledger's view of one field's weathering.
pub struct Inputs<'a> {
    pub fields: &'a [Field],
    pub feedstocks: &'a [Feedstock],
    pub applications: &'a [Application],
    pub cores: &'a [Core],
    pub emissions: &'a [Emission<'a>],
}

fn core_name(cores: &[&Core]) -> String {
    let seqs: Vec<String> = cores.iter().map(|c| c.seq.to_string()).collect();
    format!("soil sample seq {}", seqs.join("+"))
}

/// Cores of one field and day, as one composite analysis and mean bulk density.
fn composite(cores: &[&Core]) -> (SoilAnalysis, f64) {
    let analyses: Vec<SoilAnalysis> = cores.iter().map(|c| c.analysis.clone()).collect();
    let rho = cores.iter().map(|c| c.bulk_density).sum::<f64>() / cores.len() as f64;
    let a = SoilAnalysis::composite(&analyses).expect("a campaign has at least one core");
    (a, rho)
}

/// The mobile (Σ z·cation) and immobile contents of a soil analysis.
fn soil_analysis(
    a: &SoilAnalysis,
    material: &str,
    s: &Settings,
) -> Result<Analysis, CampaignError> {
    let mobile = a
        .mobile_charge(&s.mobile)
        .map_err(|cation| CampaignError::MissingMobile {
            material: material.into(),
            cation,
        })?;
    let immobile = a
        .immobile(s.immobile)
        .ok_or_else(|| CampaignError::MissingImmobile {
            material: material.into(),
            element: s.immobile,
        })?;
    Ok(Analysis::new(mobile, immobile))
}

fn feedstock_member(f: &Feedstock, s: &Settings) -> Result<EndMember, CampaignError> {
    let immobile =
        f.analysis
            .immobile(s.immobile)
            .ok_or_else(|| CampaignError::MissingImmobile {
                material: format!("feedstock {}", f.code),
                element: s.immobile,
            })?;
    Ok(EndMember {
        analysis: Analysis::new(f.analysis.mobile_charge(&s.mobile), immobile),
        bulk_density: f.density,
    })
}

/// Reads every campaign (the cores of a field on one day that are not baseline), field by
/// field and in date order.
pub fn campaigns(inputs: &Inputs<'_>, s: &Settings) -> Result<Vec<CampaignLine>, CampaignError> {
    let mut by_day: BTreeMap<(&str, NaiveDate, bool), Vec<&Core>> = BTreeMap::new();
    for c in inputs.cores {
        by_day
            .entry((c.field.as_str(), c.date, c.baseline))
            .or_default()
            .push(c);
    }
    let mut lines = Vec::new();
    for (&(field, date, baseline), cores) in &by_day {
        if baseline {
            continue;
        }
        let base = by_day
            .range((field, NaiveDate::MIN, true)..=(field, date, true))
            .rfind(|((f, _, b), _)| *f == field && *b);
        let Some((&(_, base_date, _), base_cores)) = base else {
            return Err(CampaignError::NoBaseline {
                field: field.into(),
                date,
            });
        };
        lines.push(campaign(
            inputs,
            s,
            field,
            date,
            cores,
            (base_date, base_cores),
        )?);
    }
    Ok(lines)
}

fn campaign(
    inputs: &Inputs<'_>,
    s: &Settings,
    field: &str,
    date: NaiveDate,
    cores: &[&Core],
    (base_date, base_cores): (NaiveDate, &[&Core]),
) -> Result<CampaignLine, CampaignError> {
    let applied: Vec<&Application> = inputs
        .applications
        .iter()
        .filter(|a| a.field == field && a.date < date)
        .collect();
    let applied_g: i64 = applied.iter().map(|a| a.rock_g).sum();
    let area_m2 = inputs
        .fields
        .iter()
        .find(|f| f.code == field)
        .and_then(|f| f.area_m2);
    let mut codes: Vec<&str> = applied.iter().map(|a| a.feedstock.as_str()).collect();
    codes.dedup();
    let feedstock = match codes.as_slice() {
        [one] => Some(
            inputs
                .feedstocks
                .iter()
                .find(|f| f.code == *one)
                .ok_or_else(|| CampaignError::UnknownFeedstock {
                    code: (*one).into(),
                })?,
        ),
        _ => None,
    };
    let applied_t = applied_g as f64 / 1e6;
    let emissions: Mass = inputs
        .emissions
        .iter()
        .filter(|e| e.site == field && e.period.to <= date)
        .map(|e| e.mass)
        .sum();
    let mut line = CampaignLine {
        field: field.into(),
        date,
        cores: cores.iter().map(|c| c.seq).collect(),
        baseline: Some(base_date),
        feedstock: feedstock.map(|f| f.code.clone()),
        applied_g,
        rate_t_per_ha: area_m2.map(|a| applied_t / (a / 1e4)),
        potential: Mass::ZERO,
        emissions,
        reading: CampaignResult::Finding(Finding::Reading(String::new())),
    };
    let Some(feedstock) = feedstock else {
        line.reading = CampaignResult::Finding(Finding::Reading(if codes.is_empty() {
            format!("no feedstock applied to {field} before {date}")
        } else {
            format!(
                "{field} received several feedstocks ({}); the mass balance takes one",
                codes.join(", ")
            )
        }));
        return Ok(line);
    };
    let kg_per_t = feedstock.analysis.potential_kg_per_t();
    line.potential = grams("potential_g", kg_per_t * applied_t * 1e3).unwrap_or(Mass::ZERO);
    line.reading = read_soil(
        s,
        feedstock,
        (cores, base_cores),
        applied_t,
        area_m2,
        emissions,
    )?;
    Ok(line)
}

/// The campaign's cores read against the baseline's, with the feedstock applied: the
/// dissolved fraction, gross CO2, removal and net, or the finding that stops them.
fn read_soil(
    s: &Settings,
    feedstock: &Feedstock,
    (cores, base_cores): (&[&Core], &[&Core]),
    applied_t: f64,
    area_m2: Option<f64>,
    emissions: Mass,
) -> Result<CampaignResult, CampaignError> {
    let (soil, rho_s) = composite(base_cores);
    let soil = EndMember {
        analysis: soil_analysis(&soil, &core_name(base_cores), s)?,
        bulk_density: rho_s,
    };
    let (sample, _) = composite(cores);
    let sample = soil_analysis(&sample, &core_name(cores), s)?;
    let feed = feedstock_member(feedstock, s)?;
    if base_cores[0].depth != cores[0].depth {
        return Ok(CampaignResult::Finding(Finding::Reading(format!(
            "sampled over {}–{} m, the baseline over {}–{} m: cores must cover the same depth",
            cores[0].depth.top_m,
            cores[0].depth.bottom_m,
            base_cores[0].depth.top_m,
            base_cores[0].depth.bottom_m
        ))));
    }
    let thickness = cores[0].depth.thickness_m();
    let area_m2 = match (s.method, area_m2) {
        (DissolutionMethod::Tau, None) => return Ok(CampaignResult::Finding(Finding::NoFieldArea)),
        (_, area) => area.unwrap_or(0.0),
    };
    let dissolve = |soil: EndMember, sample: Analysis| match s.method {
        DissolutionMethod::ThreeEndMember => three_end_member(soil, feed, sample, s, thickness),
        DissolutionMethod::Tau => bulk_tau(soil, feed, sample, applied_t, area_m2, thickness),
    };
    Ok(match dissolve(soil, sample) {
        Err(why) => CampaignResult::Finding(Finding::Reading(why)),
        Ok((f, found_t_per_ha)) => {
            let cations: Vec<_> = feedstock
                .analysis
                .cations
                .iter()
                .copied()
                .filter(|c| s.mobile.contains(&c.cation))
                .collect();
            let spread = replicate_spread((cores, base_cores), soil, sample, s, &dissolve);
            match gross_co2(f, applied_t, &cations).and_then(|g| {
                let whole = removal(gross_co2(1.0, applied_t, &cations)?.total, &s.deductions)?;
                removal(g.total, &s.deductions).map(|r| (g, r, whole.net))
            }) {
                Ok((gross, removal, removal_whole)) => CampaignResult::Resolved(Resolved {
                    dissolved_fraction: f,
                    found_t_per_ha,
                    net: removal.net - emissions,
                    gross,
                    removal,
                    spread,
                    removal_whole,
                }),
                Err(e) => CampaignResult::Finding(Finding::Reading(e.to_string())),
            }
        }
    })
}

#[cfg(test)]
mod tests;
