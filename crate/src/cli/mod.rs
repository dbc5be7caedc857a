//! The `mixwell` command line: argument parsing and printing over the library. No statistics
//! happen here.
//!
//! Exit status: 0 on success, 2 on any input error (the message goes to standard error).

mod args;
mod check;
mod density;
mod diagnose;
mod link;
mod run;

use std::io::Write;
use std::process::ExitCode;

/// An input problem, already worded for the user.
#[derive(Debug)]
pub struct Failure(pub String);

impl<T: std::fmt::Display> From<T> for Failure {
    fn from(message: T) -> Self {
        Failure(message.to_string())
    }
}

pub fn main() -> ExitCode {
    let cli = match args::parse() {
        Ok(cli) => cli,
        Err(e) => {
            let _ = e.print();
            return if e.use_stderr() { ExitCode::from(2) } else { ExitCode::SUCCESS };
        }
    };
    let result = match cli.command {
        args::Command::Check(a) => check::run(&a),
        args::Command::Density(a) => density::run(&a),
        args::Command::Run(a) => run::run(&a),
        args::Command::Link(a) => link::run(&a),
        args::Command::Diagnose(a) => diagnose::run(&a),
    };
    match result {
        Ok(output) => print_out(&output),
        Err(Failure(message)) => {
            eprint!("{message}");
            if !message.ends_with('\n') {
                eprintln!();
            }
            ExitCode::from(2)
        }
    }
}

/// Write `text` to standard output. A reader that stopped early — a closed pipe, as in
/// `mixwell run … --json - | head -1` — is not an error: it has what it wanted, so the command ends
/// quietly with success, as other tools that write to pipes do.
fn print_out(text: &str) -> ExitCode {
    use std::io::Write;
    let mut out = std::io::stdout().lock();
    match out.write_all(text.as_bytes()).and_then(|()| out.flush()) {
        Ok(()) => ExitCode::SUCCESS,
        Err(e) if e.kind() == std::io::ErrorKind::BrokenPipe => ExitCode::SUCCESS,
        Err(e) => {
            eprintln!("cannot write to standard output: {e}");
            ExitCode::from(2)
        }
    }
}

/// Write to the file `path` through `write`. A closed pipe (`--json /dev/stdout | head`) ends the command
/// quietly with success, as [`print_out`] does: nothing is left that anyone would read.
pub(crate) fn write_file(path: &str, write: impl FnOnce(&mut dyn Write) -> std::io::Result<()>) -> Result<(), Failure> {
    let cannot = |e: std::io::Error| Failure(format!("cannot write `{path}`: {e}"));
    let mut out = std::io::BufWriter::new(std::fs::File::create(path).map_err(cannot)?);
    match write(&mut out).and_then(|()| out.flush()) {
        Ok(()) => Ok(()),
        // A reader that has gone (`--csv /dev/stdout | head`) is not an error of ours.
        Err(e) if e.kind() == std::io::ErrorKind::BrokenPipe => std::process::exit(0),
        Err(e) => Err(cannot(e)),
    }
}

/// The model text and the name to show in messages; `-` reads standard input.
pub(crate) fn read_model(path: &str) -> Result<(String, String), Failure> {
    use std::io::Read;
    let (name, bytes) = if path == "-" {
        let mut bytes = Vec::new();
        std::io::stdin().read_to_end(&mut bytes).map_err(|e| format!("cannot read standard input: {e}"))?;
        ("<stdin>".to_string(), bytes)
    } else {
        let bytes = std::fs::read(path).map_err(|e| format!("cannot read `{path}`: {e}"))?;
        (path.to_string(), bytes)
    };
    match String::from_utf8(bytes) {
        Ok(text) => Ok((name, text)),
        Err(e) => {
            let valid = e.utf8_error().valid_up_to();
            let text = String::from_utf8_lossy(&e.into_bytes()[..valid]).into_owned();
            let at = crate::lang::Position::of(&text, valid);
            Err(Failure(format!(
                "{name}:{}:{}: error: the file is not UTF-8 text (byte {valid} is not)\n",
                at.line, at.column
            )))
        }
    }
}

/// Check a model, rendering any problem against its text.
pub(crate) fn load(path: &str) -> Result<(String, String, crate::model::Model), Failure> {
    let (name, text) = read_model(path)?;
    let model = crate::model::check(&text).map_err(|d| Failure(d.render(&name, &text)))?;
    Ok((name, text, model))
}
