//! `record leakage`: a metered or rated leak, backdated to the last clean survey when its start
//! is unknown.

use super::{LeakageArgs, RecordArgs, commit, draft, required};
use crate::accounting::leakage;
use crate::accounting::metering::measure;
use crate::cli::setup::known_project;
use crate::cli::{Context, inputs};
use crate::error::{Error, Result};
use crate::ledger::{Entry, EntryKind, Period, Reading};
use crate::report::Report;
use crate::store::Tx;
use chrono::NaiveDate;

/// A leak event: a metered mass, or a rate over its days; with an unknown start, backdated to
/// the last survey of the site that found no leak (Regulation (EU) 2018/2066 Annex IV §23 B.3).
pub(super) fn leakage_record(ctx: &Context, a: LeakageArgs) -> Result<Report> {
    inputs::text("--pathway", &a.pathway)?;
    let b = &RecordArgs {
        project: a.project.clone(),
        site: a.site.clone().unwrap_or_default(),
        reading: a.reading.clone(),
    };
    let to = inputs::activity_date(
        "--to",
        required(&b.reading.to, "--to")?,
        ctx.now.date_naive(),
    )?;
    let mut extra: Vec<(&str, String)> = vec![("pathway", a.pathway.clone())];
    let from = match (&b.reading.from, a.since_last_survey) {
        (Some(_), true) => {
            return Err(Error::Refused(
                "give --from or --since-last-survey, not both".into(),
            ));
        }
        (Some(f), false) => inputs::activity_date("--from", f, ctx.now.date_naive())?,
        (None, true) => {
            let surveyed = match &a.site {
                Some(site) => Surveyed::Site(site),
                None => Surveyed::Pathway(&a.pathway),
            };
            let (survey, injection) = ctx
                .open()?
                .read(|tx| leak_bounds(tx, &b.project, surveyed, to))?;
            let start = leakage::unknown_leak_start(survey, injection).ok_or_else(|| {
                Error::field(
                    "--since-last-survey",
                    surveyed.name(),
                    format!(
                        "no survey of this {} up to {to} found no leak and no injection is recorded: give --from",
                        surveyed.what()
                    ),
                )
            })?;
            if start.day() > to {
                return Err(Error::field(
                    "--to",
                    &to.to_string(),
                    format!(
                        "injection began on {}: a leak of what was stored cannot end before it",
                        start.day()
                    ),
                ));
            }
            extra.push((start.field(), start.day().to_string()));
            start.day()
        }
        (None, false) => {
            return Err(Error::Refused(
                "--from is required (or --since-last-survey)".into(),
            ));
        }
    };
    let period = Period::new(from, to).map_err(|e| Error::field("--to", &to.to_string(), e))?;
    let (mut reading, mass) = match &a.rate {
        Some(rate) => {
            if b.reading.quantity.is_given() {
                return Err(Error::Refused(
                    "give --rate or a quantity (--mass/--volume), not both".into(),
                ));
            }
            let r = leakage::LeakRate::parse(rate).map_err(|e| Error::field("--rate", rate, e))?;
            let mass = r
                .emitted(period)
                .map_err(|e| Error::field("--rate", rate, e))?;
            let mut reading = Reading::default();
            reading.push("rate", r.to_string());
            reading.push("days", period.days().to_string());
            reading.push(
                "method",
                "rate × 24 h × days (EU 2018/2066 Annex IV §23 B.3)",
            );
            (reading, mass)
        }
        None => {
            let m = measure(&b.reading.quantity.input())?;
            (m.reading, m.mass)
        }
    };
    for (n, v) in extra {
        reading.push(n, v);
    }
    let entry = draft(EntryKind::Leakage, b, reading, mass, period, ctx)?;
    commit(ctx, entry, b.reading.key.clone(), false)
}

/// What a leak's last no-leak survey is looked for by: its site, or, for a leak at no site of
/// the project, its pathway (a survey that names the same pathway).
#[derive(Debug, Clone, Copy)]
enum Surveyed<'a> {
    Site(&'a str),
    Pathway(&'a str),
}

impl Surveyed<'_> {
    fn name(&self) -> &str {
        match self {
            Surveyed::Site(s) | Surveyed::Pathway(s) => s,
        }
    }

    fn what(&self) -> &'static str {
        match self {
            Surveyed::Site(_) => "site",
            Surveyed::Pathway(_) => "pathway",
        }
    }

    fn covers(&self, survey: &Entry) -> bool {
        match self {
            Surveyed::Site(s) => survey.site == *s,
            Surveyed::Pathway(p) => survey.reading.get("pathway") == Some(p),
        }
    }
}

/// What bounds a leak's unknown start: the latest no-leak survey of the site (or pathway) on or
/// before `to`, and the first day of the project's injection; read in one pass over the chain.
fn leak_bounds(
    tx: &mut Tx<'_>,
    project: &str,
    surveyed: Surveyed<'_>,
    to: NaiveDate,
) -> Result<(Option<NaiveDate>, Option<NaiveDate>)> {
    known_project(tx, project)?;
    let (mut survey, mut injection) = (None::<NaiveDate>, None::<NaiveDate>);
    tx.for_each_effective_entry(project, None, |s| {
        let e = &s.entry;
        match e.kind {
            EntryKind::Survey
                if surveyed.covers(e)
                    && e.period.to <= to
                    && e.reading.get("result") == Some("no-leak") =>
            {
                survey = survey.max(Some(e.period.to));
            }
            EntryKind::Injection => {
                injection = Some(injection.map_or(e.period.from, |d| d.min(e.period.from)));
            }
            _ => {}
        }
        Ok(())
    })?;
    Ok((survey, injection))
}
