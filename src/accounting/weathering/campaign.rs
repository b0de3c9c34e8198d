//! A field's soil campaigns, each read against the field's baseline soil and the feedstock
//! applied before it: the dissolved fraction by the method chosen, gross CO2, each deduction,
//! the field's emissions, net. Figures are cumulative to the campaign: every core sees all the
//! feedstock ever applied, so each campaign restates the field's removal to date, and
//! [`rollup`] credits the change since the field's previous campaign to the campaign's period.

use super::composition::{FeedstockAnalysis, Immobile, SoilAnalysis};
use super::removal::{
    Cation, Deduction, Deductions, Gross, Removal, RemovalError, gross_co2, removal,
};
use super::tau::tau;
use super::three_end_member::{
    EndMember, MassBalanceResult, Resolution, Sampling, Unresolved, forward_model, mass_balance,
};
use super::{Analysis, WeatheringError};
use crate::accounting::input::grams;
use crate::accounting::uncertainty::{self, Estimate, Term, TermSign, replicate_mean};
use crate::ledger::Period;
use crate::ledger::period::{Bucket, Grouping, apportion};
use crate::quantity::Mass;
pub use crate::quantity::measure::Depth;
use chrono::NaiveDate;
use std::collections::BTreeMap;
use std::fmt;

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
    /// No number: why, in words a person can act on.
    Finding(String),
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

impl fmt::Display for CampaignError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            CampaignError::NoBaseline { field, date } => write!(
                f,
                "field {field} has no baseline soil sample (record soil-sample … --baseline) on or before its sample of {date}"
            ),
            CampaignError::MissingImmobile { material, element } => write!(
                f,
                "{material} has no {} analysed; choose an immobile element every analysis reports",
                element.symbol()
            ),
            CampaignError::MissingMobile { material, cation } => write!(
                f,
                "{material} has no {} analysed; leave it out of the mobile cations or record it",
                cation.symbol()
            ),
            CampaignError::UnknownFeedstock { code } => {
                write!(f, "feedstock {code} is applied but not registered")
            }
        }
    }
}

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
        reading: CampaignResult::Finding(String::new()),
    };
    let Some(feedstock) = feedstock else {
        line.reading = CampaignResult::Finding(if codes.is_empty() {
            format!("no feedstock applied to {field} before {date}")
        } else {
            format!(
                "{field} received several feedstocks ({}); the mass balance takes one",
                codes.join(", ")
            )
        });
        return Ok(line);
    };
    let kg_per_t = feedstock.analysis.potential_kg_per_t();
    line.potential = grams("potential_g", kg_per_t * applied_t * 1e3).unwrap_or(Mass::ZERO);

    let (soil, rho_s) = composite(base_cores);
    let soil = EndMember {
        analysis: soil_analysis(&soil, &core_name(base_cores), s)?,
        bulk_density: rho_s,
    };
    let (sample, _) = composite(cores);
    let sample = soil_analysis(&sample, &core_name(cores), s)?;
    let feed = feedstock_member(feedstock, s)?;
    if base_cores[0].depth != cores[0].depth {
        line.reading = CampaignResult::Finding(format!(
            "sampled over {}–{} m, the baseline over {}–{} m: cores must cover the same depth",
            cores[0].depth.top_m,
            cores[0].depth.bottom_m,
            base_cores[0].depth.top_m,
            base_cores[0].depth.bottom_m
        ));
        return Ok(line);
    }
    let thickness = cores[0].depth.thickness_m();
    let dissolve = |soil: EndMember, sample: Analysis| match s.method {
        DissolutionMethod::ThreeEndMember => three_end_member(soil, feed, sample, s, thickness),
        DissolutionMethod::Tau => bulk_tau(soil, feed, sample, applied_t, area_m2, thickness),
    };
    line.reading = match dissolve(soil, sample) {
        Err(why) => CampaignResult::Finding(why),
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
                Err(e) => CampaignResult::Finding(e.to_string()),
            }
        }
    };
    Ok(line)
}

/// What a replicate core stands in for: the soil and the sample it is read as.
type Pairing<'a> = &'a dyn Fn(&Core) -> Result<(EndMember, Analysis), CampaignError>;
/// The dissolved fraction (and the feedstock found) of a soil and a sample.
type Dissolve<'a> = &'a dyn Fn(EndMember, Analysis) -> Result<(f64, Option<f64>), String>;

/// The dissolved fraction each core gives read alone.
fn fractions(
    list: &[&Core],
    pairing: Pairing<'_>,
    dissolve: Dissolve<'_>,
) -> Result<Vec<f64>, String> {
    list.iter()
        .map(|c| {
            let (soil, sample) = pairing(c).map_err(|e| e.to_string())?;
            dissolve(soil, sample)
                .map(|(f, _)| f)
                .map_err(|why| format!("core seq {} read alone: {why}", c.seq))
        })
        .collect()
}

/// The 95 % uncertainty of a campaign's dissolved fraction from the spread of its replicate
/// cores: each core read alone against the composite baseline gives a fraction, and
/// U = t(0.975, n − 1)·s/√n of them; where the baseline has replicates too, each baseline core
/// read against the composite sample gives its own U, and the two combine in quadrature (the
/// cores of the two days are taken independently). A campaign of one core has no spread.
fn replicate_spread(
    (cores, base_cores): (&[&Core], &[&Core]),
    soil: EndMember,
    sample: Analysis,
    s: &Settings,
    dissolve: Dissolve<'_>,
) -> Result<f64, String> {
    if cores.len() < 2 {
        return Err(format!(
            "one core ({}): no replicate spread to estimate an uncertainty from",
            core_name(cores)
        ));
    }
    let sampled = fractions(
        cores,
        &|c| Ok((soil, soil_analysis(&c.analysis, &core_name(&[c]), s)?)),
        dissolve,
    )?;
    let (_, u_sample) = replicate_mean(&sampled).ok_or("the replicate fractions are not finite")?;
    if base_cores.len() < 2 {
        return Ok(u_sample);
    }
    let as_soil = |c: &Core| {
        let member = EndMember {
            analysis: soil_analysis(&c.analysis, &core_name(&[c]), s)?,
            bulk_density: c.bulk_density,
        };
        Ok((member, sample))
    };
    let baseline = fractions(base_cores, &as_soil, dissolve)?;
    let (_, u_base) =
        replicate_mean(&baseline).ok_or("the replicate baseline fractions are not finite")?;
    Ok(u_sample.hypot(u_base))
}

/// Three-end-member mass balance: the dissolved fraction and the feedstock the cores hold.
fn three_end_member(
    soil: EndMember,
    feedstock: EndMember,
    sample: Analysis,
    s: &Settings,
    thickness_m: f64,
) -> Result<(f64, Option<f64>), String> {
    let sampling = Sampling {
        soil: Some(soil),
        feedstock,
        sample,
    };
    let element = s.immobile.symbol();
    match mass_balance(&sampling, &s.resolution) {
        Ok(MassBalanceResult::Resolved(b)) => Ok((
            b.dissolved_fraction,
            Some(b.applied_kg_per_m3 * thickness_m * 10.0),
        )),
        Ok(MassBalanceResult::OutOfRange { balance, why }) => Err(format!(
            "out of range: {why} (X_f = {:.5}, X_wf = {:.5})",
            balance.x_f, balance.x_wf
        )),
        Ok(MassBalanceResult::Inconclusive { contrast, why }) => Err(match why {
            Unresolved::ImmobileContrast { threshold } => format!(
                "inconclusive: feedstock and soil differ by {contrast:.3} (relative) in {element}, less than the {threshold} needed to see the feedstock"
            ),
            Unresolved::MobileContrast { threshold } => format!(
                "inconclusive: the cations separate feedstock from soil by {contrast:.3} (relative), less than the {threshold} needed"
            ),
        }),
        Err(e) => Err(weathering_finding(e)),
    }
}

/// τ of the core against the mixture at application (baseline soil with the applied feedstock,
/// nothing dissolved), read as −τ: the bulk reading that understates dissolution.
fn bulk_tau(
    soil: EndMember,
    feedstock: EndMember,
    sample: Analysis,
    applied_t: f64,
    area_m2: Option<f64>,
    thickness_m: f64,
) -> Result<(f64, Option<f64>), String> {
    let area = area_m2.ok_or("the field has no area: register it with --area")?;
    let kg_per_m3 = applied_t * 1e3 / (area * thickness_m);
    let parent = forward_model(&soil, &feedstock, kg_per_m3, 0.0).map_err(weathering_finding)?;
    let t = tau(&parent, &sample).map_err(weathering_finding)?;
    let f = t.bulk_dissolved_fraction();
    if !(0.0..=1.0).contains(&f) {
        return Err(format!(
            "out of range: τ = {:+.4} against the mixture at application ({})",
            t.tau,
            if f < 0.0 {
                "a gain, not a loss"
            } else {
                "more than all of it lost"
            }
        ));
    }
    Ok((f, None))
}

fn weathering_finding(e: WeatheringError) -> String {
    format!("not computable: {e}")
}

/// One reporting period of a project's weathering.
#[derive(Debug, Clone, PartialEq)]
pub struct RollupLine {
    pub bucket: Bucket,
    /// Rock applied in the period, exact grams.
    pub applied_g: i64,
    /// Change in gross CO2 credited by the period's campaigns.
    pub gross: Mass,
    pub deducted: [(Deduction, Mass); 4],
    /// Change in removal after deductions.
    pub removal: Mass,
    /// Every emission of the project in the period (days apportioned).
    pub emissions: Mass,
    pub net: Mass,
    pub cumulative_net: Mass,
    /// Net with its 95 % uncertainty: each field's change is its campaign's removal less the
    /// previous one, their uncertainties in quadrature; fields and emissions (stated exact) too.
    pub uncertainty: Estimate,
    /// The campaigns credited here whose removal has no uncertainty estimate, and why.
    pub unestimated: Vec<String>,
}

/// Per period: the change each campaign brings to its field's removal (gross and each
/// deduction), the rock applied and every emission of the project. A campaign that cannot be
/// read changes nothing: the field's last read stands until one can.
pub fn rollup(
    lines: &[CampaignLine],
    applications: &[Application],
    emissions: &[Emission<'_>],
    grouping: Grouping,
) -> Vec<RollupLine> {
    let empty = |bucket| RollupLine {
        bucket,
        applied_g: 0,
        gross: Mass::ZERO,
        deducted: Deduction::ALL.map(|d| (d, Mass::ZERO)),
        removal: Mass::ZERO,
        emissions: Mass::ZERO,
        net: Mass::ZERO,
        cumulative_net: Mass::ZERO,
        uncertainty: Estimate::absolute(Mass::ZERO, Mass::ZERO),
        unestimated: Vec::new(),
    };
    let mut by: BTreeMap<Bucket, RollupLine> = BTreeMap::new();
    let mut terms: BTreeMap<Bucket, Vec<Term>> = BTreeMap::new();
    for a in applications {
        let b = grouping.bucket(a.date);
        by.entry(b).or_insert_with(|| empty(b)).applied_g += a.rock_g;
    }
    for e in emissions {
        for (b, g) in apportion(e.mass.grams(), e.period, grouping) {
            by.entry(b).or_insert_with(|| empty(b)).emissions += Mass::from_grams(g);
        }
    }
    let exact = |m: Mass| Estimate::absolute(m, Mass::ZERO);
    let mut last: BTreeMap<&str, (Mass, [Mass; 4], Estimate)> = BTreeMap::new();
    for l in lines {
        let CampaignResult::Resolved(r) = &l.reading else {
            continue;
        };
        let b = grouping.bucket(l.date);
        let line = by.entry(b).or_insert_with(|| empty(b));
        let estimate = r.removal_estimate().unwrap_or_else(|why| {
            line.unestimated
                .push(format!("{} {}: {why}", l.field, l.date));
            exact(r.removal.net)
        });
        let now = (r.gross.total, r.removal.deducted.map(|(_, m)| m), estimate);
        let before =
            last.insert(&l.field, now)
                .unwrap_or((Mass::ZERO, [Mass::ZERO; 4], exact(Mass::ZERO)));
        line.gross += now.0 - before.0;
        for (k, slot) in line.deducted.iter_mut().enumerate() {
            slot.1 += now.1[k] - before.1[k];
        }
        line.removal += now.2.value() - before.2.value();
        let t = terms.entry(b).or_default();
        t.push(term(TermSign::Adds, now.2));
        t.push(term(TermSign::Deducts, before.2));
    }
    let mut cumulative = Mass::ZERO;
    by.into_values()
        .map(|mut l| {
            l.net = l.removal - l.emissions;
            cumulative += l.net;
            l.cumulative_net = cumulative;
            let mut t = terms.remove(&l.bucket).unwrap_or_default();
            t.push(term(TermSign::Deducts, exact(l.emissions)));
            let u = uncertainty::mass_balance(&t).map_or(0.0, |e| e.abs_u_grams());
            l.uncertainty = Estimate::absolute(
                l.net,
                Mass::from_grams(crate::quantity::mass::round_half_even_f64(u)),
            );
            l
        })
        .collect()
}

fn term(sign: TermSign, estimate: Estimate) -> Term {
    Term {
        name: "removal".into(),
        sign,
        estimate,
    }
}

#[cfg(test)]
mod tests {
    use super::super::composition::Unit;
    use super::*;

    fn day(s: &str) -> NaiveDate {
        NaiveDate::parse_from_str(s, "%Y-%m-%d").unwrap()
    }

    fn pairs(list: &[(&str, f64)]) -> Vec<(String, f64)> {
        list.iter().map(|&(n, v)| (n.to_string(), v)).collect()
    }

    fn feedstock(code: &str) -> Feedstock {
        let oxides = pairs(&[("CaO", 9.4), ("MgO", 7.8), ("TiO2", 1.9)]);
        Feedstock {
            code: code.into(),
            analysis: FeedstockAnalysis::new(&oxides, Unit::WtPct, &[], Unit::WtPct).unwrap(),
            density: 2900.0,
        }
    }

    fn core(seq: u64, date: &str, ca: f64, ti: f64, baseline: bool, bottom_m: f64) -> Core {
        Core {
            seq,
            field: "F1".into(),
            date: day(date),
            depth: Depth {
                top_m: 0.0,
                bottom_m,
            },
            bulk_density: 1300.0,
            analysis: SoilAnalysis::new(&pairs(&[("Ca", ca), ("Ti", ti)]), Unit::MolPerKg).unwrap(),
            baseline,
        }
    }

    fn settings() -> Settings {
        Settings {
            method: DissolutionMethod::ThreeEndMember,
            immobile: Immobile::Ti,
            mobile: vec![Cation::Ca],
            resolution: Resolution::DEFAULT,
            deductions: Deductions::default(),
        }
    }

    fn spread(date: &str, code: &str, t: i64) -> Application {
        Application {
            field: "F1".into(),
            date: day(date),
            feedstock: code.into(),
            rock_g: t * 1_000_000,
        }
    }

    /// Ca and Ti of a core after `kg_m3` of feedstock with `f` dissolved, from a soil of
    /// 0.15 mol Ca and 0.075 mol Ti per kg (the model runs on charge, 2 per Ca).
    fn mixed(kg_m3: f64, f: f64) -> (f64, f64) {
        let feed = feedstock("B");
        let soil = EndMember {
            analysis: Analysis::new(2.0 * 0.15, 0.075),
            bulk_density: 1300.0,
        };
        let fm = feedstock_member(&feed, &settings()).unwrap();
        let a = forward_model(&soil, &fm, kg_m3, f).unwrap();
        (a.mobile.unwrap() / 2.0, a.immobile.unwrap())
    }

    fn read(apps: &[Application], cores: &[Core], emissions: &[Emission<'_>]) -> Vec<CampaignLine> {
        let fields = [Field {
            code: "F1".into(),
            area_m2: Some(100_000.0),
        }];
        let feedstocks = [feedstock("B"), feedstock("C")];
        let inputs = Inputs {
            fields: &fields,
            feedstocks: &feedstocks,
            applications: apps,
            cores,
            emissions,
        };
        campaigns(&inputs, &settings()).unwrap()
    }

    fn finding(l: &CampaignLine) -> &str {
        match &l.reading {
            CampaignResult::Finding(w) => w,
            CampaignResult::Resolved(r) => panic!("resolved: {r:?}"),
        }
    }

    #[test]
    fn campaigns_restate_and_rollup_credits_the_change() {
        // 500 t on 10 ha into 0.2 m: 25 kg/m³; a year later 900 t: 45 kg/m³.
        let (ca1, ti1) = mixed(25.0, 0.1);
        let (ca2, ti2) = mixed(45.0, 0.2);
        let cores = [
            core(0, "2025-03-01", 0.15, 0.075, true, 0.2),
            core(2, "2025-10-01", ca1, ti1, false, 0.2),
            core(4, "2026-10-01", ca2, ti2, false, 0.2),
        ];
        let apps = [
            spread("2025-04-01", "B", 500),
            spread("2026-04-01", "B", 400),
        ];
        let emissions = [Emission {
            site: "MILL",
            period: Period::new(day("2025-12-01"), day("2026-01-31")).unwrap(),
            mass: Mass::from_grams(62_000),
        }];
        let lines = read(&apps, &cores, &emissions);
        let resolved = |l: &CampaignLine| match &l.reading {
            CampaignResult::Resolved(r) => r.clone(),
            CampaignResult::Finding(w) => panic!("{w}"),
        };
        let (r1, r2) = (resolved(&lines[0]), resolved(&lines[1]));
        assert!((r1.dissolved_fraction - 0.1).abs() < 1e-9);
        assert!((r2.dissolved_fraction - 0.2).abs() < 1e-9);
        assert_eq!(lines[1].applied_g, 900_000_000);
        assert_eq!(lines[1].rate_t_per_ha, Some(90.0));
        let roll = rollup(&lines, &apps, &emissions, Grouping::Year);
        assert_eq!(roll[0].gross, r1.gross.total);
        assert_eq!(roll[1].gross, r2.gross.total - r1.gross.total);
        assert_eq!(roll[1].removal, r2.removal.net - r1.removal.net);
        // 62 kg over 31 + 31 days: half in each year.
        assert_eq!(roll[0].emissions, Mass::from_grams(31_000));
        assert_eq!(roll[1].net, roll[1].removal - Mass::from_grams(31_000));
        assert_eq!(roll[1].cumulative_net, roll[0].net + roll[1].net);
        assert_eq!(roll[1].applied_g, 400_000_000);
    }

    #[test]
    fn replicate_cores_spread_and_baseline_replicates_add_in_quadrature() {
        // Three cores at 0.28, 0.30, 0.32 dissolved: U = 4.303 × 0.02 / √3 of fraction.
        let apps = [spread("2025-04-01", "B", 500)];
        let sampled: Vec<Core> = [0.28, 0.30, 0.32]
            .iter()
            .enumerate()
            .map(|(i, f)| {
                let (ca, ti) = mixed(25.0, *f);
                core(10 + i as u64, "2025-10-01", ca, ti, false, 0.2)
            })
            .collect();
        let spread_of = |baseline: &[Core]| {
            let mut all = baseline.to_vec();
            all.extend(sampled.iter().cloned());
            match &read(&apps, &all, &[])[0].reading {
                CampaignResult::Resolved(r) => r.spread.clone(),
                CampaignResult::Finding(w) => panic!("{w}"),
            }
        };
        let one = spread_of(&[core(0, "2025-03-01", 0.15, 0.075, true, 0.2)]).unwrap();
        assert!((one - 4.303 * 0.02 / 3f64.sqrt()).abs() < 1e-6, "{one}");
        // Two identical baseline cores have no spread: nothing added.
        let same = spread_of(&[
            core(0, "2025-03-01", 0.15, 0.075, true, 0.2),
            core(1, "2025-03-01", 0.15, 0.075, true, 0.2),
        ])
        .unwrap();
        assert!((same - one).abs() < 1e-12);
        // Two that differ widen it: √(U_sample² + U_baseline²) > U_sample.
        let apart = spread_of(&[
            core(0, "2025-03-01", 0.148, 0.075, true, 0.2),
            core(1, "2025-03-01", 0.152, 0.075, true, 0.2),
        ])
        .unwrap();
        assert!(apart > one, "{apart} vs {one}");
        // One core: no spread, and why.
        let (ca, ti) = mixed(25.0, 0.3);
        let single = [
            core(0, "2025-03-01", 0.15, 0.075, true, 0.2),
            core(2, "2025-10-01", ca, ti, false, 0.2),
        ];
        match &read(&apps, &single, &[])[0].reading {
            CampaignResult::Resolved(r) => assert!(
                r.spread.as_ref().unwrap_err().contains("one core"),
                "{:?}",
                r.spread
            ),
            CampaignResult::Finding(w) => panic!("{w}"),
        }
    }

    #[test]
    fn findings_instead_of_numbers() {
        let base = core(0, "2025-03-01", 0.15, 0.075, true, 0.2);
        let (ca, ti) = mixed(25.0, 0.1);
        let later = core(2, "2025-10-01", ca, ti, false, 0.2);
        let none = read(&[], &[base.clone(), later.clone()], &[]);
        assert_eq!(
            finding(&none[0]),
            "no feedstock applied to F1 before 2025-10-01"
        );
        let two = [
            spread("2025-04-01", "B", 250),
            spread("2025-04-02", "C", 250),
        ];
        let mixed_up = read(&two, &[base.clone(), later.clone()], &[]);
        assert!(finding(&mixed_up[0]).contains("several feedstocks (B, C)"));
        let deeper = core(2, "2025-10-01", ca, ti, false, 0.3);
        let apps = [spread("2025-04-01", "B", 500)];
        let depth = read(&apps, &[base.clone(), deeper], &[]);
        assert!(finding(&depth[0]).contains("cores must cover the same depth"));
        // A field with no baseline at all is a refusal, not a finding.
        let inputs = Inputs {
            fields: &[],
            feedstocks: &[feedstock("B")],
            applications: &apps,
            cores: &[later],
            emissions: &[],
        };
        assert_eq!(
            campaigns(&inputs, &settings()),
            Err(CampaignError::NoBaseline {
                field: "F1".into(),
                date: day("2025-10-01")
            })
        );
    }
}
