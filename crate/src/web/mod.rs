//! Browser bindings: a few `#[wasm_bindgen]` functions that take and return plain data.
//!
//! The page's JavaScript owns the DOM; nothing here touches it. The same bindings load on the
//! page's main thread and in a module Web Worker. Offsets handed to the page are UTF-16 code units,
//! because that is how JavaScript strings (and so the editor) count; rows and columns are 1-based,
//! columns in characters, as the command line prints them.

mod diagnose;
mod format;
mod run;

pub use diagnose::{MAX_PAGE_CSV_BYTES, diagnose_files};
pub use format::{format_fixed, format_significant};
pub use run::{
    ChainEngine, RunEngine, default_settings, describe_settings, make_link, plan_run, read_link, standard_options,
};

use crate::lang::{Diagnostic, Position};
use crate::model::{self, ModelInfo};
use serde::Serialize;
use wasm_bindgen::prelude::*;

/// The crate's version, so the page can say which engine it runs.
#[wasm_bindgen]
pub fn version() -> String {
    env!("CARGO_PKG_VERSION").to_string()
}

/// Check a model: `{ ok: true, info }` or `{ ok: false, error: { message, expected, help, from,
/// to, start, end } }`, where `from`/`to` are `{ line, column }` and `start`/`end` are UTF-16
/// offsets into `source`.
#[wasm_bindgen]
pub fn check_model(source: &str) -> Result<JsValue, JsError> {
    let outcome = match model::check(source) {
        Ok(model) => Checked::Ok { ok: true, info: model.info() },
        Err(diagnostic) => Checked::Err { ok: false, error: PageDiagnostic::new(source, diagnostic) },
    };
    // `json_compatible` gives plain objects and `null` for a missing expectation or hint.
    Ok(outcome.serialize(&serde_wasm_bindgen::Serializer::json_compatible())?)
}

#[derive(Serialize)]
#[serde(untagged)]
enum Checked {
    Ok { ok: bool, info: ModelInfo },
    Err { ok: bool, error: PageDiagnostic },
}

/// A [`Diagnostic`] placed for the editor.
#[derive(Serialize)]
struct PageDiagnostic {
    message: String,
    expected: Option<String>,
    help: Option<String>,
    from: Position,
    to: Position,
    start: usize,
    end: usize,
}

impl PageDiagnostic {
    fn new(source: &str, diagnostic: Diagnostic) -> Self {
        let Diagnostic { message, span, expected, help } = diagnostic;
        let end = span.end.max(span.start);
        PageDiagnostic {
            message,
            expected,
            help,
            from: Position::of(source, span.start),
            to: Position::of(source, end),
            start: utf16_offset(source, span.start),
            end: utf16_offset(source, end),
        }
    }
}

/// The UTF-16 offset of byte `offset`, clamped to the text and back to a character boundary
/// (the same rule as [`Position::of`], so the underline and the reported column agree).
fn utf16_offset(source: &str, offset: usize) -> usize {
    let mut offset = offset.min(source.len());
    while !source.is_char_boundary(offset) {
        offset -= 1;
    }
    source[..offset].encode_utf16().count()
}
