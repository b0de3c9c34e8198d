use clap::Parser;
use sinkbook::cli::{Cli, run};
use sinkbook::report::render;
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

fn main() -> ExitCode {
    let cli = Cli::parse();
    let format = cli.format;
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
            print!("{}", render(&report, format));
            ExitCode::from(report.exit_code)
        }
        Err(e) => {
            eprintln!("sinkbook: {e}");
            ExitCode::from(e.exit_code())
        }
    }
}
