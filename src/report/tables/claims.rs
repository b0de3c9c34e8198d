//! The tables that turn a project's stored figures into
//! claims: the chain from stored to claimable, and the buffer pool with its reversals.

use crate::accounting::buffer_pool::BufferPool;
use crate::accounting::claims::PoolEvent;
use crate::accounting::conservative::DeductionRule;
use crate::accounting::permanence::{Claim, ClaimRules, Durability};
use crate::accounting::project_view::{ProjectFigures, Route, claim_figures, claims_total};
use crate::error::Result;
use crate::ledger::Method;
use crate::ledger::period::{Bucket, Grouping};
use crate::quantity::Mass;
use crate::report::names;
use crate::report::{Cell, Table, columns};
use chrono::NaiveDate;

/// How the uncertainty was combined, and which metered entries stated none.
pub fn uncertainty_note(figures: &ProjectFigures) -> String {
    let unstated = figures.unstated_uncertainties();
    let rule = "± at 95 %: readings of one meter add linearly (a meter's error is systematic); meters and terms combine in quadrature (IPCC 2006 Vol. 1 Ch. 3, Approach 1).";
    if unstated == 0 {
        rule.to_string()
    } else {
        format!(
            "{rule} {unstated} metered entries state no uncertainty (record --uncertainty, site --uncertainty or a calibration) and count as exact."
        )
    }
}

/// How a rock route's uncertainty is obtained, and each figure of `grouping` that rests on
/// inputs with no estimate (docs/uncertainty.md, "Rock routes").
pub fn rock_uncertainty_notes(figures: &ProjectFigures, grouping: Grouping) -> Result<Vec<String>> {
    let rule = match figures.project().method {
        Method::EnhancedWeathering => {
            "± at 95 %: each soil campaign's removal from the spread of its replicate cores, U = t(0.975, n − 1)·s/√n of the dissolved fractions the cores give one by one (replicate baseline cores likewise, in quadrature), times the removal of the feedstock wholly dissolved; a period credits the change since the field's previous campaign, the two in quadrature; fields in quadrature; emissions and deduction parameters count as exact (docs/uncertainty.md)."
        }
        Method::ExSituMineralization => {
            "± at 95 %: each carbonation batch's stated uncertainty (record carbonation --uncertainty); batches of one plant add linearly, plants combine in quadrature (IPCC 2006 Vol. 1 Ch. 3, Approach 1); emissions count as exact (docs/uncertainty.md)."
        }
        _ => return Ok(Vec::new()),
    };
    let mut notes = vec![rule.to_string()];
    for w in figures.unestimated(grouping)? {
        notes.push(format!("No uncertainty estimate: {w}."));
    }
    Ok(notes)
}

/// Which conservative deduction was applied, in words.
fn rule_text(rule: DeductionRule) -> String {
    match rule {
        DeductionRule::WholeUncertainty => {
            "each period's whole uncertainty deducted (one-sided)".into()
        }
        DeductionRule::AboveThreshold { threshold } => format!(
            "only the share of each period's uncertainty above {:.2} % deducted (--deduct-excess-over)",
            threshold * 100.0
        ),
    }
}

fn durability_text(d: Durability) -> String {
    match d {
        Durability::Retention {
            annual_leak_fraction,
            horizon_years,
        } => {
            if annual_leak_fraction > 0.0 {
                format!(
                    "retention (1 − r)^H with r = {} %/yr, H = {horizon_years} years",
                    annual_leak_fraction * 100.0
                )
            } else {
                "no retention model set: durable = conservative".to_string()
            }
        }
        Durability::TonneYears {
            years_held,
            equivalence_years,
        } => format!(
            "temporary storage, tonne-years: held {years_held} years of an equivalence time of {equivalence_years} years (Moura-Costa & Wilson 2000)"
        ),
    }
}

/// The settings a claim uses, in words.
fn rules_text(rules: &ClaimRules) -> String {
    format!(
        "Conservative: {}. Durable: {}. Buffer: {:.2} % of durable withheld into the buffer pool.",
        rule_text(rules.deduction),
        durability_text(rules.durability),
        rules.buffer_share * 100.0
    )
}

/// One note per run of claim periods under the same settings (those in force on each
/// period's last day), and one per backdated setting the claims use.
fn settings_notes(
    t: &mut Table,
    figures: &ProjectFigures,
    claims: &[(Bucket, Claim)],
    deduction: DeductionRule,
) {
    let mut runs: Vec<(Bucket, Bucket, ClaimRules)> = Vec::new();
    for (b, _) in claims {
        let r = figures.rules(*b, deduction);
        match runs.last_mut() {
            Some((_, last, prev)) if *prev == r => *last = *b,
            _ => runs.push((*b, *b, r)),
        }
    }
    match runs.as_slice() {
        [] => t.note(rules_text(&figures.rules_on(NaiveDate::MAX, deduction))),
        [(_, _, r)] => t.note(rules_text(r)),
        _ => {
            for (first, last, r) in &runs {
                let span = if first == last {
                    first.to_string()
                } else {
                    format!("{first} to {last}")
                };
                t.note(format!("{span}: {}", rules_text(r)));
            }
        }
    }
    let periods: Vec<Bucket> = claims.iter().map(|(b, _)| *b).collect();
    for note in backdated_notes(figures, &periods) {
        t.note(note);
    }
}

/// A note for each backdated change the figures of `periods` use: settings recorded together,
/// taking effect the same day and used by the same periods, share one note.
pub fn backdated_notes(figures: &ProjectFigures, periods: &[Bucket]) -> Vec<String> {
    let mut groups: Vec<(String, String, Vec<Bucket>, Vec<String>)> = Vec::new();
    for (s, used) in figures.backdated(periods) {
        let recorded = s.recorded_at.format("%Y-%m-%d").to_string();
        let from = s.from().to_string();
        let value = format!("{} = {}", s.name.label(), s.shown());
        match groups
            .iter_mut()
            .find(|g| g.0 == recorded && g.1 == from && g.2 == used)
        {
            Some(g) => g.3.push(value),
            None => groups.push((recorded, from, used, vec![value])),
        }
    }
    groups
        .into_iter()
        .map(|(recorded, from, used, values)| {
            let list: Vec<String> = used.iter().map(Bucket::to_string).collect();
            let one = used.len() == 1;
            format!(
                "Backdated {}: {} recorded {recorded} {} effect from {from}; {} {} {} {}.",
                if values.len() == 1 {
                    "setting"
                } else {
                    "settings"
                },
                values.join(", "),
                if values.len() == 1 { "takes" } else { "take" },
                if one { "claim period" } else { "claim periods" },
                list.join(", "),
                if one { "uses" } else { "use" },
                if values.len() == 1 { "it" } else { "them" },
            )
        })
        .collect()
}

/// stored → conservative → durable → buffer withheld → claimable, every discount its own column.
pub fn claims_table(
    figures: &ProjectFigures,
    claims: &[(Bucket, Claim)],
    deduction: DeductionRule,
) -> Table {
    let project = figures.project();
    let by = format!("{:?}", figures.claim_period()).to_lowercase();
    // A geological project's stored figure is not net of its emissions: the chain deducts them
    // as lines of their own. A rock route's stored figure is its net already.
    let beside = Route::of(project.method) == Route::Geological;
    let all = [
        names::STORED_T,
        names::PROJECT_EMISSIONS_T,
        names::NET_OF_EMISSIONS_T,
        names::UNCERTAINTY_DEDUCTION_T,
        names::CONSERVATIVE_T,
        names::DURABILITY_DISCOUNT_T,
        names::DURABLE_T,
        names::BUFFER_WITHHELD_T,
        names::CLAIMABLE_T,
    ];
    let shown = |i: &usize| beside || !(1..=2).contains(i);
    let mut header = vec![names::PERIOD];
    header.extend((0..all.len()).filter(shown).map(|i| all[i]));
    let mut t = Table::new(
        "claims",
        format!("From stored to claimable by {by}, project {}", project.code),
        columns(&header),
    );
    let cells = |label: String, figures: [Mass; 9]| {
        let mut row = vec![Cell::text(label)];
        row.extend(
            (0..figures.len())
                .filter(shown)
                .map(|i| Cell::Tonnes(figures[i])),
        );
        row
    };
    for (b, c) in claims {
        t.push(cells(b.to_string(), claim_figures(c)));
    }
    t.push(cells("total".into(), claims_total(claims)));
    settings_notes(&mut t, figures, claims, deduction);
    if beside {
        t.note("Stored: the period's stored tonnes less the reversals dated in it. Project emissions, reported beside storage in the mass balance, are deducted before the uncertainty. A period whose net is zero or negative claims nothing; a loss draws on the buffer pool.");
    } else {
        t.note("Stored: the period's stored tonnes less the reversals dated in it. A period whose figure is zero or negative claims nothing; a loss draws on the buffer pool.");
    }
    t
}

/// A period that lost tonnes, and the reversals dated in it.
fn loss_text(bucket: &Bucket, reversals: &[u64]) -> String {
    let seqs: Vec<String> = reversals.iter().map(u64::to_string).collect();
    match seqs.len() {
        0 => format!("loss {bucket}"),
        1 => format!("loss {bucket} (reversal seq {})", seqs[0]),
        _ => format!("loss {bucket} (reversals seq {})", seqs.join(", ")),
    }
}

/// Contributions, losses and what is left of the buffer pool.
pub fn pool_table(figures: &ProjectFigures, pool: &BufferPool, events: &[PoolEvent]) -> Table {
    let project = figures.project();
    let by = format!("{:?}", figures.claim_period()).to_lowercase();
    let mut t = Table::new(
        "buffer_pool",
        format!("Buffer pool, project {}", project.code),
        columns(&[
            names::EVENT,
            names::BUFFER_WITHHELD_T,
            names::CLAIMABLE_T,
            names::REVERSED_T,
            names::CANCELLED_FROM_BUFFER_T,
            names::CANCELLED_FROM_CLAIMABLE_T,
            names::SHORTFALL_T,
        ]),
    );
    for ev in events {
        t.push(match ev {
            PoolEvent::Claim {
                bucket,
                buffer_withheld,
                claimable,
            } => vec![
                Cell::text(format!("claims {bucket}")),
                Cell::Tonnes(*buffer_withheld),
                Cell::Tonnes(*claimable),
                Cell::Empty,
                Cell::Empty,
                Cell::Empty,
                Cell::Empty,
            ],
            PoolEvent::Loss {
                bucket,
                reversals,
                reversal: r,
            } => vec![
                Cell::text(loss_text(bucket, reversals)),
                Cell::Empty,
                Cell::Empty,
                Cell::Tonnes(r.loss),
                Cell::Tonnes(r.buffer_cancelled),
                Cell::Tonnes(r.claimable_cancelled),
                Cell::Tonnes(r.shortfall),
            ],
        });
    }
    t.push(vec![
        Cell::text("pool now"),
        Cell::Tonnes(pool.contributed()),
        Cell::Tonnes(pool.claimable_counted()),
        Cell::Empty,
        Cell::Tonnes(pool.cancelled()),
        Cell::Tonnes(pool.claimable_cancelled()),
        Cell::Tonnes(pool.shortfall()),
    ]);
    t.note(format!(
        "Remaining in the pool: {} t. Each claim period's claim (by {by}) contributes its buffer at the period's end, under the settings in force on its last day; a later setting never changes what was withheld. A reversal reduces the stored tonnes of the claim period it is dated in; a period left negative claims nothing, and its loss cancels buffer tonnes contributed before it first, then claimable tonnes; what neither covers is a shortfall.",
        crate::report::render::tonnes_text(pool.remaining())
    ));
    if pool.shortfall().is_positive() {
        t.note(format!(
            "SHORTFALL: reversals exceed the buffer pool and the claimable tonnes by {} t.",
            crate::report::render::tonnes_text(pool.shortfall())
        ));
    }
    t
}
