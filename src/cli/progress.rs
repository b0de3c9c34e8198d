//! Progress of long commands on standard error, only when it is a terminal (never in pipes,
//! logs or tests).

use indicatif::{ProgressBar, ProgressDrawTarget, ProgressStyle};
use std::io::IsTerminal;

/// Files smaller than this finish before a bar is worth drawing.
const WORTH_SHOWING: u64 = 16 << 20;

/// A bar over `total` bytes of `what`; hidden unless stderr is a terminal and the work is large.
pub fn bytes(what: &str, total: u64) -> ProgressBar {
    if !std::io::stderr().is_terminal() || total < WORTH_SHOWING {
        return ProgressBar::hidden();
    }
    let bar = ProgressBar::with_draw_target(Some(total), ProgressDrawTarget::stderr());
    if let Ok(style) =
        ProgressStyle::with_template("{msg} {bar:40} {bytes}/{total_bytes} ({eta} left)")
    {
        bar.set_style(style);
    }
    bar.set_message(format!("importing {what}"));
    bar
}
