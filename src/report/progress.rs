//! Progress of long commands on standard error, only when it is a terminal and the work is
//! large (never in pipes, logs or tests): the bytes of a file an import reads, the entries a
//! verify or a report walks.

use indicatif::{ProgressBar, ProgressDrawTarget, ProgressStyle};
use std::io::IsTerminal;

/// Files smaller than this finish before a bar is worth drawing.
const BYTES_WORTH_SHOWING: u64 = 16 << 20;

/// Chains shorter than this are walked in well under a second.
const ENTRIES_WORTH_SHOWING: u64 = 200_000;

/// A bar over `total` bytes of `what`, for an import.
pub fn bytes(what: &str, total: u64) -> ProgressBar {
    bar(
        total,
        BYTES_WORTH_SHOWING,
        "{msg} {bar:40} {bytes}/{total_bytes} ({eta} left)",
        format!("importing {what}"),
    )
}

/// A bar over `total` entries that `doing` reads (e.g. "verifying").
pub fn entries(doing: &str, total: u64) -> ProgressBar {
    bar(
        total,
        ENTRIES_WORTH_SHOWING,
        "{msg} {bar:30} {human_pos}/{human_len} entries ({eta} left)",
        doing.to_string(),
    )
}

/// Hidden unless stderr is a terminal and `total` reaches `worth`.
fn bar(total: u64, worth: u64, template: &str, message: String) -> ProgressBar {
    if !std::io::stderr().is_terminal() || total < worth {
        return ProgressBar::hidden();
    }
    let bar = ProgressBar::with_draw_target(Some(total), ProgressDrawTarget::stderr());
    if let Ok(style) = ProgressStyle::with_template(template) {
        bar.set_style(style);
    }
    bar.set_message(message);
    bar
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn small_work_draws_no_bar() {
        assert!(entries("verifying", ENTRIES_WORTH_SHOWING - 1).is_hidden());
        assert!(bytes("m.csv", BYTES_WORTH_SHOWING - 1).is_hidden());
    }
}
