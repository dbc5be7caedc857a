//! Draws from CSV files judged in the page: the same reading and report as `mixwell diagnose`,
//! on files the page has read into memory. Nothing leaves the browser.

use crate::draws_csv::{self, InMemory, Layout, Options, Source};
use serde::{Deserialize, Serialize};
use wasm_bindgen::prelude::*;

/// Most bytes of CSV the page judges at once; the command line reads files of any size.
pub const MAX_PAGE_CSV_BYTES: usize = 256 << 20;

/// How to read the files, as the page's form says it.
#[derive(Deserialize)]
struct PageOptions {
    /// `null` to tell the layout from the headers.
    layout: Option<Layout>,
    truncate: bool,
}

/// Judge the draws in `contents` (one `Uint8Array` per file, named by `names`), as `options`
/// (`{ layout: null | "chain-column" | "file-per-chain", truncate }`) say, with autocorrelation
/// to lag `lags`. Returns `{ report, json, columns, draws }`: the report object and its JSON, the
/// exact text `mixwell diagnose --json` writes; `columns`, the quantities; `draws`, one
/// `Float64Array` per chain (rows of `columns`, as a run's). A problem with the files is an error
/// whose message is the command line's (`FILE:LINE:COLUMN: error: …`).
#[wasm_bindgen]
pub fn diagnose_files(
    names: JsValue,
    contents: js_sys::Array,
    options: JsValue,
    lags: usize,
) -> Result<JsValue, JsError> {
    let names: Vec<String> = serde_wasm_bindgen::from_value(names)?;
    let options: PageOptions = serde_wasm_bindgen::from_value(options)?;
    let bytes: Vec<Vec<u8>> = contents.iter().map(|c| js_sys::Uint8Array::new(&c).to_vec()).collect();
    if names.len() != bytes.len() {
        return Err(JsError::new("a name is needed for every file"));
    }
    let total: usize = bytes.iter().map(Vec::len).sum();
    if total > MAX_PAGE_CSV_BYTES {
        return Err(JsError::new(&format!(
            "these files hold {:.0} MiB; the page judges at most {} MiB at once — the command line \
             (mixwell diagnose) reads files of any size",
            total as f64 / (1 << 20) as f64,
            MAX_PAGE_CSV_BYTES >> 20
        )));
    }
    let files: Vec<InMemory> =
        names.into_iter().zip(&bytes).map(|(name, bytes)| InMemory { name, bytes: bytes.as_slice() }).collect();
    let sources: Vec<&dyn Source> = files.iter().map(|f| f as &dyn Source).collect();
    let options = Options { layout: options.layout, truncate: options.truncate };
    let refused = |e: draws_csv::ReadError| {
        let remedy = if e.truncating_helps { " (tick “Truncate chains of unequal length”)" } else { "" };
        JsError::new(&format!("{e}{remedy}"))
    };
    let scan = draws_csv::scan(&sources, &options, &mut |_| {}).map_err(refused)?;
    // The page plots every quantity, so it holds them all; its files are small enough to.
    let columns = scan.read(&sources, 0..scan.quantities.len(), &mut |_| {}).map_err(refused)?;
    let mut report = scan.report();
    for (name, column) in scan.quantities.iter().zip(&columns) {
        let chains: Vec<&[f64]> = column.iter().map(Vec::as_slice).collect();
        report.add(name, &chains, lags);
    }
    let width = columns.len();
    let draws: js_sys::Array = (0..scan.chains.len())
        .map(|c| {
            let mut rows = vec![0.0; scan.draws * width];
            for (q, column) in columns.iter().enumerate() {
                for (i, &x) in column[c].iter().enumerate() {
                    rows[i * width + q] = x;
                }
            }
            JsValue::from(js_sys::Float64Array::from(rows.as_slice()))
        })
        .collect();
    let out = Diagnosed {
        json: serde_json::to_string_pretty(&report)? + "\n",
        report: &report,
        columns: &scan.quantities,
        draws,
    };
    Ok(out.serialize(&serde_wasm_bindgen::Serializer::json_compatible())?)
}

#[derive(Serialize)]
struct Diagnosed<'a> {
    report: &'a crate::report::DrawsReport,
    json: String,
    columns: &'a [String],
    #[serde(with = "serde_wasm_bindgen::preserve")]
    draws: js_sys::Array,
}
