//! The `mixwell` command line: argument parsing and printing over the library. No statistics
//! happen here.
//!
//! Exit status: 0 on success, 2 on any input error (the message goes to standard error).

mod args;
mod check;
mod density;
mod link;
mod run;

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
    };
    match result {
        Ok(output) => {
            print!("{output}");
            ExitCode::SUCCESS
        }
        Err(Failure(message)) => {
            if !message.is_empty() {
                eprint!("{message}");
                if !message.ends_with('\n') {
                    eprintln!();
                }
            }
            ExitCode::from(2)
        }
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

/// Check a model, rendering every problem against its text; its warnings go to standard error.
pub(crate) fn load(path: &str) -> Result<(String, String, crate::model::Model), Failure> {
    let (name, text) = read_model(path)?;
    let model = crate::model::check(&text).map_err(|d| Failure(d.render(&name, &text)))?;
    warn(&name, &text, &model);
    Ok((name, text, model))
}

/// A model's warnings, rendered as its errors are, on standard error.
pub(crate) fn warn(name: &str, text: &str, model: &crate::model::Model) {
    for warning in &model.warnings {
        eprint!("{}", warning.render(name, text));
    }
}
