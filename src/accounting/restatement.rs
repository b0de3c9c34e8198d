//! A correction's reading: which values a correction of each kind may restate, and the corrected
//! reading restated from them, the rest carried over from the entry it replaces.

use super::metering::{Basis, MeterError, MeterField, MeterInput, assumed_fraction, measure};
use crate::ledger::bounds;
use crate::ledger::reading_fields::{FractionBasis, checked};
use crate::ledger::{Entry, EntryKind, Reading};
use crate::quantity::fraction::parse_uncertainty;
use crate::quantity::volume::DensityMethod;
use crate::quantity::{Mass, MassReading};

/// A value of a reading that a correction may restate.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Restated {
    Mass,
    Volume,
    Co2Fraction,
    Co2Basis,
    Density,
    Impurities,
    Uncertainty,
    Meter,
}

/// A meter reading's quantity is a value a correction restates.
impl From<MeterField> for Restated {
    fn from(f: MeterField) -> Restated {
        match f {
            MeterField::Mass => Restated::Mass,
            MeterField::Volume => Restated::Volume,
            MeterField::Co2Fraction => Restated::Co2Fraction,
            MeterField::Impurities => Restated::Impurities,
            MeterField::Uncertainty => Restated::Uncertainty,
        }
    }
}

/// What a correction gives: the quantity values and the meter.
#[derive(Debug, Clone, Default)]
pub struct Given<'a> {
    pub quantity: MeterInput<'a>,
    pub meter: Option<&'a str>,
}

/// Why a correction's values do not restate the entry it replaces.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum RestateError {
    /// A value that an entry of this kind does not have; `allowed` are those it has.
    Foreign {
        given: Restated,
        kind: EntryKind,
        seq: u64,
        allowed: &'static [Restated],
    },
    /// A quantity for an entry that is not metered (a rock record): record it again instead.
    NotMetered { kind: EntryKind, seq: u64 },
    /// A CO2 fraction alone, and the corrected entry has no metered quantity to apply it to.
    NoQuantity,
    /// A value that is not acceptable.
    Value {
        given: Restated,
        value: String,
        why: String,
    },
    /// The restated quantities do not make a meter reading.
    Meter(MeterError),
}

/// Reading fields that belong to the kind of entry, not to the meter: a correction of the
/// quantity keeps them.
const KIND_FIELDS: &[&str] = &[
    "entrained_fraction",
    "side",
    "pathway",
    "category",
    "result",
    "backdated_to_survey",
    "stage",
];

/// Entries recorded from samples and rock, not by a meter: a correction cannot restate their
/// readings from quantity options; they are recorded again, naming the entry they correct.
fn is_rock_record(kind: EntryKind) -> bool {
    matches!(
        kind,
        EntryKind::TracerSample
            | EntryKind::Carbonation
            | EntryKind::Application
            | EntryKind::SoilSample
    )
}

/// The values a correction of an entry of `kind` may restate; every kind takes a new reason,
/// site, period, key and note.
pub fn correctable(kind: EntryKind) -> &'static [Restated] {
    use Restated::*;
    match kind {
        EntryKind::Survey => &[],
        EntryKind::Calibration => &[Uncertainty, Meter],
        EntryKind::Reversal => &[Mass],
        k if is_rock_record(k) => &[],
        _ => &[
            Mass,
            Volume,
            Co2Fraction,
            Co2Basis,
            Density,
            Impurities,
            Uncertainty,
            Meter,
        ],
    }
}

impl Given<'_> {
    /// The values given, in the order they are checked.
    pub fn values(&self) -> Vec<Restated> {
        let q = &self.quantity;
        [
            (Restated::Mass, q.mass.is_some()),
            (Restated::Volume, q.volume.is_some()),
            (Restated::Co2Fraction, q.co2_fraction.is_some()),
            (Restated::Co2Basis, q.co2_basis.is_some()),
            (Restated::Density, q.density.is_some()),
            (Restated::Impurities, q.impurities.is_some()),
            (Restated::Uncertainty, q.uncertainty.is_some()),
            (Restated::Meter, self.meter.is_some()),
        ]
        .into_iter()
        .filter_map(|(r, given)| given.then_some(r))
        .collect()
    }

    fn has_quantity(&self) -> bool {
        self.quantity.mass.is_some() || self.quantity.volume.is_some()
    }
}

/// The reading and grams of a correction of `target` by `given`: the one value a calibration
/// or a reversal restates; a metered quantity measured again, what it leaves out taken from the
/// corrected reading; or, restating nothing, the corrected reading as it was.
pub fn restate(target: &Entry, given: &Given<'_>) -> Result<(Reading, Mass), RestateError> {
    let restates = given.has_quantity() || given.quantity.co2_fraction.is_some();
    let rock = is_rock_record(target.kind);
    if rock && restates {
        return Err(RestateError::NotMetered {
            kind: target.kind,
            seq: target.seq,
        });
    }
    let allowed = correctable(target.kind);
    if let Some(&foreign) = given.values().iter().find(|r| !allowed.contains(r)) {
        return Err(RestateError::Foreign {
            given: foreign,
            kind: target.kind,
            seq: target.seq,
            allowed,
        });
    }
    if let Some(r) = restated_single(target, given)? {
        return Ok(r);
    }
    if !restates {
        return Ok((target.reading.clone(), target.mass));
    }
    let m = measure(&restated(given.quantity.clone(), &target.reading)?)
        .map_err(RestateError::Meter)?;
    let mut reading = m.reading;
    for (n, v) in &target.reading.0 {
        if KIND_FIELDS.contains(&n.as_str()) {
            reading.push(n, v.clone());
        }
    }
    Ok((reading, m.mass))
}

/// The quantity of a correction: what it gives, and for the rest the corrected reading's own
/// quantity, CO2 fraction, basis and density method.
fn restated<'a>(given: MeterInput<'a>, was: &'a Reading) -> Result<MeterInput<'a>, RestateError> {
    let mut q = given;
    if q.mass.is_none() && q.volume.is_none() {
        q.mass = was.text("mass");
        q.volume = was.text("volume");
        if q.mass.is_none() && q.volume.is_none() {
            return Err(RestateError::NoQuantity);
        }
    }
    // An assumed fraction stays assumed: the correction states none either.
    let fraction = was.text("co2_fraction").or(was.text("co2_fraction_mean"));
    q.co2_fraction = q
        .co2_fraction
        .or(fraction.filter(|_| !assumed_fraction(was)));
    q.co2_basis = q.co2_basis.or(match checked(was.co2_basis()) {
        Some(FractionBasis::Mol) => Some(Basis::Mol),
        Some(FractionBasis::Mass) => Some(Basis::Mass),
        None => None,
    });
    q.density = q.density.or(match was.density_method() {
        Some("regulatory") => Some(DensityMethod::Regulatory),
        Some("eos") => Some(DensityMethod::Eos),
        _ => None,
    });
    q.impurities = q.impurities.or(was.text("impurities_mol"));
    q.uncertainty = q.uncertainty.or(was.text("uncertainty"));
    Ok(q)
}

/// The reading of a correction of a calibration or a reversal: the recorded reading with the
/// one value the correction restates.
fn restated_single(
    target: &Entry,
    given: &Given<'_>,
) -> Result<Option<(Reading, Mass)>, RestateError> {
    let q = &given.quantity;
    let refused = |given: Restated, value: &str, why: String| RestateError::Value {
        given,
        value: value.to_string(),
        why,
    };
    let (name, value, mass) = match (target.kind, q.uncertainty, q.mass) {
        (EntryKind::Calibration, Some(u), _) => {
            let d = parse_uncertainty(u)
                .map_err(|e| refused(Restated::Uncertainty, u, e.to_string()))?;
            ("uncertainty", d.to_string(), target.mass)
        }
        (EntryKind::Reversal, _, Some(m)) => {
            let why = |e: &dyn std::fmt::Display| refused(Restated::Mass, m, e.to_string());
            let r = MassReading::parse(m).map_err(|e| why(&e))?;
            let mass = r.to_mass().map_err(|e| why(&e))?;
            bounds::grams(mass).map_err(|e| why(&e))?;
            ("mass", r.to_string(), mass)
        }
        _ => return Ok(None),
    };
    let mut reading = target.reading.clone();
    match reading.0.iter_mut().find(|(n, _)| n == name) {
        Some(slot) => slot.1 = value,
        None => reading.push(name, value),
    }
    Ok(Some((reading, mass)))
}

#[cfg(test)]
pub(crate) mod tests {
    use super::*;
    use crate::ledger::Period;
    use chrono::{DateTime, NaiveDate};

    /// An entry of `kind` at TF-I1 on 2026-01-31 with `reading` and `g` grams, seq 4.
    pub(crate) fn entry(kind: EntryKind, reading: &[(&str, &str)], g: i64) -> Entry {
        let mut r = Reading::default();
        for (n, v) in reading {
            r.push(n, *v);
        }
        let day = NaiveDate::from_ymd_opt(2026, 1, 31).unwrap();
        let (project, site) = ("TFS".into(), "TF-I1".into());
        let mass = Mass::from_grams(g);
        let mut e = Entry::draft(
            kind,
            project,
            site,
            Period::day(day),
            r,
            mass,
            DateTime::UNIX_EPOCH,
        );
        e.seq = 4;
        e.key = "k4".into();
        e
    }

    #[test]
    fn a_survey_restates_no_quantity_and_names_the_first_value_given() {
        let survey = entry(EntryKind::Survey, &[("result", "no-leak")], 0);
        let given = Given {
            meter: Some("FM-1"),
            ..Given::default()
        };
        let e = restate(&survey, &given).unwrap_err();
        assert_eq!(
            e,
            RestateError::Foreign {
                given: Restated::Meter,
                kind: EntryKind::Survey,
                seq: 4,
                allowed: &[],
            }
        );
    }

    /// `target` corrected by a new `--mass` alone.
    fn with_mass(target: &Entry, mass: &'static str) -> (Reading, Mass) {
        let mut given = Given::default();
        given.quantity.mass = Some(mass);
        restate(target, &given).unwrap()
    }

    #[test]
    fn a_reversal_restates_its_mass_and_a_metered_entry_keeps_the_fields_of_its_kind() {
        let reversal = entry(
            EntryKind::Reversal,
            &[("mass", "2 t"), ("pathway", "fault F2")],
            2_000_000,
        );
        let (reading, mass) = with_mass(&reversal, "3 t");
        assert_eq!(mass, Mass::from_grams(3_000_000));
        assert_eq!(reading.text("mass"), Some("3 t"));
        assert_eq!(reading.text("pathway"), Some("fault F2"));
        let production = entry(
            EntryKind::Production,
            &[("mass", "10 t"), ("entrained_fraction", "0.02")],
            10_000_000,
        );
        let (reading, mass) = with_mass(&production, "12 t");
        assert_eq!(mass, Mass::from_grams(12_000_000));
        assert_eq!(reading.text("entrained_fraction"), Some("0.02"));
    }

    #[test]
    fn a_fraction_alone_needs_a_quantity_to_apply_to_and_rock_is_recorded_again() {
        let injection = entry(EntryKind::Injection, &[], 1_000_000);
        let mut given = Given::default();
        given.quantity.co2_fraction = Some("0.98");
        assert_eq!(restate(&injection, &given), Err(RestateError::NoQuantity));
        let sample = entry(EntryKind::SoilSample, &[], 0);
        assert_eq!(
            restate(&sample, &given),
            Err(RestateError::NotMetered {
                kind: EntryKind::SoilSample,
                seq: 4
            })
        );
    }
}
