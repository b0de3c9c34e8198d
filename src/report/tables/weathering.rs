//! The enhanced-weathering tables: each campaign from its soil to its net removal, the project's
//! balance by period, and the deduction parameters each period used.

use crate::accounting::project_view::{
    CampaignTotal, EmissionsInScope, ProjectFigures, campaign_total, default_settings,
};
use crate::accounting::weathering::campaign::{
    CampaignLine, CampaignResult, DissolutionMethod, Settings,
};
use crate::accounting::weathering::removal::Deductions;
use crate::error::Result;
use crate::ledger::Project;
use crate::ledger::period::{Bucket, Grouping};
use crate::report::names;
use crate::report::{Cell, Report, Table, columns};

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

pub fn campaign_table(
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
            CampaignResult::Finding(finding) => {
                let why = finding.to_string();
                let short = why.split(':').next().unwrap_or(&why).to_string();
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

/// A what-if value's source as the table shows it: the option and text given, after the
/// source named for them.
pub fn what_if_source(option: &str, text: &str, source: Option<&str>) -> String {
    let given = format!("what-if given as {option} {text}");
    match source {
        Some(s) => format!("{s}; {given}"),
        None => given,
    }
}

/// The note of a `weathering` what-if: the parameters given replace the project's settings in
/// its table only.
pub fn what_if_note(project: &str) -> String {
    format!(
        "What-if: the deduction parameters given here replace the project's settings in this table only; balance, totals and claims use the settings (`sinkbook project set {project} --strong-acid … --source …`)."
    )
}

#[cfg(test)]
mod tests {
    use super::what_if_source;

    #[test]
    fn a_what_if_value_shows_its_option_after_the_source_named() {
        let given = "what-if given as --strong-acid 5%";
        assert_eq!(what_if_source("--strong-acid", "5%", None), given);
        let named = what_if_source("--strong-acid", "5%", Some("plot trial"));
        assert_eq!(named, format!("plot trial; {given}"));
    }
}
