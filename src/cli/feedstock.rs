//! `feedstock add | list`: the rock an enhanced-weathering project spreads, registered once
//! with its analysis, and what that analysis says (cations per tonne, CO2 potential).

use super::setup::known_project;
use super::{Context, inputs};
use crate::accounting::project_view::evidence::analysed;
use crate::accounting::weathering::campaign::Feedstock as Analysed;
use crate::accounting::weathering::registration::{
    FeedstockTexts, Given, RegistrationError, registration,
};
use crate::error::{Error, Result};
use crate::ledger::feedstock::{Refusal, admissible};
use crate::report::Report;
use crate::report::tables::feedstock::list_table;
use clap::{Args, Subcommand};

#[derive(Debug, Subcommand)]
pub enum FeedstockCommand {
    /// Register a feedstock: oxide analysis, immobile elements, density, particle size
    #[command(
        after_help = "Example: sinkbook feedstock add EVW EVB-1 --oxides SiO2=49.5,Al2O3=14.2,FeO=11.6,CaO=9.4,MgO=7.8 --unit wt% --density \"2.9 t/m3\""
    )]
    Add(FeedstockAdd),
    /// List a project's feedstocks with their cation contents and CO2 potential
    #[command(after_help = "Example: sinkbook feedstock list EVW")]
    List {
        /// Project code (e.g. EVW)
        project: String,
    },
}

#[derive(Debug, Args)]
pub struct FeedstockAdd {
    /// Project code (e.g. TFS)
    pub project: String,
    /// Short code, e.g. EVB-1
    pub code: String,
    /// Oxide analysis, e.g. CaO=9.6,MgO=7.4,Na2O=2.6,K2O=0.8,TiO2=1.8 (also SiO2, Al2O3, FeO, Fe2O3, MnO, SO3, P2O5)
    #[arg(long, value_name = "OXIDE=C,…", allow_hyphen_values = true)]
    pub oxides: String,
    /// Immobile elements, e.g. Ti=10800,Zr=150 (TiO2 among the oxides also serves)
    #[arg(long, value_name = "EL=C,…", allow_hyphen_values = true)]
    pub elements: Option<String>,
    /// Unit of --oxides, and of --elements unless --element-unit: wt%, mg/kg or mol/kg
    #[arg(long, default_value = "wt%")]
    pub unit: String,
    /// Unit of --elements [default: --unit]
    #[arg(long)]
    pub element_unit: Option<String>,
    /// Density of the rock as the soil mass balance takes it, e.g. "2.9 t/m3"
    #[arg(long)]
    pub density: String,
    /// Size that 80 % of the particles pass, e.g. "90 um"
    #[arg(long)]
    pub d80: Option<String>,
}

pub fn feedstock(ctx: &Context, c: FeedstockCommand) -> Result<Report> {
    match c {
        FeedstockCommand::Add(a) => add(ctx, a),
        FeedstockCommand::List { project } => {
            let list = ctx.open()?.read(|tx| {
                known_project(tx, &project)?;
                tx.feedstocks(&project)
            })?;
            // Stored text that no longer reads is an inconsistency of the ledger.
            let analysed: Result<Vec<Analysed>> = list.iter().map(|f| Ok(analysed(f)?)).collect();
            Ok(Report::default().table(list_table(&project, &list, &analysed?)))
        }
    }
}

impl From<RegistrationError> for Error {
    fn from(e: RegistrationError) -> Error {
        let option = match e.given {
            Given::Oxides => "--oxides",
            Given::Elements => "--elements",
            Given::Unit => "--unit",
            Given::ElementUnit => "--element-unit",
            Given::Density => "--density",
            Given::D80 => "--d80",
        };
        Error::field(option, &e.text, e.why)
    }
}

fn add(ctx: &Context, a: FeedstockAdd) -> Result<Report> {
    inputs::code("feedstock", &a.code)?;
    let texts = FeedstockTexts {
        project: &a.project,
        code: &a.code,
        oxides: &a.oxides,
        elements: a.elements.as_deref(),
        unit: &a.unit,
        element_unit: a.element_unit.as_deref(),
        density: &a.density,
        d80: a.d80.as_deref(),
    };
    let f = registration(&texts, ctx.now)?;
    ctx.open()?.write(|tx| {
        let p = known_project(tx, &f.project)?;
        let held = tx.feedstock(&f.project, &f.code)?;
        admissible(&p, held.as_ref()).map_err(|e| match e {
            Refusal::Method(m) => Error::field(
                "project",
                &f.project,
                format!("has method {m}; feedstocks belong to enhanced-weathering projects"),
            ),
            Refusal::Registered => Error::field(
                "feedstock",
                &f.code,
                format!("is already registered in project {}", f.project),
            ),
        })?;
        tx.add_feedstock(&f)
    })?;
    Ok(Report::default().line(format!(
        "registered feedstock {} in project {}",
        f.code, f.project
    )))
}
