//! The first line of a file: the names of its columns, which say its layout.

use super::scan::MAX_COLUMNS;
use super::{Layout, ReadError, Source};
use std::collections::HashMap;

/// The column that labels each row's chain.
pub const CHAIN: &str = "chain";
/// The column that numbers the draws of a chain (checked, not summarised).
pub const ITERATION: &str = "iteration";

/// What a file's header says.
#[derive(Clone, Debug)]
pub(super) struct Header {
    /// Cells in every row.
    pub width: usize,
    pub layout: Layout,
    /// Fields of the chain and iteration columns.
    pub chain: Option<usize>,
    pub iteration: Option<usize>,
    /// Every quantity column: its field and name, in the header's order.
    pub quantities: Vec<(usize, String)>,
}

/// Read the header `record` (at `line`, byte `offset`) of `source`, in the layout given or, with
/// `None`, the one it names.
pub(super) fn read(source: &dyn Source, record: &csv::ByteRecord, layout: Option<Layout>) -> Result<Header, ReadError> {
    let row = record.position().map_or((1, 0), |p| (p.line(), p.byte()));
    let fail = |field: usize, message: String| ReadError::in_row(source, row, field, message);
    if record.len() > MAX_COLUMNS {
        return Err(fail(
            MAX_COLUMNS,
            format!("the header names {} columns, more than the limit of {MAX_COLUMNS}", record.len()),
        ));
    }
    let mut names = Vec::with_capacity(record.len());
    let mut seen: HashMap<&str, usize> = HashMap::new();
    for (field, cell) in record.iter().enumerate() {
        let name = std::str::from_utf8(cell)
            .map_err(|_| fail(field, format!("the name of column {} is not UTF-8 text", field + 1)))?;
        if name.is_empty() {
            return Err(fail(
                field,
                format!("column {} has no name: the first line must name every column", field + 1),
            ));
        }
        if let Some(first) = seen.insert(name, field) {
            return Err(fail(
                field,
                format!("the column name `{name}` is used twice (first for column {})", first + 1),
            ));
        }
        names.push(name);
    }
    if names.iter().all(|n| n.parse::<f64>().is_ok()) {
        return Err(fail(
            0,
            "the first line holds numbers, not column names: the first line must name the columns \
             (such as `chain,iteration,mu,sigma`)"
                .into(),
        ));
    }
    let position = |wanted: &str| names.iter().position(|n| *n == wanted);
    let chain = match layout {
        Some(Layout::FilePerChain) => None,
        _ => position(CHAIN),
    };
    let layout = match (layout, chain) {
        (Some(Layout::ChainColumn), None) => {
            return Err(fail(0, format!("there is no `{CHAIN}` column to tell the chains apart")));
        }
        (_, Some(_)) => Layout::ChainColumn,
        (_, None) => Layout::FilePerChain,
    };
    let iteration = position(ITERATION);
    let quantities: Vec<(usize, String)> = names
        .iter()
        .enumerate()
        .filter(|&(field, _)| Some(field) != chain && Some(field) != iteration)
        .map(|(field, name)| (field, name.to_string()))
        .collect();
    if quantities.is_empty() {
        return Err(fail(0, "no columns of draws: the header names only the chain and the iteration".into()));
    }
    Ok(Header { width: record.len(), layout, chain, iteration, quantities })
}
