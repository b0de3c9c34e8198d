//! The demo's scripts: the sample projects' files, embedded, and a script split into the
//! command lines a person would type.

use chrono::{DateTime, Utc};

/// The sample files, embedded so the demo runs from any directory. Scripts (`.sinkbook`) run in
/// this order; data files are written beside them and named in the scripts as `$SAMPLES/…`.
pub const SAMPLES: &[(&str, &str)] = &[
    (
        "tfs.sinkbook",
        include_str!("../../sample-projects/tfs.sinkbook"),
    ),
    (
        "tfs-meters-2026.csv",
        include_str!("../../sample-projects/tfs-meters-2026.csv"),
    ),
    (
        "kre.sinkbook",
        include_str!("../../sample-projects/kre.sinkbook"),
    ),
    (
        "tfs-monitoring-report-2026.csv",
        include_str!("../../sample-projects/tfs-monitoring-report-2026.csv"),
    ),
    (
        "kre-monitoring-report-2026.csv",
        include_str!("../../sample-projects/kre-monitoring-report-2026.csv"),
    ),
    (
        "crb.sinkbook",
        include_str!("../../sample-projects/crb.sinkbook"),
    ),
    (
        "evw.sinkbook",
        include_str!("../../sample-projects/evw.sinkbook"),
    ),
];

/// Splits a script into command lines: blank lines and `#` comments skipped.
pub fn script_lines(text: &str) -> impl Iterator<Item = (usize, &str)> {
    text.lines()
        .enumerate()
        .map(|(i, l)| (i + 1, l.trim()))
        .filter(|(_, l)| !l.is_empty() && !l.starts_with('#'))
}

/// The sample projects play the year 2026 to its end (entries dated in December, the year
/// sealed), so the demo records them as of this time, or at the real clock once it is later.
pub fn demo_clock(now: DateTime<Utc>) -> DateTime<Utc> {
    let played: DateTime<Utc> = "2027-01-15T09:00:00Z".parse().unwrap_or(now);
    now.max(played)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_demo_runs_after_the_sample_year_whatever_the_clock_says() {
        let early: DateTime<Utc> = "2026-03-01T00:00:00Z".parse().unwrap();
        let late: DateTime<Utc> = "2030-01-01T00:00:00Z".parse().unwrap();
        assert_eq!(demo_clock(early).to_rfc3339(), "2027-01-15T09:00:00+00:00");
        assert_eq!(demo_clock(late), late);
    }
}
