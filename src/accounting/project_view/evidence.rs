//! The rock routes' stored readings decoded back into model inputs: tracer samples, carbonation
//! batches, applications, soil cores and feedstock analyses. The field names read here are the
//! ones `record` writes; a value that no longer decodes is an inconsistency of the ledger.

use super::ViewError;
use crate::accounting::carbonation::{Carbonation, uptake};
use crate::accounting::tracer::TracerSample;
use crate::accounting::weathering::campaign::{Application, Core, Feedstock as Analysed};
use crate::accounting::weathering::composition::{
    FeedstockAnalysis, SOIL_ELEMENTS, SoilAnalysis, Unit,
};
use crate::ledger::feedstock::Feedstock;
use crate::ledger::{Entry, Reading};
use crate::quantity::Decimal;
use crate::quantity::mass::grams_of_f64;
use crate::quantity::measure::{DENSITY, parse_depth, parse_measure};

type Decoded<T> = Result<T, String>;

fn field<'a>(r: &'a Reading, name: &'static str) -> Decoded<&'a str> {
    r.text(name)
        .ok_or_else(|| format!("reading has no {name} field"))
}

fn decimal(r: &Reading, name: &'static str) -> Decoded<f64> {
    r.number(name)
        .map_err(|e| e.to_string())?
        .ok_or_else(|| format!("reading has no {name} field"))
}

fn grams(r: &Reading, name: &'static str) -> Decoded<i64> {
    r.grams(name)
        .map_err(|e| e.to_string())?
        .map(|m| m.grams())
        .ok_or_else(|| format!("reading has no {name} field"))
}

fn undecodable(e: &Entry, what: String) -> ViewError {
    ViewError::Undecodable {
        project: e.project.clone(),
        seq: e.seq,
        kind: e.kind,
        what,
    }
}

/// The sample a tracer-sample reading records (the injectate's tracer is the unit of X).
pub fn tracer_sample(r: &Reading) -> Decoded<TracerSample> {
    Ok(TracerSample {
        tracer_sample: decimal(r, "tracer_ratio")?,
        tracer_injectate: 1.0,
        dic_sample: decimal(r, "dic_sample")?,
        dic_injectate: decimal(r, "dic_injectate")?,
        dic_background: decimal(r, "dic_background")?,
    })
}

/// A tracer-sample entry's sample.
pub fn tracer_of(e: &Entry) -> Result<TracerSample, ViewError> {
    tracer_sample(&e.reading).map_err(|w| undecodable(e, w))
}

/// A carbonation batch: dry feed and product, in grams (the uptake is the entry's mass); the
/// CO2 the solid released when its CO2 content fell (an emission of the batch); and the
/// uptake's stated relative uncertainty (95 %) where the record gives one.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Batch {
    pub fed_g: i64,
    pub product_g: i64,
    pub released_g: i64,
    pub rel_u: Option<f64>,
}

/// The dry feed and product of a carbonation reading: the CO2-free solid is conserved, so the
/// product weighs M(1 − w_before)/(1 − w_after); a solid whose CO2 content fell released
/// M(w_before − w_after)/(1 − w_after), as `record carbonation` computed it.
pub fn batch_of(e: &Entry) -> Result<Batch, ViewError> {
    let r = &e.reading;
    let read = || -> Decoded<Batch> {
        let fed_g = grams(r, "fed_mass")?;
        let (before, after) = (decimal(r, "co2_before")?, decimal(r, "co2_after")?);
        let ratio = (1.0 - before) / (1.0 - after);
        let product_g = grams_of_f64(fed_g as f64 * ratio)
            .ok_or_else(|| format!("product of {fed_g} g fed is out of range"))?;
        let released_g = match uptake(fed_g as f64 / 1e6, before, after) {
            Ok(Carbonation::NoUptake { released, .. }) => released.grams(),
            Ok(Carbonation::Uptake { .. }) => 0,
            Err(why) => return Err(why.to_string()),
        };
        let rel_u = r.uncertainty().map_err(|e| e.to_string())?;
        Ok(Batch {
            fed_g,
            product_g,
            released_g,
            rel_u,
        })
    };
    read().map_err(|w| undecodable(e, w))
}

/// An application as the weathering accounts read it.
pub fn application_of(e: &Entry) -> Result<Application, ViewError> {
    let r = &e.reading;
    let read = || -> Decoded<Application> {
        Ok(Application {
            field: e.site.clone(),
            date: e.period.from,
            feedstock: field(r, "feedstock")?.to_string(),
            rock_g: grams(r, "mass")?,
        })
    };
    read().map_err(|w| undecodable(e, w))
}

/// A soil core as the weathering accounts read it.
pub fn core_of(e: &Entry) -> Result<Core, ViewError> {
    let r = &e.reading;
    let read = || -> Decoded<Core> {
        let (_, depth) = parse_depth(field(r, "depth")?).map_err(|w| format!("depth: {w}"))?;
        let rho = parse_measure(field(r, "bulk_density")?, DENSITY, true)
            .map_err(|w| format!("bulk_density: {w}"))?;
        let unit_text = field(r, "conc_unit")?;
        let unit = Unit::from_name(unit_text)
            .ok_or_else(|| format!("conc_unit {unit_text:?} is not a concentration unit"))?;
        let values: Vec<(String, f64)> = SOIL_ELEMENTS
            .iter()
            .filter(|s| r.flag(s))
            .map(|s| decimal(r, s).map(|v| (s.to_string(), v)))
            .collect::<Decoded<_>>()?;
        Ok(Core {
            seq: e.seq,
            field: e.site.clone(),
            date: e.period.from,
            depth,
            bulk_density: rho.base,
            analysis: SoilAnalysis::new(&values, unit).map_err(|e| e.to_string())?,
            baseline: r.flag("baseline"),
        })
    };
    read().map_err(|w| undecodable(e, w))
}

/// A registered feedstock's analysis in numbers.
pub fn analysed(f: &Feedstock) -> Result<Analysed, ViewError> {
    let bad = |what: String| ViewError::Feedstock {
        project: f.project.clone(),
        code: f.code.clone(),
        what,
    };
    let numbers = |list: &[(String, String)]| -> Result<Vec<(String, f64)>, ViewError> {
        list.iter()
            .map(|(n, v)| {
                Decimal::parse(v)
                    .map(|d| (n.clone(), d.to_f64()))
                    .map_err(|e| bad(format!("{n} {v:?}: {e}")))
            })
            .collect()
    };
    let unit = |u: &str| Unit::from_name(u).ok_or_else(|| bad(format!("unknown unit {u:?}")));
    let analysis = FeedstockAnalysis::new(
        &numbers(&f.oxides)?,
        unit(&f.oxide_unit)?,
        &numbers(&f.elements)?,
        unit(&f.element_unit)?,
    )
    .map_err(|e| bad(e.to_string()))?;
    let density = parse_measure(&f.density, DENSITY, true)
        .map_err(|e| bad(format!("density: {e}")))?
        .base;
    Ok(Analysed {
        code: f.code.clone(),
        analysis,
        density,
    })
}
