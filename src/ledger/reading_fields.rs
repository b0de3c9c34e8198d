//! The one codec of an entry's stored reading: every field a reader needs back, by the name
//! `record` and `import` write it, decoded to its type. A field that is absent is `None` where
//! a kind may lack it; one that is there and does not decode is a `FieldError`, an
//! inconsistency of the ledger, never a default. `check` decodes every typed field of a reading
//! once, when the store reads an entry back, so a reader of a stored entry meets only readings
//! that decode; `Reading::get` is this file's primitive and no other module calls it.

use super::{Entry, Hash, Reading};
use crate::quantity::{Decimal, Fraction, Mass, MassReading};
use chrono::NaiveDate;
use std::fmt;

/// A stored reading field whose value does not decode.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct FieldError {
    pub field: &'static str,
    pub value: String,
    pub why: String,
}

impl fmt::Display for FieldError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(
            f,
            "reading field {} {:?} does not decode: {}",
            self.field, self.value, self.why
        )
    }
}

impl std::error::Error for FieldError {}

/// A `FieldError` at the entry that holds it.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct ReadingError {
    pub project: String,
    pub seq: u64,
    pub field: FieldError,
}

impl fmt::Display for ReadingError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(
            f,
            "project {} seq {}: {}",
            self.project, self.seq, self.field
        )
    }
}

impl Entry {
    /// The entry's reading error, naming the entry.
    pub fn field_error(&self, field: FieldError) -> ReadingError {
        ReadingError {
            project: self.project.clone(),
            seq: self.seq,
            field,
        }
    }
}

/// How a meter measured: a mass meter or a volumetric one.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum MeterType {
    Mass,
    Volumetric,
}

impl MeterType {
    pub fn name(self) -> &'static str {
        match self {
            MeterType::Mass => "mass",
            MeterType::Volumetric => "volumetric",
        }
    }
}

/// What a stated CO2 fraction is a fraction of: mass, or amount of substance (volume).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum FractionBasis {
    Mass,
    Mol,
}

/// Which side of the wells an equipment leak was on.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum LeakSide {
    Injection,
    Production,
}

/// What a leak survey found.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum SurveyFinding {
    NoLeak,
    LeakFound,
}

type Decoded<T> = Result<Option<T>, FieldError>;

impl Reading {
    /// The field decoded by `decode`, which says why a value does not.
    fn decoded<T, E: fmt::Display>(
        &self,
        field: &'static str,
        decode: impl FnOnce(&str) -> Result<T, E>,
    ) -> Decoded<T> {
        self.get(field)
            .map(|v| {
                decode(v).map_err(|why| FieldError {
                    field,
                    value: v.to_string(),
                    why: why.to_string(),
                })
            })
            .transpose()
    }

    /// A field that is one of `names`, given in the order of `values`.
    fn named<T: Copy>(&self, field: &'static str, names: &[&str], values: &[T]) -> Decoded<T> {
        self.decoded(field, |v| {
            names
                .iter()
                .position(|n| *n == v)
                .map(|i| values[i])
                .ok_or_else(|| format!("is not one of {}", names.join(", ")))
        })
    }

    /// A decimal field as a number (a rock route's concentrations, ratios and sizes).
    pub fn number(&self, field: &'static str) -> Decoded<f64> {
        self.decoded(field, |v| Decimal::parse(v).map(|d| d.to_f64()))
    }

    /// A mass field in grams, exactly (a metered stream's mass, before any CO2 fraction).
    pub fn exact_grams(&self, field: &'static str) -> Decoded<Decimal> {
        self.decoded(field, |v| {
            MassReading::parse(v)
                .map_err(|e| e.to_string())?
                .grams_exact()
                .map_err(|e| e.to_string())
        })
    }

    /// A mass field in whole grams.
    pub fn grams(&self, field: &'static str) -> Decoded<Mass> {
        self.decoded(field, |v| {
            MassReading::parse(v)
                .map_err(|e| e.to_string())?
                .to_mass()
                .map_err(|e| e.to_string())
        })
    }

    /// A free-text field, as written (a pathway, a feedstock code, a finding).
    pub fn text(&self, field: &'static str) -> Option<&str> {
        self.get(field)
    }

    /// Whether a flag field (`over_permit`, `baseline`) was written.
    pub fn flag(&self, field: &'static str) -> bool {
        self.get(field).is_some()
    }

    /// The reading's own expanded uncertainty (95 %), a fraction: `0.005` is ±0.5 %.
    pub fn uncertainty(&self) -> Decoded<f64> {
        self.number("uncertainty")
    }

    /// The stated CO2 fraction of the stream.
    pub fn co2_fraction(&self) -> Decoded<Fraction> {
        self.decoded("co2_fraction", Fraction::parse)
    }

    /// An imported meter-day's CO2 fraction, weighted by what the meter read (six decimals).
    pub fn co2_fraction_mean(&self) -> Decoded<Fraction> {
        self.decoded("co2_fraction_mean", Fraction::parse)
    }

    /// Where a CO2 fraction of 1 came from: `stated` or `assumed`.
    pub fn co2_fraction_assumed(&self) -> Decoded<bool> {
        self.named(
            "co2_fraction_source",
            &["stated", "assumed"],
            &[false, true],
        )
    }

    pub fn co2_basis(&self) -> Decoded<FractionBasis> {
        self.named(
            "co2_basis",
            &["mass", "mol"],
            &[FractionBasis::Mass, FractionBasis::Mol],
        )
    }

    pub fn meter_type(&self) -> Decoded<MeterType> {
        self.named(
            "meter_type",
            &["mass", "volumetric"],
            &[MeterType::Mass, MeterType::Volumetric],
        )
    }

    /// A volumetric reading's volume in cubic metres at its reference conditions.
    pub fn volume_m3(&self) -> Decoded<f64> {
        self.number("volume_m3")
    }

    /// The reference conditions of a standard volume, as written (`60 F, 1 atm`).
    pub fn reference_conditions(&self) -> Option<&str> {
        self.text("reference_conditions")
    }

    /// The density method a volume became a mass by (`eos`, `regulatory`).
    pub fn density_method(&self) -> Option<&str> {
        self.text("density_method")
    }

    /// A production entry's entrained fraction X: the share of produced CO2 that was injected.
    pub fn entrained_fraction(&self) -> Decoded<f64> {
        self.number("entrained_fraction")
    }

    pub fn leak_side(&self) -> Decoded<LeakSide> {
        self.named(
            "side",
            &["injection", "production"],
            &[LeakSide::Injection, LeakSide::Production],
        )
    }

    pub fn survey_finding(&self) -> Decoded<SurveyFinding> {
        self.named(
            "result",
            &["no-leak", "leak-found"],
            &[SurveyFinding::NoLeak, SurveyFinding::LeakFound],
        )
    }

    /// A leak at no site of the project: the pathway it took.
    pub fn pathway(&self) -> Option<&str> {
        self.text("pathway")
    }

    /// The sealed period a late adjustment was recorded for.
    pub fn late_for(&self) -> Option<&str> {
        self.text("late_for")
    }

    /// The seq a late correction replaces.
    pub fn late_replaces(&self) -> Decoded<u64> {
        self.decoded("late_replaces", str::parse::<u64>)
    }

    /// A day a late adjustment names (`late_from`, `late_to`).
    pub fn day(&self, field: &'static str) -> Decoded<NaiveDate> {
        self.decoded(field, super::period::parse_date)
    }

    /// The SHA-256 of the file an imported meter-day came from.
    pub fn file_sha256(&self) -> Decoded<Hash> {
        self.decoded("file_sha256", |v| {
            Hash::from_hex(v).ok_or("is not a SHA-256 hex digest")
        })
    }
}

/// A field of a reading `check` passed — every entry the store reads back, every entry
/// `record` and `import` build from values they parsed — for a reader that returns no error:
/// its decode cannot fail there, so this is the value, or None where the field is absent.
pub fn checked<T>(field: Decoded<T>) -> Option<T> {
    field.ok().flatten()
}

/// Decodes every typed field of a reading once; the store calls it on every entry it reads
/// back, so a stored value that no longer decodes is found there, naming the field.
pub fn check(r: &Reading) -> Result<(), FieldError> {
    r.uncertainty()?;
    r.co2_fraction()?;
    r.co2_fraction_mean()?;
    r.co2_fraction_assumed()?;
    r.co2_basis()?;
    r.meter_type()?;
    r.volume_m3()?;
    r.entrained_fraction()?;
    r.leak_side()?;
    r.survey_finding()?;
    r.late_replaces()?;
    r.day("late_from")?;
    r.day("late_to")?;
    r.file_sha256()?;
    r.exact_grams("mass")?;
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    fn reading(pairs: &[(&str, &str)]) -> Reading {
        let mut r = Reading::default();
        for (n, v) in pairs {
            r.push(n, *v);
        }
        r
    }

    #[test]
    fn each_field_decodes_to_its_type() {
        let r = reading(&[
            ("meter_type", "volumetric"),
            ("volume_m3", "28316.846592"),
            ("co2_fraction", "0.98"),
            ("co2_basis", "mol"),
            ("uncertainty", "0.015"),
            ("side", "production"),
            ("result", "no-leak"),
            ("late_replaces", "7"),
            ("late_from", "2026-12-20"),
            ("mass", "1250.5 t"),
        ]);
        assert_eq!(check(&r), Ok(()));
        assert_eq!(r.meter_type(), Ok(Some(MeterType::Volumetric)));
        assert_eq!(r.volume_m3(), Ok(Some(28316.846592)));
        assert_eq!(r.co2_basis(), Ok(Some(FractionBasis::Mol)));
        assert_eq!(r.uncertainty(), Ok(Some(0.015)));
        assert_eq!(r.leak_side(), Ok(Some(LeakSide::Production)));
        assert_eq!(r.survey_finding(), Ok(Some(SurveyFinding::NoLeak)));
        assert_eq!(r.late_replaces(), Ok(Some(7)));
        assert_eq!(r.grams("mass"), Ok(Some(Mass::from_grams(1_250_500_000))));
        assert_eq!(r.entrained_fraction(), Ok(None), "absent is None");
    }

    #[test]
    fn a_value_that_does_not_decode_names_the_field_and_value() {
        for (field, value) in [
            ("uncertainty", "abc"),
            ("co2_fraction", "1.5"),
            ("meter_type", "sonic"),
            ("side", "both"),
            ("late_replaces", "-1"),
            ("file_sha256", "00"),
            ("mass", "12 parsecs"),
        ] {
            let e = check(&reading(&[(field, value)])).unwrap_err();
            assert_eq!((e.field, e.value.as_str()), (field, value));
            let line = e.to_string();
            assert!(
                line.contains(field) && line.contains(&format!("{value:?}")),
                "{line}"
            );
        }
    }
}
