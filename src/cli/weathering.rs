//! `weathering`: per field and soil campaign, the feedstock applied, its potential, the
//! dissolved fraction read from the cores, gross CO2, each deduction, emissions and net, with
//! what-if deductions given on the command line.

use super::Context;
use super::mineralization::route_project;
use crate::accounting::project_view::ViewError;
use crate::accounting::weathering::campaign::{CampaignError, DissolutionMethod, Settings};
use crate::accounting::weathering::choice::{self, Given};
use crate::accounting::weathering::removal::Deduction;
use crate::error::{Error, Result};
use crate::ledger::Method;
use crate::quantity::{Decimal, share::share};
use crate::report::Report;
use crate::report::tables::weathering::{campaign_table, what_if_note, what_if_source};
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
            ("--strong-acid", &self.strong_acid),
            ("--cation-retention", &self.cation_retention),
            ("--secondary-carbonate", &self.secondary_carbonate),
            ("--ocean-efficiency", &self.ocean_efficiency),
        ];
        let given = Deduction::ALL.into_iter().zip(all);
        given
            .filter_map(|(d, (option, text))| Some((d, option, text.as_deref()?)))
            .map(|(d, option, text)| {
                let v = share(text).map_err(|(value, why)| Error::field(option, &value, why))?;
                Ok((d, option, text, v))
            })
            .collect()
    }
}

/// The deduction parameters of a what-if; each left out keeps the project's setting.
#[derive(Debug, Args, Default)]
#[command(next_help_heading = "Deductions")]
pub struct DeductionArgs {
    #[command(flatten)]
    pub values: DeductionValues,
    /// Where the values given come from (a monitoring plan, a measurement), shown beside them
    #[arg(long, value_name = "TEXT", allow_hyphen_values = true)]
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
    choice::settings(a.method, &a.immobile, &a.mobile, &a.min_immobile_contrast).map_err(|e| {
        let option = match e.given {
            Given::Immobile => "--immobile",
            Given::Mobile => "--mobile",
            Given::MinImmobileContrast => "--min-immobile-contrast",
        };
        Error::field(option, &e.text, e.why)
    })
}

/// The what-if's parameters, each with the source it is shown with.
fn what_if(a: &DeductionArgs) -> Result<Vec<(Deduction, f64, String)>> {
    let source = a.deduction_source.as_deref();
    if let Some(s) = source {
        super::inputs::text("--deduction-source", s)?;
    }
    let given = a.values.given()?.into_iter();
    Ok(given
        .map(|(d, option, text, v)| (d, v.to_f64(), what_if_source(option, text, source)))
        .collect())
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
        && !figures.is_field(f)
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
    let used = figures.project_deductions(&mut lines, &|base| base.overridden(&given))?;
    let emissions = figures.emissions_in_scope(a.site.as_deref());
    let mut table = campaign_table(figures.project(), &lines, &s, emissions, &used);
    if !given.is_empty() {
        table.note(what_if_note(&a.project));
    }
    Ok(Report::default().table(table))
}
