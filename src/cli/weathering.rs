//! `weathering`: per field and soil campaign, the feedstock applied, its potential, the
//! dissolved fraction read from the cores, gross CO2, each deduction, emissions and net; and
//! the same rolled up by period for `balance` of an enhanced-weathering project.

use super::Context;
use super::mineralization::route_project;
use super::rock_inputs as ri;
use crate::accounting::project_view::{
    CampaignTotal, EmissionsInScope, ProjectFigures, ViewError, campaign_total, default_settings,
};
use crate::accounting::weathering::campaign::{
    CampaignError, CampaignLine, CampaignResult, DissolutionMethod, Settings,
};
use crate::accounting::weathering::composition::Immobile;
use crate::accounting::weathering::removal::{Cation, Deduction, Deductions};
use crate::accounting::weathering::three_end_member::Resolution;
use crate::error::{Error, Result};
use crate::ledger::period::{Bucket, Grouping};
use crate::ledger::{Method, Project, SiteKind};
use crate::quantity::Decimal;
use crate::report::names;
use crate::report::{Cell, Report, Table, columns};
use clap::Args;

/// The four deduction parameters of net removal, as `weathering` (a what-if) and `project set`
/// (the project's dated settings) take them.
#[derive(Debug, Args, Default)]
pub struct DeductionValues {
    /// Share of cations released by strong acids (sulfuric, nitric), carrying no CO2 [default: 0]
    #[arg(
        long,
        value_name = "SHARE",
        help_heading = "Deductions",
        allow_hyphen_values = true
    )]
    pub strong_acid: Option<String>,
    /// Share of the rest held on exchange sites or in new clays [default: 0]
    #[arg(
        long,
        value_name = "SHARE",
        help_heading = "Deductions",
        allow_hyphen_values = true
    )]
    pub cation_retention: Option<String>,
    /// Share of the rest precipitated as soil carbonate, which keeps half its CO2 [default: 0]
    #[arg(
        long,
        value_name = "SHARE",
        help_heading = "Deductions",
        allow_hyphen_values = true
    )]
    pub secondary_carbonate: Option<String>,
    /// Mol CO2 the ocean keeps per mol of alkalinity it receives [default: 0.8]
    #[arg(
        long,
        value_name = "EFFICIENCY",
        help_heading = "Deductions",
        allow_hyphen_values = true
    )]
    pub ocean_efficiency: Option<String>,
}

impl DeductionValues {
    /// Each parameter given, with its option, its text and its value checked to [0, 1].
    pub fn given(&self) -> Result<Vec<(Deduction, &'static str, &str, Decimal)>> {
        let all = [
            (Deduction::StrongAcid, "--strong-acid", &self.strong_acid),
            (
                Deduction::CationRetention,
                "--cation-retention",
                &self.cation_retention,
            ),
            (
                Deduction::SecondaryCarbonate,
                "--secondary-carbonate",
                &self.secondary_carbonate,
            ),
            (
                Deduction::OceanReequilibration,
                "--ocean-efficiency",
                &self.ocean_efficiency,
            ),
        ];
        all.into_iter()
            .filter_map(|(d, option, text)| text.as_deref().map(|t| (d, option, t)))
            .map(|(d, option, text)| Ok((d, option, text, ri::share(option, text)?)))
            .collect()
    }
}

/// The deduction parameters of a what-if; each left out keeps the project's setting.
#[derive(Debug, Args, Default)]
pub struct DeductionArgs {
    #[command(flatten)]
    pub values: DeductionValues,
    /// Where the values given come from (a monitoring plan, a measurement), shown beside them
    #[arg(
        long,
        value_name = "TEXT",
        help_heading = "Deductions",
        allow_hyphen_values = true
    )]
    pub deduction_source: Option<String>,
}

#[derive(Debug, Args)]
pub struct WeatheringArgs {
    /// Project code (e.g. TFS)
    pub project: String,
    /// Only this field
    #[arg(long)]
    pub site: Option<String>,
    /// How the dissolved fraction is read from the soil cores
    #[arg(long, value_enum, default_value_t = DissolutionMethod::ThreeEndMember)]
    pub method: DissolutionMethod,
    /// The immobile element of the mass balance: Ti or Zr
    #[arg(long, default_value = "Ti")]
    pub immobile: String,
    /// The base cations measured (summed by charge) and credited
    #[arg(long, default_value = "Ca,Mg,Na,K")]
    pub mobile: String,
    /// Smallest relative difference between feedstock and soil in the immobile element that is
    /// read as a number (three-end-member)
    #[arg(long, value_name = "RATIO", default_value = "0.25")]
    pub min_immobile_contrast: String,
    #[command(flatten)]
    pub deductions: DeductionArgs,
}

fn settings(a: &WeatheringArgs) -> Result<Settings> {
    let immobile = Immobile::from_symbol(&a.immobile)
        .ok_or_else(|| Error::field("--immobile", &a.immobile, "use Ti or Zr"))?;
    let mut mobile = Vec::new();
    for part in a.mobile.split(',').map(str::trim) {
        let c = Cation::ALL
            .into_iter()
            .find(|c| c.symbol() == part)
            .ok_or_else(|| {
                Error::field(
                    "--mobile",
                    &a.mobile,
                    format!("{part:?} is not Ca, Mg, Na or K"),
                )
            })?;
        if mobile.contains(&c) {
            return Err(Error::field(
                "--mobile",
                &a.mobile,
                format!("{part} is given twice"),
            ));
        }
        mobile.push(c);
    }
    let contrast = ri::number("--min-immobile-contrast", &a.min_immobile_contrast)?.to_f64();
    if contrast < 0.0 {
        return Err(Error::field(
            "--min-immobile-contrast",
            &a.min_immobile_contrast,
            "must be at least 0",
        ));
    }
    Ok(Settings {
        method: a.method,
        immobile,
        mobile,
        resolution: Resolution {
            min_immobile_contrast: contrast,
            ..Resolution::DEFAULT
        },
        deductions: Deductions::default(),
    })
}

/// The what-if's parameters, each with the source it is shown with.
fn what_if(a: &DeductionArgs) -> Result<Vec<(Deduction, f64, String)>> {
    if let Some(s) = &a.deduction_source {
        super::inputs::text("--deduction-source", s)?;
    }
    a.values
        .given()?
        .into_iter()
        .map(|(deduction, option, text, v)| {
            let source = match &a.deduction_source {
                Some(s) => format!("{s}; what-if given as {option} {text}"),
                None => format!("what-if given as {option} {text}"),
            };
            Deductions::default()
                .set(deduction, v.to_f64(), "")
                .map_err(|e| Error::field(option, text, e))?;
            Ok((deduction, v.to_f64(), source))
        })
        .collect()
}

/// A campaign error told as a refusal of the option that chose what is missing.
fn refusal(e: ViewError, s: &Settings, a: &WeatheringArgs) -> Error {
    let ViewError::Campaign(c) = &e else {
        return e.into();
    };
    match c {
        CampaignError::NoBaseline { .. } => Error::field("--method", s.method.name(), c),
        CampaignError::MissingImmobile { .. } => Error::field("--immobile", &a.immobile, c),
        CampaignError::MissingMobile { .. } => Error::field("--mobile", &a.mobile, c),
        CampaignError::UnknownFeedstock { .. } => e.into(),
    }
}

pub fn weathering(ctx: &Context, a: WeatheringArgs) -> Result<Report> {
    let s = settings(&a)?;
    let figures = route_project(ctx, &a.project, Method::EnhancedWeathering, "weathering")?;
    if let Some(f) = a.site.as_deref()
        && !figures
            .sites()
            .iter()
            .any(|s| s.code == f && s.kind == SiteKind::Field)
    {
        return Err(Error::field(
            "--site",
            f,
            format!("is not a field of project {}", a.project),
        ));
    }
    let given = what_if(&a.deductions)?;
    let mut lines = figures
        .weathering_campaigns(&s, a.site.as_deref())
        .map_err(|e| refusal(e, &s, &a))?;
    let used = figures.project_deductions(&mut lines, &|base| {
        given
            .iter()
            .try_fold(base, |d, (k, v, source)| d.set(*k, *v, source.clone()))
    })?;
    let emissions = figures.emissions_in_scope(a.site.as_deref());
    let mut table = campaign_table(figures.project(), &lines, &s, emissions, &used);
    if !given.is_empty() {
        table.note(format!(
            "What-if: the deduction parameters given here replace the project's settings in this table only; balance, totals and claims use the settings (`sinkbook project set {} --strong-acid … --source …`).",
            a.project
        ));
    }
    Ok(Report::default().table(table))
}

fn method_note(s: &Settings) -> String {
    let mobile: Vec<&str> = s.mobile.iter().map(|c| c.symbol()).collect();
    let what = match s.method {
        DissolutionMethod::ThreeEndMember => format!(
            "three-end-member mass balance of baseline soil, fresh and weathered feedstock (Suhrhoff et al. 2025, Environ. Sci. Technol., doi 10.1021/acs.est.5c08303, eq. S13a–e); inconclusive below a relative {} contrast of {}",
            s.immobile.symbol(),
            s.resolution.min_immobile_contrast
        ),
        DissolutionMethod::Tau => "−τ of the core against the mixture at application, the baseline soil with the feedstock applied (Brimhall & Dietrich 1987; Anderson, Dietrich & Brimhall 2002): τ on the bulk mixture understates dissolution (docs/weathering.md)".to_string(),
    };
    format!(
        "Dissolved fraction by {what}; immobile element {}, mobile Σ z·({}) in mol(+)/kg.",
        s.immobile.symbol(),
        mobile.join(", ")
    )
}

/// The deduction parameters, one note each; where the claim periods use different ones, each
/// set is introduced by its periods.
pub fn parameter_notes(t: &mut Table, used: &[(Deductions, Vec<Bucket>)]) {
    for (d, periods) in used {
        if used.len() > 1 {
            let list: Vec<String> = periods.iter().map(Bucket::to_string).collect();
            t.note(format!("Parameters of {}:", list.join(", ")));
        }
        for line in d.to_string().lines() {
            t.note(format!("Parameter: {line}."));
        }
    }
}

fn campaign_table(
    project: &Project,
    lines: &[CampaignLine],
    s: &Settings,
    emissions: EmissionsInScope,
    used: &[(Deductions, Vec<Bucket>)],
) -> Table {
    let mut t = Table::new(
        "weathering",
        format!(
            "Enhanced weathering by field and soil campaign ({}), project {}",
            s.method.name(),
            project.code
        ),
        columns(&[
            names::FIELD,
            names::SAMPLED,
            names::BASELINE.programs(),
            names::CORES_SEQ,
            names::FEEDSTOCK,
            names::APPLIED_T,
            names::RATE_T_PER_HA,
            names::FOUND_T_PER_HA,
            names::POTENTIAL_T,
            names::DISSOLVED_FRACTION,
            names::GROSS_T,
            names::STRONG_ACID_T,
            names::CATION_RETENTION_T,
            names::SECONDARY_CARBONATE_T,
            names::OCEAN_RE_EQUILIBRATION_T,
            names::EMISSIONS_T,
            names::NET_T,
            names::FINDING.programs(),
        ]),
    );
    let mut findings = Vec::new();
    for l in lines {
        let cores: Vec<String> = l.cores.iter().map(u64::to_string).collect();
        let mut row = vec![
            Cell::text(&l.field),
            Cell::text(l.date.to_string()),
            Cell::opt_text(l.baseline.map(|d| d.to_string())),
            Cell::text(cores.join("+")),
            Cell::opt_text(l.feedstock.clone()),
            Cell::Number(l.applied_t(), 1),
            l.rate_t_per_ha.map_or(Cell::Empty, |r| Cell::Number(r, 1)),
        ];
        match &l.reading {
            CampaignResult::Resolved(r) => {
                row.extend([
                    r.found_t_per_ha.map_or(Cell::Empty, |f| Cell::Number(f, 1)),
                    Cell::Tonnes(l.potential),
                    Cell::Number(r.dissolved_fraction, 4),
                    Cell::Tonnes(r.gross.total),
                ]);
                row.extend(r.removal.deducted.map(|(_, m)| Cell::Tonnes(m)));
                row.extend([Cell::Tonnes(l.emissions), Cell::Tonnes(r.net), Cell::Empty]);
            }
            CampaignResult::Finding(why) => {
                let short = why.split(':').next().unwrap_or(why).to_string();
                findings.push(format!("{} {}: {why}", l.field, l.date));
                row.extend([Cell::Empty, Cell::Tonnes(l.potential), Cell::text(short)]);
                row.extend(std::iter::repeat_n(Cell::Empty, 5));
                row.extend([Cell::Tonnes(l.emissions), Cell::Empty, Cell::text(why)]);
            }
        }
        t.push(row);
    }
    total_row(&mut t, &campaign_total(lines, emissions.recorded));
    t.note(method_note(s));
    t.note("Applied = dry feedstock spread before the campaign; every figure is cumulative to the campaign. Found = feedstock the cores hold, (X_f + X_wf)·ρf × depth: a check on the applications. Potential = applied × the modified Steinour potential (Renforth 2019, η = 2).");
    t.note("Gross = dissolved fraction × applied × Σ (mol/t × z) × M_CO2, z = 2 for Ca and Mg, 1 for Na and K (44.009 g/mol). Deductions in order: strong acid, then cation retention of the rest, then secondary carbonate (keeps half), then the ocean's share of what is left. Net = gross − deductions − emissions at the field whose periods ended by the campaign.");
    t.note("The total row: each field's latest campaign that gave a number, less every emission recorded to date (at the fields and elsewhere); over every field its net is the cumulative net of `balance`.");
    parameter_notes(&mut t, used);
    for f in findings {
        t.note(format!("Finding: {f}"));
    }
    if emissions.elsewhere.is_positive() {
        t.note(format!(
            "Emissions recorded at sites other than fields ({} t) count in the total row and the balance.",
            crate::report::render::tonnes_text(emissions.elsewhere)
        ));
    }
    t
}

/// The project to date: each field's latest readable campaign, less every emission recorded.
fn total_row(t: &mut Table, total: &CampaignTotal) {
    let mut row = vec![
        Cell::text("total"),
        Cell::text("latest read"),
        Cell::Empty,
        Cell::Empty,
        Cell::Empty,
        Cell::Number(total.applied_g as f64 / 1e6, 1),
        Cell::Empty,
        Cell::Empty,
        Cell::Tonnes(total.potential),
        Cell::Empty,
        Cell::Tonnes(total.gross),
    ];
    row.extend(total.deducted.map(Cell::Tonnes));
    row.extend([
        Cell::Tonnes(total.emissions),
        Cell::Tonnes(total.net),
        Cell::Empty,
    ]);
    t.push(row);
}

/// `balance` of an enhanced-weathering project: by period, every default setting.
pub fn balance(figures: &ProjectFigures, grouping: Grouping) -> Result<Report> {
    let s = default_settings();
    let project = figures.project();
    let (roll, unread) = figures.weathering_rollup(grouping)?;
    let by = super::mineralization::grouping_name(grouping);
    let mut t = Table::new(
        "balance",
        format!("Enhanced weathering by {by}, project {}", project.code),
        columns(&[
            names::PERIOD,
            names::APPLIED_T,
            names::GROSS_T,
            names::STRONG_ACID_T,
            names::CATION_RETENTION_T,
            names::SECONDARY_CARBONATE_T,
            names::OCEAN_RE_EQUILIBRATION_T,
            names::REMOVAL_T,
            names::EMISSIONS_T,
            names::NET_T,
            names::CUMULATIVE_NET_T,
        ]),
    );
    for r in &roll {
        let mut row = vec![
            Cell::text(r.bucket.to_string()),
            Cell::Number(r.applied_g as f64 / 1e6, 1),
            Cell::Tonnes(r.gross),
        ];
        row.extend(r.deducted.map(|(_, m)| Cell::Tonnes(m)));
        row.extend([
            Cell::Tonnes(r.removal),
            Cell::Tonnes(r.emissions),
            Cell::Tonnes(r.net),
            Cell::Tonnes(r.cumulative_net),
        ]);
        t.push(row);
    }
    t.note("Each soil campaign restates its field's removal to date; the change since the field's previous campaign (gross, each deduction, removal = gross − deductions) is credited to the campaign's period. A campaign that gives no number changes nothing.");
    t.note(
        "Emissions: every emission entry of the project, split by days. Net = removal − emissions.",
    );
    t.note(method_note(&s));
    let periods: Vec<Bucket> = roll.iter().map(|r| r.bucket).collect();
    let claimed: Vec<Bucket> = periods
        .iter()
        .map(|b| figures.claim_period().bucket(b.first_day()))
        .fold(Vec::new(), |mut v, b| {
            if !v.contains(&b) {
                v.push(b);
            }
            v
        });
    parameter_notes(&mut t, &figures.deductions_used(&claimed)?);
    if unread > 0 {
        t.note(format!(
            "{unread} campaign(s) gave no number: see `sinkbook weathering {}`.",
            project.code
        ));
    }
    Ok(Report::default().table(t))
}
