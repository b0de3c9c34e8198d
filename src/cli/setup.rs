//! `init`, `project` and `site`: registering what entries belong to.

use super::{Context, inputs};
use crate::error::{Error, Result};
use crate::ledger::{Project, Site, SiteKind};
use crate::quantity::area::Area;
use crate::quantity::fraction::parse_uncertainty;
use crate::report::Report;
use crate::report::tables::setup::{project_report, projects_table, sites_table};
use crate::store::Store;
use clap::{Args, Subcommand};

pub fn init(ctx: &Context) -> Result<Report> {
    let (_, created) = Store::init(&ctx.db, ctx.wait)?;
    let what = if created {
        "created ledger"
    } else {
        "ledger already exists:"
    };
    Ok(Report::default().line(format!("{what} {}", ctx.db.display())))
}

#[derive(Debug, Subcommand)]
pub enum ProjectCommand {
    /// Register a project
    #[command(
        after_help = "Example: sinkbook project add TFS --name \"Tamsin Flats Storage\" --method saline-aquifer --operator \"Northdeep Storage Cooperative\" --permit-capacity \"2.5 Mt\""
    )]
    Add(ProjectAdd),
    /// List the projects of the ledger
    #[command(after_help = "Example: sinkbook project list")]
    List,
    /// Show one project with its sites and settings
    #[command(after_help = "Example: sinkbook project show TFS")]
    Show {
        /// Project code (e.g. TFS)
        code: String,
    },
    /// Record a change to a project's buffer share, retention model or temporary storage terms
    #[command(after_help = "Example: sinkbook project set TFS --buffer 5%")]
    Set(super::settings::ProjectSet),
}

#[derive(Debug, Args)]
pub struct ProjectAdd {
    /// Short code, e.g. TFS
    pub code: String,
    /// The project's name
    #[arg(long)]
    pub name: String,
    /// saline-aquifer, depleted-field, eor, basalt-mineralization, ex-situ-mineralization, enhanced-weathering
    #[arg(long)]
    pub method: String,
    /// Who operates the project
    #[arg(long)]
    pub operator: String,
    /// The permit's reference
    #[arg(long, value_name = "REF")]
    pub permit_ref: Option<String>,
    /// Permitted cumulative stored mass, e.g. "2.5 Mt"
    #[arg(long, value_name = "MASS")]
    pub permit_capacity: Option<String>,
    /// Maximum injection in a calendar year, if the permit sets one, e.g. "1 Mt"
    #[arg(long, value_name = "MASS")]
    pub permit_annual: Option<String>,
}

pub fn project(ctx: &Context, c: ProjectCommand) -> Result<Report> {
    match c {
        ProjectCommand::Add(a) => project_add(ctx, a),
        ProjectCommand::List => {
            let projects = ctx.open()?.read(|tx| tx.projects())?;
            Ok(Report::default().table(projects_table(&projects)))
        }
        ProjectCommand::Show { code } => {
            let (p, sites, settings) = ctx.open()?.read(|tx| {
                let p = known_project(tx, &code)?;
                Ok((p, tx.sites(&code)?, tx.settings(&code)?))
            })?;
            Ok(project_report(&p, &sites, &settings, ctx.now))
        }
        ProjectCommand::Set(a) => super::settings::set(ctx, a),
    }
}

/// The project named on the command line, or a refusal naming it.
pub fn known_project(tx: &mut crate::store::Tx<'_>, code: &str) -> Result<Project> {
    tx.project(code)?.ok_or_else(|| unknown_project(code))
}

/// The refusal of a project code that no project is registered under.
pub fn unknown_project(code: &str) -> Error {
    Error::field(
        "project",
        code,
        "is not registered in this ledger (see `sinkbook project list`)",
    )
}

fn project_add(ctx: &Context, a: ProjectAdd) -> Result<Report> {
    inputs::code("project", &a.code)?;
    inputs::text("--name", &a.name)?;
    inputs::text("--operator", &a.operator)?;
    let method = inputs::method("--method", &a.method)?;
    inputs::optional_text("--permit-ref", &a.permit_ref)?;
    let permit_capacity = inputs::optional_mass("--permit-capacity", a.permit_capacity.as_deref())?;
    let permit_annual = inputs::optional_mass("--permit-annual", a.permit_annual.as_deref())?;
    let p = Project {
        code: a.code,
        name: a.name,
        method,
        operator: a.operator,
        permit_ref: a.permit_ref,
        permit_capacity,
        permit_annual,
        registered_at: ctx.now,
    };
    ctx.open()?.write(|tx| {
        if tx.project(&p.code)?.is_some() {
            return Err(Error::field("project", &p.code, "is already registered"));
        }
        tx.add_project(&p)
    })?;
    Ok(Report::default().line(format!(
        "registered project {} ({}, {})",
        p.code, p.name, p.method
    )))
}

#[derive(Debug, Subcommand)]
pub enum SiteCommand {
    /// Register a well, field or plant of a project
    #[command(after_help = "Example: sinkbook site add TFS TF-I1 --kind injection-well")]
    Add {
        /// Project code (e.g. TFS)
        project: String,
        /// Site code (e.g. TF-I1)
        code: String,
        /// injection-well, production-well, monitoring-well, field, plant
        #[arg(long)]
        kind: String,
        /// A field's area, e.g. "12.5 ha" (ha, m2, km2, acre)
        #[arg(long)]
        area: Option<String>,
        /// Uncertainty (95 %) of the site's meter or measurements, e.g. 0.5%
        #[arg(long)]
        uncertainty: Option<String>,
    },
    /// List a project's sites
    #[command(after_help = "Example: sinkbook site list TFS")]
    List {
        /// Project code (e.g. TFS)
        project: String,
    },
}

pub fn site(ctx: &Context, c: SiteCommand) -> Result<Report> {
    match c {
        SiteCommand::Add {
            project,
            code,
            kind,
            area,
            uncertainty,
        } => {
            inputs::code("site", &code)?;
            let kind = SiteKind::from_name(&kind).ok_or_else(|| {
                Error::field(
                    "--kind",
                    &kind,
                    format!("is not a site kind (use {})", SiteKind::choices()),
                )
            })?;
            let area = inputs::optional("--area", area.as_deref(), |a| {
                Area::parse(a).map(|x| x.to_string())
            })?;
            let uncertainty = inputs::optional("--uncertainty", uncertainty.as_deref(), |u| {
                parse_uncertainty(u).map(|_| u.trim().to_string())
            })?;
            let s = Site {
                project: project.clone(),
                code: code.clone(),
                kind,
                area,
                uncertainty,
                registered_at: ctx.now,
            };
            ctx.open()?.write(|tx| {
                known_project(tx, &project)?;
                if tx.site(&project, &code)?.is_some() {
                    return Err(Error::field(
                        "site",
                        &code,
                        format!("is already registered in project {project}"),
                    ));
                }
                tx.add_site(&s)
            })?;
            Ok(Report::default().line(format!(
                "registered site {code} ({kind}) in project {project}"
            )))
        }
        SiteCommand::List { project } => {
            let sites = ctx.open()?.read(|tx| {
                known_project(tx, &project)?;
                tx.sites(&project)
            })?;
            Ok(Report::default().table(sites_table(&project, &sites)))
        }
    }
}
