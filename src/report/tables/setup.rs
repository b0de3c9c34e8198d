//! The registration tables: projects and their sites.

use crate::ledger::setting::Setting;
use crate::ledger::{Project, Site};
use crate::report::names;
use crate::report::tables::settings::settings_table;
use crate::report::{Cell, Report, Table, columns};
use chrono::{DateTime, Utc};

/// One project shown whole: its line, its sites and its settings (those in force at `now`).
pub fn project_report(
    p: &Project,
    sites: &[Site],
    settings: &[Setting],
    now: DateTime<Utc>,
) -> Report {
    Report::default()
        .table(projects_table(std::slice::from_ref(p)))
        .table(sites_table(&p.code, sites))
        .table(settings_table(&p.code, settings, now))
}

pub fn projects_table(projects: &[Project]) -> Table {
    let mut t = Table::new(
        "projects",
        "Projects",
        columns(&[
            names::CODE,
            names::NAME,
            names::METHOD,
            names::OPERATOR,
            names::PERMIT,
            names::PERMITTED_CAPACITY_T,
            names::ANNUAL_MAXIMUM_T,
        ]),
    );
    for p in projects {
        t.push(vec![
            Cell::text(&p.code),
            Cell::text(&p.name),
            Cell::text(p.method.name()),
            Cell::text(&p.operator),
            Cell::opt_text(p.permit_ref.as_deref()),
            p.permit_capacity.map_or(Cell::Empty, Cell::Tonnes),
            p.permit_annual.map_or(Cell::Empty, Cell::Tonnes),
        ]);
    }
    t
}

pub fn sites_table(project: &str, sites: &[Site]) -> Table {
    let mut t = Table::new(
        "sites",
        format!("Sites, project {project}"),
        columns(&[
            names::CODE,
            names::KIND,
            names::AREA,
            names::UNCERTAINTY_95_PCT,
            names::REGISTERED_AT,
        ]),
    );
    for s in sites {
        t.push(vec![
            Cell::text(&s.code),
            Cell::text(s.kind.name()),
            Cell::opt_text(s.area.as_deref()),
            Cell::opt_text(s.uncertainty.as_deref()),
            Cell::text(s.registered_at.format("%Y-%m-%d %H:%M:%S").to_string()),
        ]);
    }
    t
}
