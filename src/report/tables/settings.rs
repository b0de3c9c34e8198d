//! The settings table: each setting of a project, its value, source and effective date.

use crate::ledger::setting::{Setting, in_force};
use crate::report::names;
use crate::report::{Cell, Table, columns};

/// Every setting recorded by `as_of`, by name and the day it takes effect, each marked where it
/// is the one in force on the day of `as_of`.
pub fn settings_table(
    project: &str,
    all: &[Setting],
    as_of: chrono::DateTime<chrono::Utc>,
) -> Table {
    let mut t = Table::new(
        "settings",
        format!("Settings, project {project}"),
        columns(&[
            names::SETTING,
            names::VALUE,
            names::IN_FORCE_FROM,
            names::RECORDED_AT,
            names::IN_FORCE_TODAY,
        ]),
    );
    let today = as_of.date_naive();
    let mut held: Vec<&Setting> = all.iter().filter(|s| s.recorded_at <= as_of).collect();
    held.sort_by_key(|s| (s.name, s.from(), s.recorded_at, s.seq));
    let owned: Vec<Setting> = held.iter().map(|s| (*s).clone()).collect();
    for s in &held {
        let now = in_force(&owned, s.name, today).is_some_and(|f| f.seq == s.seq);
        t.push(vec![
            Cell::text(s.name.label()),
            Cell::text(s.shown()),
            Cell::text(s.from().to_string()),
            Cell::text(s.recorded_at.format("%Y-%m-%d %H:%M:%S").to_string()),
            Cell::text(if now { "yes" } else { "" }),
        ]);
    }
    t.note("Each claim period uses the settings in force on its last day: of each setting, the one taking effect last on or before that day (of those, the last recorded).");
    for s in held.iter().filter(|s| s.source.is_some()) {
        t.note(format!(
            "Source of {} = {} from {}: {}.",
            s.name.label(),
            s.shown(),
            s.from(),
            s.source.as_deref().unwrap_or_default()
        ));
    }
    if held.iter().any(|s| s.backdated()) {
        t.note("Some settings take effect before the day they were recorded (backdated); reports that use them say so.");
    }
    t
}
