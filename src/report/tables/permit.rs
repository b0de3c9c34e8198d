//! The permit's check of an append said for people: its notices, and the limits a refusal names.

use crate::accounting::permit::{Exceeded, Notice, Passed};
use crate::report::render::tonnes_text;

/// A notice of the permit's check, as a warning line.
pub fn notice_line(project: &str, n: &Notice) -> String {
    match n {
        Notice::NearCapacity { pct } => {
            format!("project {project} has used {pct:.2} % of its permitted capacity")
        }
        Notice::Recorded(p) => format!("recorded over the permit: {}", passed(p)),
    }
}

/// The limits an unacknowledged append would pass: `project X: …; …`.
pub fn exceeded_line(e: &Exceeded) -> String {
    let passed: Vec<String> = e.passed.iter().map(passed).collect();
    format!("project {}: {}", e.project, passed.join("; "))
}

fn passed(p: &Passed) -> String {
    match *p {
        Passed::Capacity { stored, pct, cap } => format!(
            "cumulative stored {} t would be {pct:.2} % of the permitted capacity {} t",
            tonnes_text(stored),
            tonnes_text(cap)
        ),
        Passed::Annual {
            year,
            injected,
            max,
        } => format!(
            "injection in {year} would be {} t, above the permitted annual maximum {} t",
            tonnes_text(injected),
            tonnes_text(max)
        ),
    }
}
