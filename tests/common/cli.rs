//! Driving the real `orthoepy` binary from integration tests: one place for the command
//! builders every CLI test uses.

use assert_cmd::Command;
use std::path::Path;

/// `orthoepy` with no working folder set.
pub fn bin() -> Command {
    Command::cargo_bin("orthoepy").expect("the orthoepy binary is built for integration tests")
}

/// `orthoepy` run inside `dir`.
pub fn orthoepy(dir: &Path) -> Command {
    let mut cmd = bin();
    cmd.current_dir(dir);
    cmd
}

/// `orthoepy ARGS... --project DIR` (the option is global, so it may come last).
pub fn in_project(dir: &Path, args: &[&str]) -> Command {
    let mut cmd = bin();
    cmd.args(args).arg("--project").arg(dir);
    cmd
}
