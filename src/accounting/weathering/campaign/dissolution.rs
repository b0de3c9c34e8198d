//! The dissolved fraction of a campaign, by either method, and its uncertainty from the spread
//! of replicate cores.

use super::{CampaignError, Core, Settings, core_name, soil_analysis};
use crate::accounting::uncertainty::replicate_mean;
use crate::accounting::weathering::tau::tau;
use crate::accounting::weathering::three_end_member::{
    EndMember, MassBalanceResult, Sampling, Unresolved, forward_model, mass_balance,
};
use crate::accounting::weathering::{Analysis, WeatheringError};

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
pub(super) fn replicate_spread(
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
pub(super) fn three_end_member(
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
pub(super) fn bulk_tau(
    soil: EndMember,
    feedstock: EndMember,
    sample: Analysis,
    applied_t: f64,
    area_m2: f64,
    thickness_m: f64,
) -> Result<(f64, Option<f64>), String> {
    let kg_per_m3 = applied_t * 1e3 / (area_m2 * thickness_m);
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
