use clap::Parser;
use sinkbook::cli::{Cli, run};
use sinkbook::report::{Layout, Terminal, render_with};
use std::io::{IsTerminal, Write};
use std::process::ExitCode;

/// The command's one reading of the clock: `SINKBOOK_NOW` (RFC 3339) if set, else the system's,
/// in whole microseconds.
fn now() -> Result<chrono::DateTime<chrono::Utc>, String> {
    let t = match std::env::var("SINKBOOK_NOW") {
        Ok(s) => chrono::DateTime::parse_from_rfc3339(&s)
            .map_err(|e| format!("SINKBOOK_NOW {s:?}: not an RFC 3339 time ({e})"))?
            .to_utc(),
        Err(_) => chrono::Utc::now(),
    };
    chrono::DateTime::from_timestamp_micros(t.timestamp_micros())
        .ok_or_else(|| "clock out of range".into())
}

/// What standard output is: a terminal (and how wide) or a pipe, and what the environment asks.
fn terminal(wide: bool) -> Terminal {
    let stdout = std::io::stdout();
    Terminal {
        is_terminal: stdout.is_terminal(),
        columns: terminal_size::terminal_size_of(&stdout).map(|(w, _)| w.0),
        columns_var: std::env::var("COLUMNS").ok(),
        no_color: std::env::var_os("NO_COLOR").is_some_and(|v| !v.is_empty()),
        wide,
    }
}

/// Writes the rendered report; a closed pipe or a full disk is an error to report, not a panic.
fn write_out(text: &str) -> std::io::Result<()> {
    let mut out = std::io::stdout().lock();
    out.write_all(text.as_bytes())?;
    out.flush()
}

fn main() -> ExitCode {
    let cli = Cli::parse();
    let format = cli.format;
    let layout = Layout::choose(&terminal(cli.wide));
    let now = match now() {
        Ok(t) => t,
        Err(e) => {
            eprintln!("sinkbook: {e}");
            return ExitCode::from(1);
        }
    };
    match run(cli, now) {
        Ok(report) => {
            for w in &report.warnings {
                eprintln!("sinkbook: warning: {w}");
            }
            if let Err(e) = write_out(&render_with(&report, format, layout)) {
                eprintln!(
                    "sinkbook: standard output: {e} (the command completed; its output was not written in full)"
                );
                return ExitCode::from(1);
            }
            ExitCode::from(report.exit_code)
        }
        Err(e) => {
            eprintln!("sinkbook: {e}");
            ExitCode::from(e.exit_code())
        }
    }
}
