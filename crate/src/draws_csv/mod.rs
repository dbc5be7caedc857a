//! Draws read from CSV files (RFC 4180) made by any sampler, checked cell by cell, in bounded
//! memory. This module reads and validates; it computes no diagnostics ([`crate::report`] does)
//! and opens no files itself: a [`Source`] hands it bytes, from a file natively or from memory in
//! the page.
//!
//! # Layouts, told from the first line (the header) of each file
//! * **A chain column.** A column named `chain` labels the chain of every row. Several files may
//!   share the chains between them (one file of four chains, or four files of one chain each, as
//!   `mixwell run --csv` writes), but each chain lies in one file. Chains are ordered by their
//!   labels when every label is a whole number (so `1, 2, …, 10`), else in the order they first
//!   appear. Rows of different chains may interleave.
//! * **One chain per file.** Without a `chain` column, each file is one chain, in the order the
//!   files are given.
//!
//! Either way a column named `iteration`, if present, numbers the draws: it must be a whole
//! number that increases within each chain (so that shuffled or concatenated files are caught),
//! and it is not summarised. Every other column is a quantity, summarised on its own. All files
//! must name the same quantities (in any order). [`Options::layout`] overrides the detection:
//! with [`Layout::FilePerChain`] a column named `chain` is a quantity like any other.
//!
//! # Cells
//! Numbers as Rust and most languages write them (`-1.5`, `2e-3`, `.5`); spaces around a cell
//! and double quotes around it are allowed; a UTF-8 byte-order mark, CRLF line ends, blank lines
//! and lines starting with `#` are allowed and skipped. Refused, each with the file, line and
//! column (counted in characters): an empty file, a header without rows, a header of numbers,
//! unnamed or repeated column names, rows with more or fewer cells than the header, empty cells,
//! cells that are not numbers, NaN or infinite values, an `iteration` that does not increase, a
//! chain split over two files, and chains of unequal length — unless [`Options::truncate`] asks
//! for every chain to be cut to the shortest, which is then said in a warning.
//!
//! # Memory
//! [`scan`] reads every file once, checks every cell and counts the draws of each chain, holding
//! one row at a time. [`Scan::read`] then reads the files again for a range of quantities, holding
//! only those quantities' draws; [`Scan::blocks`] sizes the ranges so that they, and the
//! diagnostics of one quantity, fit a memory budget. A gigabyte of CSV is read in a few passes
//! within a few hundred megabytes.

mod columns;
mod header;
mod locate;
mod scan;
#[cfg(test)]
mod tests;

pub use crate::report::Layout;
pub use columns::{Columns, WORKING_COPIES};
pub use scan::{Chain, MAX_CHAINS, MAX_COLUMNS, Scan, scan};

use std::fmt;
use std::io::{self, Read};

/// Where a file's bytes come from.
pub trait Source {
    /// The file's name as shown in messages and in the report.
    fn name(&self) -> &str;
    /// The file's bytes from `offset` on. Called once per pass, and again to place an error.
    fn open(&self, offset: u64) -> io::Result<Box<dyn Read + '_>>;
    /// The file's size in bytes (for progress).
    fn size(&self) -> u64;
}

/// A file held in memory (the page's files, and tests).
pub struct InMemory<'a> {
    pub name: String,
    pub bytes: &'a [u8],
}

impl Source for InMemory<'_> {
    fn name(&self) -> &str {
        &self.name
    }

    fn open(&self, offset: u64) -> io::Result<Box<dyn Read + '_>> {
        let start = usize::try_from(offset).unwrap_or(usize::MAX).min(self.bytes.len());
        Ok(Box::new(&self.bytes[start..]))
    }

    fn size(&self) -> u64 {
        self.bytes.len() as u64
    }
}

/// How to read the files.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
pub struct Options {
    /// The layout, or `None` to tell it from the header.
    pub layout: Option<Layout>,
    /// Cut chains of unequal length to the shortest (their first draws) instead of refusing them.
    pub truncate: bool,
}

/// A problem with the files, placed where it is.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct ReadError {
    pub file: String,
    /// 1-based line and column (in characters), when the problem has a place.
    pub at: Option<(u64, u64)>,
    pub message: String,
    /// Whether truncating the chains to the shortest would do (chains of unequal length).
    pub truncating_helps: bool,
}

impl ReadError {
    /// A problem with the whole of `source`.
    fn of_file(source: &dyn Source, message: String) -> ReadError {
        ReadError { file: source.name().to_string(), at: None, message, truncating_helps: false }
    }

    /// A problem at `line` and `column` of `source`.
    fn at(source: &dyn Source, (line, column): (u64, u64), message: String) -> ReadError {
        ReadError { at: Some((line, column)), ..ReadError::of_file(source, message) }
    }

    /// A problem with field `field` of the row that starts at (`line`, byte `offset`).
    fn in_row(source: &dyn Source, (line, offset): (u64, u64), field: usize, message: String) -> ReadError {
        ReadError::at(source, locate::place(source, line, offset, field), message)
    }
}

impl fmt::Display for ReadError {
    /// In the GNU form `FILE:LINE:COLUMN: error: message`, as the model errors are.
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self.at {
            Some((line, column)) => write!(f, "{}:{line}:{column}: error: {}", self.file, self.message),
            None => write!(f, "{}: error: {}", self.file, self.message),
        }
    }
}

impl std::error::Error for ReadError {}

/// What is wrong with a cell that should hold a draw.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
enum BadCell {
    Empty,
    NotANumber,
    NotFinite,
}

/// A draw from its cell (already trimmed of spaces and unquoted by the CSV reader).
fn parse_draw(cell: &[u8]) -> Result<f64, BadCell> {
    if cell.is_empty() {
        return Err(BadCell::Empty);
    }
    let value: f64 = std::str::from_utf8(cell).ok().and_then(|t| t.parse().ok()).ok_or(BadCell::NotANumber)?;
    if value.is_finite() { Ok(value) } else { Err(BadCell::NotFinite) }
}

/// A cell's text for a message: at most 40 characters of it, line breaks and other control
/// characters escaped.
fn shown(cell: &[u8]) -> String {
    let text = String::from_utf8_lossy(cell);
    let cut = text.char_indices().nth(40).map_or(text.len(), |(at, _)| at);
    let more = if cut < text.len() { "…" } else { "" };
    let escaped: String = text[..cut]
        .chars()
        .map(|c| if c.is_control() { c.escape_default().to_string() } else { c.to_string() })
        .collect();
    escaped + more
}

/// The CSV reader every pass uses: no header handling of its own (the first record is checked
/// here), rows of any length (a ragged row is reported here, with its place), spaces trimmed,
/// `#` lines skipped.
fn reader<'a>(source: &'a dyn Source, offset: u64) -> Result<csv::Reader<Box<dyn Read + 'a>>, ReadError> {
    let input: Box<dyn Read + 'a> = Box::new(ShortLines::new(source.open(offset).map_err(|e| io_error(source, &e))?));
    Ok(csv::ReaderBuilder::new()
        .has_headers(false)
        .flexible(true)
        .trim(csv::Trim::All)
        .comment(Some(b'#'))
        .buffer_capacity(1 << 16)
        .from_reader(input))
}

fn io_error(source: &dyn Source, error: &dyn fmt::Display) -> ReadError {
    ReadError::of_file(source, format!("cannot read the file: {error}"))
}

/// The next record, or `None` at the end of the file.
fn next_record(
    source: &dyn Source,
    reader: &mut csv::Reader<Box<dyn Read + '_>>,
    record: &mut csv::ByteRecord,
) -> Result<bool, ReadError> {
    reader.read_byte_record(record).map_err(|e| io_error(source, &e))
}

/// Longest line a file may have: the reader holds a whole row, so a file without line breaks
/// would otherwise be held whole.
pub const MAX_LINE_BYTES: usize = 64 << 20;

/// The bytes of a file, refused once a line grows longer than [`MAX_LINE_BYTES`].
struct ShortLines<R> {
    inner: R,
    since_newline: usize,
}

impl<R: Read> ShortLines<R> {
    fn new(inner: R) -> Self {
        ShortLines { inner, since_newline: 0 }
    }
}

impl<R: Read> Read for ShortLines<R> {
    fn read(&mut self, buf: &mut [u8]) -> io::Result<usize> {
        let n = self.inner.read(buf)?;
        self.since_newline = match buf[..n].iter().rposition(|&b| b == b'\n') {
            Some(at) => n - at - 1,
            None => self.since_newline + n,
        };
        if self.since_newline > MAX_LINE_BYTES {
            return Err(io::Error::new(
                io::ErrorKind::InvalidData,
                format!("a line is longer than {} MiB; a file of draws has a row per line", MAX_LINE_BYTES >> 20),
            ));
        }
        Ok(n)
    }
}
