//! `completions` and `manual`: the command line described for shells and for `man`, generated
//! from the same clap definitions that parse it.

use super::Cli;
use crate::error::{Error, Result};
use crate::report::Report;
use crate::report::generated::{manual_page, verbatim};
use clap::{Args, CommandFactory};
use clap_complete::Shell;

#[derive(Debug, Args)]
#[command(
    after_help = "Example: sinkbook completions bash > ~/.local/share/bash-completion/completions/sinkbook"
)]
pub struct CompletionsArgs {
    /// The shell to complete for
    #[arg(value_parser = ["bash", "zsh", "fish"])]
    pub shell: String,
}

#[derive(Debug, Args)]
#[command(after_help = "Example: sinkbook manual > ~/.local/share/man/man1/sinkbook.1")]
pub struct ManualArgs {}

/// A completion script for the shell, printed as it is.
pub fn completions(a: CompletionsArgs) -> Result<Report> {
    // The parser admits bash, zsh and fish only, each a shell's own name.
    let shell = a.shell.parse().unwrap_or(Shell::Bash);
    let mut out = Vec::new();
    clap_complete::generate(shell, &mut Cli::command(), "sinkbook", &mut out);
    verbatim(out)
}

/// The man page (roff), with a section for every command, in ASCII.
pub fn manual(_: ManualArgs) -> Result<Report> {
    let mut out = Vec::new();
    clap_mangen::Man::new(Cli::command())
        .render(&mut out)
        .map_err(|e| Error::internal(format!("manual: {e}")))?;
    manual_page(out)
}
