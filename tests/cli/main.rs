//! Black-box tests of the `mixwell` binary: exit statuses, positioned errors, and the commands'
//! output on every example model.

mod bad_inputs;
mod commands;
mod diagnose;
mod golden;
mod malformed;
mod plan;

use std::io::Write;
use std::path::{Path, PathBuf};
use std::process::{Command, Output, Stdio};

/// Run `mixwell ARGS`, feeding `stdin` to it.
pub fn mixwell(args: &[&str], stdin: &[u8]) -> Output {
    let mut child = Command::new(env!("CARGO_BIN_EXE_mixwell"))
        .args(args)
        .stdin(Stdio::piped())
        .stdout(Stdio::piped())
        .stderr(Stdio::piped())
        .spawn()
        .expect("the mixwell binary starts");
    // A closed pipe is fine: some commands never read standard input.
    let _ = child.stdin.take().expect("stdin is piped").write_all(stdin);
    child.wait_with_output().expect("mixwell finishes")
}

pub fn text(bytes: &[u8]) -> String {
    String::from_utf8_lossy(bytes).into_owned()
}

/// Every example model shipped in `examples/`.
pub fn examples() -> Vec<PathBuf> {
    let dir = Path::new(env!("CARGO_MANIFEST_DIR")).join("../examples");
    let mut files: Vec<PathBuf> = std::fs::read_dir(&dir)
        .expect("examples/ exists")
        .map(|e| e.expect("readable entry").path())
        .filter(|p| p.extension().is_some_and(|e| e == "mw"))
        .collect();
    files.sort();
    assert!(files.len() >= 3, "at least three examples");
    files
}
