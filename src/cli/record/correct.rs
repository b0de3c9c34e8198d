//! `correct`: a new entry that replaces one, restating its quantity or period and keeping what
//! belongs to its kind.

use super::{DensityArg, QuantityArgs, commit_with, optional_text, period};
use crate::accounting::metering::{Basis, assumed_fraction};
use crate::cli::setup::known_project;
use crate::cli::{Context, inputs};
use crate::error::{Error, Result};
use crate::ledger::reading_fields::{FractionBasis, checked};
use crate::ledger::{Entry, EntryKind, Reading};
use crate::quantity::Mass;
use crate::quantity::fraction::parse_uncertainty;
use crate::report::Report;
use clap::{Args, ValueEnum};

#[derive(Debug, Clone, Args)]
pub struct CorrectArgs {
    /// Project code (e.g. TFS)
    pub project: String,
    /// The seq of the entry to replace
    pub seq: u64,
    /// Why the entry is corrected
    #[arg(long)]
    pub reason: String,
    /// Any option left out keeps the corrected entry's value
    #[command(flatten)]
    pub quantity: QuantityArgs,
    /// The site, when the corrected entry named the wrong one
    #[arg(long)]
    pub site: Option<String>,
    /// First day the corrected reading covers (ISO 8601 date)
    #[arg(long, value_name = "DATE")]
    pub from: Option<String>,
    /// Last day the corrected reading covers, included
    #[arg(long, value_name = "DATE")]
    pub to: Option<String>,
    /// Idempotency key of the correction [default: derived from the content]
    #[arg(long)]
    pub key: Option<String>,
    /// The meter's identifier, when the corrected entry named the wrong one
    #[arg(long, value_name = "ID")]
    pub meter: Option<String>,
    /// A note kept with the correction (free text)
    #[arg(long, value_name = "TEXT")]
    pub note: Option<String>,
    /// Record even though the correction takes the project past its permit
    #[arg(long)]
    pub over_permit: bool,
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

/// The quantity of a correction: what it gives, and for the rest the corrected reading's own
/// quantity, CO2 fraction, basis and density method.
fn restated(given: &QuantityArgs, was: &Reading) -> Result<QuantityArgs> {
    let mut q = given.clone();
    if !q.is_given() {
        q.mass = was.text("mass").map(str::to_string);
        q.volume = was.text("volume").map(str::to_string);
        if !q.is_given() {
            return Err(Error::field(
                "--co2-fraction",
                q.co2_fraction.as_deref().unwrap_or(""),
                "the corrected entry has no metered quantity to apply it to: give --mass or --volume",
            ));
        }
    }
    // An assumed fraction stays assumed: the correction states none either.
    let fraction = was.text("co2_fraction").or(was.text("co2_fraction_mean"));
    let fraction = fraction.filter(|_| !assumed_fraction(was));
    q.co2_fraction = q.co2_fraction.or(fraction.map(str::to_string));
    q.co2_basis = q.co2_basis.or(match checked(was.co2_basis()) {
        Some(FractionBasis::Mol) => Some(Basis::Mol),
        Some(FractionBasis::Mass) => Some(Basis::Mass),
        None => None,
    });
    q.density = q.density.or(match was.density_method() {
        Some("regulatory") => Some(DensityArg::Regulatory),
        Some("eos") => Some(DensityArg::Eos),
        _ => None,
    });
    q.impurities = q
        .impurities
        .or(was.text("impurities_mol").map(str::to_string));
    q.uncertainty = q
        .uncertainty
        .or(was.text("uncertainty").map(str::to_string));
    Ok(q)
}

pub fn correct(ctx: &Context, a: CorrectArgs) -> Result<Report> {
    inputs::text("--reason", &a.reason)?;
    optional_text("--key", &a.key)?;
    optional_text("--meter", &a.meter)?;
    optional_text("--note", &a.note)?;
    let (key, over_permit) = (a.key.clone(), a.over_permit);
    commit_with(ctx, key, over_permit, |tx| {
        known_project(tx, &a.project)?;
        let target = tx
            .correction_target(&a.project, a.seq)?
            .map_err(|e| Error::field("seq", &a.seq.to_string(), e))?;
        corrected(ctx, a.clone(), target)
    })
}

/// The options of `correct` that restate what the `record` command of each kind takes; the
/// rest (--reason, --site, --from, --to, --key, --note) apply to every kind.
fn correctable(kind: EntryKind) -> &'static [&'static str] {
    match kind {
        EntryKind::Survey => &[],
        EntryKind::Calibration => &["--uncertainty", "--meter"],
        EntryKind::Reversal => &["--mass"],
        k if crate::cli::record_rock::is_rock_record(k) => &[],
        _ => &[
            "--mass",
            "--volume",
            "--co2-fraction",
            "--co2-basis",
            "--density",
            "--impurities",
            "--uncertainty",
            "--meter",
        ],
    }
}

/// The kind-specific options a correction gives, with their values.
fn kind_options(a: &CorrectArgs) -> Vec<(&'static str, String)> {
    let q = &a.quantity;
    let texts = [
        ("--mass", q.mass.clone()),
        ("--volume", q.volume.clone()),
        ("--co2-fraction", q.co2_fraction.clone()),
        ("--co2-basis", q.co2_basis.and_then(|b| option_value(&b))),
        ("--density", q.density.and_then(|d| option_value(&d))),
        ("--impurities", q.impurities.clone()),
        ("--uncertainty", q.uncertainty.clone()),
        ("--meter", a.meter.clone()),
    ];
    texts
        .into_iter()
        .filter_map(|(o, v)| v.map(|v| (o, v)))
        .collect()
}

/// How a value of an enumerated option is spelled on the command line.
fn option_value(v: &impl ValueEnum) -> Option<String> {
    v.to_possible_value().map(|p| p.get_name().to_string())
}

/// Refuses options that do not belong to the corrected entry's kind (a survey has no mass).
fn refuse_foreign_options(a: &CorrectArgs, target: &Entry) -> Result<()> {
    let allowed = correctable(target.kind);
    match kind_options(a)
        .into_iter()
        .find(|(o, _)| !allowed.contains(o))
    {
        None => Ok(()),
        Some((option, value)) => Err(Error::field(
            option,
            &value,
            format!(
                "does not belong to a {} entry (seq {}); a {} correction takes {}",
                target.kind,
                target.seq,
                target.kind,
                if allowed.is_empty() {
                    "none of the quantity options".to_string()
                } else {
                    allowed.join(", ")
                }
            ),
        )),
    }
}

/// The reading of a correction of a calibration or a reversal: the recorded reading with the
/// one value the options restate.
fn restated_single(a: &CorrectArgs, target: &Entry) -> Result<Option<(Reading, Mass)>> {
    let q = &a.quantity;
    let (name, value, mass) = match (target.kind, &q.uncertainty, &q.mass) {
        (EntryKind::Calibration, Some(u), _) => {
            let d = parse_uncertainty(u).map_err(|e| Error::field("--uncertainty", u, e))?;
            ("uncertainty", d.to_string(), target.mass)
        }
        (EntryKind::Reversal, _, Some(m)) => {
            let (r, mass) = inputs::mass("--mass", m)?;
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

/// The correction of `target` the options describe.
fn corrected(ctx: &Context, a: CorrectArgs, target: Entry) -> Result<Entry> {
    let restates = a.quantity.is_given() || a.quantity.co2_fraction.is_some();
    let single = if crate::cli::record_rock::is_rock_record(target.kind) && restates {
        None
    } else {
        refuse_foreign_options(&a, &target)?;
        restated_single(&a, &target)?
    };
    let (reading, mass) = if let Some(r) = single {
        r
    } else if restates {
        if crate::cli::record_rock::is_rock_record(target.kind) {
            return Err(Error::field(
                "seq",
                &a.seq.to_string(),
                format!(
                    "is a {} entry, not a metered quantity: record it again with --corrects {} --reason …",
                    target.kind, a.seq
                ),
            ));
        }
        let q = restated(&a.quantity, &target.reading)?;
        let m = q.measure()?;
        let mut reading = m.reading;
        for (n, v) in &target.reading.0 {
            if KIND_FIELDS.contains(&n.as_str()) {
                reading.push(n, v.clone());
            }
        }
        (reading, m.mass)
    } else {
        (target.reading.clone(), target.mass)
    };
    let from = a.from.unwrap_or_else(|| target.period.from.to_string());
    let to = a.to.unwrap_or_else(|| target.period.to.to_string());
    Ok(Entry {
        seq: 0,
        site: a.site.unwrap_or(target.site.clone()),
        period: period(&from, &to, ctx.now.date_naive())?,
        reading,
        mass,
        recorded_at: ctx.now,
        key: String::new(),
        meter: a.meter.or(target.meter.clone()),
        note: a.note.or(target.note.clone()),
        corrects: Some(target.seq),
        reason: Some(a.reason),
        evidence: None,
        ..target
    })
}
