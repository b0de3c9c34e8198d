//! The shared registry's own commands: who may write what, and who keeps which projects.

use super::Context;
use super::sign::judge_all;
use crate::error::{Error, Result};
use crate::ledger::signature::Role;
use crate::report::names;
use crate::report::{Cell, Report, Table, columns};
use crate::store::RoleKind;
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
        RegistryCommand::Operators => operators(ctx),
    }
}

/// One line per project, by operator: its last seal, and whether a verifier's statement signs
/// that seal with a signature that verifies and a seal that still stands (`statements` lists
/// every statement with its checks).
fn operators(ctx: &Context) -> Result<Report> {
    let mut t = Table::new(
        "operators",
        "Operators, projects and their last seals".to_string(),
        columns(&[
            names::OPERATOR,
            names::PROJECT,
            names::METHOD,
            names::LAST_SEAL,
            names::SEALED_AT,
            names::TREE_SIZE,
            names::VERIFIER_STATEMENT,
        ]),
    );
    ctx.open()?.read(|tx| {
        let mut projects = tx.projects()?;
        projects.sort_by(|a, b| (&a.operator, &a.code).cmp(&(&b.operator, &b.code)));
        for p in projects {
            let Some(seal) = tx.seals(&p.code)?.pop() else {
                t.push(vec![
                    Cell::text(&p.operator),
                    Cell::text(&p.code),
                    Cell::text(p.method.name()),
                    Cell::text("none"),
                    Cell::Empty,
                    Cell::Empty,
                    Cell::Empty,
                ]);
                continue;
            };
            let verifiers: Vec<_> = judge_all(tx, &p.code)?
                .into_iter()
                .filter(|j| {
                    j.statement.signed.seal_seq == seal.seq
                        && j.statement.signed.role == Role::Verifier
                })
                .collect();
            let statement = match verifiers
                .iter()
                .find(|j| j.signature.is_ok() && j.seal.is_ok())
            {
                Some(_) => "yes".to_string(),
                None if verifiers.is_empty() => "no".to_string(),
                None => format!(
                    "no: {} signed, none checks (see sinkbook statements {})",
                    verifiers.len(),
                    p.code
                ),
            };
            t.push(vec![
                Cell::text(&p.operator),
                Cell::text(&p.code),
                Cell::text(p.method.name()),
                Cell::text(&seal.label),
                Cell::text(seal.recorded_at.format("%Y-%m-%d %H:%M:%S").to_string()),
                Cell::Int(seal.tree_size as i64),
                Cell::text(statement),
            ]);
        }
        Ok(())
    })?;
    Ok(Report::default().table(t))
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
    if a.name.is_empty() || a.name.len() > 63 {
        return Err(Error::field(
            "NAME",
            &a.name,
            "must be 1 to 63 bytes (PostgreSQL's limit)",
        ));
    }
    ctx.open()?.add_role(&a.name, &kind, ctx.now)?;
    let mut r = Report::default();
    r.lines.push(match &kind {
        RoleKind::Operator(o) => format!("created role {} (operator {o:?})", a.name),
        k => format!("created role {} ({})", a.name, k.word()),
    });
    Ok(r)
}
