//! `feedstock add | list`: the rock an enhanced-weathering project spreads, registered once
//! with its analysis, and what that analysis says (cations per tonne, CO2 potential).

use super::rock_inputs::{self as ri, DENSITY, SIZE};
use super::setup::known_project;
use super::{Context, inputs};
use crate::accounting::weathering::campaign::Feedstock as Analysed;
use crate::accounting::weathering::composition::{CompositionError, FeedstockAnalysis, Unit};
use crate::error::{Error, Result};
use crate::ledger::Method;
use crate::ledger::feedstock::Feedstock;
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

/// Denser than any silicate rock spread on fields: a figure above it is a unit slip.
const MAX_DENSITY_KG_M3: f64 = 5000.0;

fn unit(option: &str, text: &str) -> Result<Unit> {
    Unit::from_name(text).ok_or_else(|| {
        Error::field(
            option,
            text,
            "is not a concentration unit (use wt%, mg/kg or mol/kg)",
        )
    })
}

pub fn feedstock(ctx: &Context, c: FeedstockCommand) -> Result<Report> {
    match c {
        FeedstockCommand::Add(a) => add(ctx, a),
        FeedstockCommand::List { project } => {
            let list = ctx.open()?.read(|tx| {
                known_project(tx, &project)?;
                tx.feedstocks(&project)
            })?;
            let analysed: Vec<Analysed> = list.iter().map(analysed).collect::<Result<_>>()?;
            Ok(Report::default().table(list_table(&project, &list, &analysed)))
        }
    }
}

fn add(ctx: &Context, a: FeedstockAdd) -> Result<Report> {
    inputs::code("feedstock", &a.code)?;
    let oxide_unit = unit("--unit", &a.unit)?;
    let element_unit = match &a.element_unit {
        Some(u) => unit("--element-unit", u)?,
        None => oxide_unit,
    };
    let oxides = ri::pairs("--oxides", &a.oxides)?;
    let elements = match &a.elements {
        Some(t) => ri::pairs("--elements", t)?,
        None => Vec::new(),
    };
    let (oxide_text, oxide_values) = (ri::pair_texts(&oxides), ri::pair_numbers(&oxides));
    let (element_text, element_values) = (ri::pair_texts(&elements), ri::pair_numbers(&elements));
    FeedstockAnalysis::new(&oxide_values, oxide_unit, &element_values, element_unit).map_err(
        |e| {
            let elements = a.elements.as_deref().unwrap_or("");
            match e {
                CompositionError::Oxides(_) | CompositionError::NoMobile => {
                    Error::field("--oxides", &a.oxides, e)
                }
                _ => Error::field("--elements", elements, e),
            }
        },
    )?;
    let density = ri::measure("--density", &a.density, DENSITY, true)?;
    if density.base > MAX_DENSITY_KG_M3 {
        return Err(Error::field(
            "--density",
            &a.density,
            "must be at most 5 t/m3, denser than any silicate rock: check the unit",
        ));
    }
    let d80 = a
        .d80
        .as_deref()
        .map(|t| ri::measure("--d80", t, SIZE, true))
        .transpose()?;
    let f = Feedstock {
        project: a.project.clone(),
        code: a.code.clone(),
        oxides: oxide_text,
        oxide_unit: oxide_unit.name().into(),
        elements: element_text,
        element_unit: element_unit.name().into(),
        density: density.to_string(),
        d80: d80.map(|d| d.to_string()),
        registered_at: ctx.now,
    };
    ctx.open()?.write(|tx| {
        let p = known_project(tx, &f.project)?;
        if p.method != Method::EnhancedWeathering {
            return Err(Error::field(
                "project",
                &f.project,
                format!(
                    "has method {}; feedstocks belong to enhanced-weathering projects",
                    p.method
                ),
            ));
        }
        if tx.feedstock(&f.project, &f.code)?.is_some() {
            return Err(Error::field(
                "feedstock",
                &f.code,
                format!("is already registered in project {}", f.project),
            ));
        }
        tx.add_feedstock(&f)
    })?;
    Ok(Report::default().line(format!(
        "registered feedstock {} in project {}",
        f.code, f.project
    )))
}

/// A registered feedstock's analysis in numbers; stored text that no longer reads is an
/// inconsistency of the ledger.
fn analysed(f: &Feedstock) -> Result<Analysed> {
    Ok(crate::accounting::project_view::evidence::analysed(f)?)
}
