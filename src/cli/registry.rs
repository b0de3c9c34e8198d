//! The shared registry's own commands: who may write what, and who keeps which projects.

use super::Context;
use crate::error::{Error, Result};
use crate::report::Report;
use crate::report::tables::registry::{created_line, operators_table};
use crate::store::{RoleKind, role_name};
use clap::{Args, Subcommand};

#[derive(Subcommand, Debug)]
pub enum RegistryCommand {
    /// Manage the registry's login roles
    #[command(
        subcommand,
        after_help = "Example: sinkbook --db postgres://postgres@127.0.0.1/registry registry role add state_regulator --regulator"
    )]
    Role(RoleCommand),
    /// Every operator and its projects, each project's last seal and whether a verifier's
    /// signed statement over that seal checks
    #[command(
        after_help = "Example: sinkbook --db postgres://state_regulator@127.0.0.1/registry registry operators"
    )]
    Operators,
}

#[derive(Subcommand, Debug)]
pub enum RoleCommand {
    /// Create a login role: an operator's (writes that operator's projects), a verifier's
    /// (reads all) or a regulator's (reads all); run by the registry's owner
    #[command(
        after_help = "Example: sinkbook --db postgres://postgres@127.0.0.1/registry registry role add northdeep_ops --operator \"Northdeep Storage Cooperative\""
    )]
    Add(RoleAdd),
}

#[derive(Args, Debug)]
#[command(group(clap::ArgGroup::new("kind").required(true).multiple(false)))]
pub struct RoleAdd {
    /// The PostgreSQL role to create, e.g. northdeep_ops
    pub name: String,
    /// The operator whose projects the role writes, exactly as its projects name it
    #[arg(long, group = "kind", value_name = "OPERATOR NAME")]
    pub operator: Option<String>,
    /// A verifier's role: reads everything
    #[arg(long, group = "kind")]
    pub verifier: bool,
    /// A regulator's role: only reads
    #[arg(long, group = "kind")]
    pub regulator: bool,
}

pub fn registry(ctx: &Context, c: RegistryCommand) -> Result<Report> {
    match c {
        RegistryCommand::Role(RoleCommand::Add(a)) => role_add(ctx, a),
        RegistryCommand::Operators => {
            let rows = ctx.open()?.read(|tx| tx.last_seals())?;
            Ok(Report::default().table(operators_table(&rows)))
        }
    }
}

fn role_add(ctx: &Context, a: RoleAdd) -> Result<Report> {
    let kind = match (a.operator, a.verifier) {
        (Some(o), _) if o.trim().is_empty() => {
            return Err(Error::field("--operator", &o, "must name an operator"));
        }
        (Some(o), _) => {
            super::inputs::text("--operator", &o)?;
            RoleKind::Operator(o)
        }
        (None, true) => RoleKind::Verifier,
        (None, false) => RoleKind::Regulator,
    };
    role_name(&a.name).map_err(|why| Error::field("NAME", &a.name, why))?;
    ctx.open()?.add_role(&a.name, &kind, ctx.now)?;
    Ok(Report::default().line(created_line(&a.name, &kind)))
}
