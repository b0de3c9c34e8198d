//! The demo's scripts: the sample projects' files, embedded, and a script split into the
//! command lines a person would type.

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
