//! Every command's `--help` explains every option and ends with an example.

mod common;

use clap::{CommandFactory, Parser};
use sinkbook::cli::Cli;
use std::process::Command;

/// Walks the command tree: arguments without help, commands without an example.
fn walk(cmd: &clap::Command, path: &str, missing: &mut Vec<String>) {
    for arg in cmd.get_arguments() {
        let id = arg.get_id().as_str();
        if arg.is_hide_set() || id == "help" || id == "version" {
            continue;
        }
        if arg.get_help().is_none() && arg.get_long_help().is_none() {
            missing.push(format!("{path}: argument {id} has no help"));
        }
    }
    let after = cmd
        .get_after_help()
        .or(cmd.get_after_long_help())
        .map(|s| s.to_string())
        .unwrap_or_default();
    match after
        .lines()
        .last()
        .and_then(|l| l.strip_prefix("Example: "))
    {
        None => missing.push(format!("{path}: --help does not end with an example")),
        // The example parses: its options exist and their values are of the right kind.
        Some(example) => {
            // Up to a shell redirection.
            let words = shlex::split(example).unwrap_or_default();
            let words = words.split(|w| w == ">").next().unwrap_or_default();
            if let Err(e) = Cli::try_parse_from(words) {
                let why = e.to_string();
                missing.push(format!(
                    "{path}: example {example:?}: {}",
                    why.lines().next().unwrap_or("")
                ));
            }
        }
    }
    for sub in cmd.get_subcommands().filter(|s| s.get_name() != "help") {
        walk(sub, &format!("{path} {}", sub.get_name()), missing);
    }
}

#[test]
fn every_argument_has_help_and_every_command_an_example() {
    let mut cmd = Cli::command();
    cmd.build();
    let mut missing = Vec::new();
    walk(&cmd, "sinkbook", &mut missing);
    assert!(missing.is_empty(), "{}", missing.join("\n"));
}

#[test]
fn totals_by_lists_its_values() {
    let out = assert_cmd::Command::cargo_bin("sinkbook")
        .unwrap()
        .args(["totals", "--help"])
        .output()
        .unwrap();
    let help = String::from_utf8(out.stdout).unwrap();
    let by = help
        .lines()
        .skip_while(|l| !l.contains("--by"))
        .take(6)
        .collect::<Vec<_>>()
        .join("\n");
    assert!(
        by.contains("possible values") || by.contains("[possible"),
        "{by}"
    );
}

fn sinkbook(args: &[&str]) -> String {
    let o = assert_cmd::Command::cargo_bin("sinkbook")
        .unwrap()
        .env("COLUMNS", "40")
        .args(args)
        .output()
        .unwrap();
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    String::from_utf8(o.stdout).unwrap()
}

/// The commands a person types (clap's own `help` aside).
fn commands() -> Vec<String> {
    Cli::command()
        .get_subcommands()
        .map(|c| c.get_name().to_string())
        .filter(|n| n != "help")
        .collect()
}

#[test]
fn completions_name_every_command_for_each_shell() {
    let bash = sinkbook(&["completions", "bash"]);
    assert!(bash.contains("complete -F _sinkbook"), "{bash}");
    for shell in ["bash", "zsh", "fish"] {
        let script = sinkbook(&["completions", shell]);
        for c in commands() {
            assert!(script.contains(&c), "{shell} completion lacks {c}");
        }
    }
    // Printed as they are: no table shaping, no cautions line, even with --format json.
    assert_eq!(sinkbook(&["--format", "json", "completions", "bash"]), bash);
    let bad = assert_cmd::Command::cargo_bin("sinkbook")
        .unwrap()
        .args(["completions", "tcsh"])
        .output()
        .unwrap();
    assert_eq!(bad.status.code(), Some(2));
}

/// Runs `program args… file` on `text` written to a file; None when the program is missing.
fn check_with(program: &str, args: &[&str], text: &str) -> Option<std::process::Output> {
    let dir = tempfile::tempdir().unwrap();
    let file = dir.path().join("script");
    std::fs::write(&file, text).unwrap();
    Command::new(program).args(args).arg(&file).output().ok()
}

#[test]
fn each_shell_parses_its_completion_script() {
    // The shells' own syntax checks: bash -n, zsh -n and fish --no-execute read the script
    // without running it (.ci/run installs zsh and fish).
    for (shell, args) in [
        ("bash", &["-n"][..]),
        ("zsh", &["-n"][..]),
        ("fish", &["--no-execute"][..]),
    ] {
        let script = sinkbook(&["completions", shell]);
        match check_with(shell, args, &script) {
            None => common::tool_missing(shell),
            Some(o) => assert!(
                o.status.success() && o.stderr.is_empty(),
                "{shell} does not parse its completion script: {}",
                String::from_utf8_lossy(&o.stderr)
            ),
        }
    }
}

#[test]
fn groff_reads_the_man_page_without_a_warning() {
    // groff with every warning on (-ww), output discarded (-z): any complaint about the roff
    // the page is written in lands on stderr.
    let page = sinkbook(&["manual"]);
    match check_with("groff", &["-man", "-Tutf8", "-ww", "-z"], &page) {
        None => common::tool_missing("groff"),
        Some(o) => assert!(
            o.status.success() && o.stderr.is_empty(),
            "groff warns: {}",
            String::from_utf8_lossy(&o.stderr)
        ),
    }
}

#[test]
fn the_man_page_has_a_title_and_every_command() {
    // roff writes a hyphen as \-.
    let page = sinkbook(&["manual"]).replace("\\-", "-");
    assert!(
        page.lines().any(|l| l.starts_with(".TH sinkbook")),
        "no .TH line"
    );
    for c in commands() {
        assert!(page.contains(&c), "man page lacks {c}");
    }
    assert!(!page.contains("Accounting only"));
}
