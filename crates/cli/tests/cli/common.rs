//! What the command-line checks share: running the binary and finding the repository's files.

use std::path::PathBuf;
use std::process::{Command, Output};

/// Runs `comptrail` with `args`.
pub fn comptrail(args: &[&str]) -> Output {
    Command::new(env!("CARGO_BIN_EXE_comptrail"))
        .args(args)
        .output()
        .expect("run comptrail")
}

/// Runs `comptrail` with `args` and checks that it succeeded (its error output is the report
/// when it did not).
pub fn succeeded(args: &[&str]) -> Output {
    let out = comptrail(args);
    assert!(
        out.status.success(),
        "{args:?}: {}",
        String::from_utf8_lossy(&out.stderr)
    );
    out
}

/// A path in the repository, from its root.
pub fn repo(relative: &str) -> String {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
        .join("../..")
        .join(relative)
        .display()
        .to_string()
}
