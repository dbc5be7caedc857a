//! Numbers as the command line prints them, for the page's tables: one rule, in
//! `crate::report`, so that the page and the terminal show the same digits.

use wasm_bindgen::prelude::*;

/// `value` to `digits` significant digits, as the summary table prints it ("—" for NaN).
#[wasm_bindgen]
pub fn format_significant(value: f64, digits: usize) -> String {
    crate::report::significant(value, digits)
}

/// `value` to `decimals` decimals, as the summary table prints ESS and R-hat ("—" when it is not
/// a finite number).
#[wasm_bindgen]
pub fn format_fixed(value: f64, decimals: usize) -> String {
    crate::report::fixed(value, decimals)
}
