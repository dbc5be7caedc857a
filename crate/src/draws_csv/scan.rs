//! The first pass: every file read once, every cell checked, the draws of each chain counted.
//! Nothing but counts and labels is kept.

use super::header::{self, Header};
use super::{BadCell, Layout, Options, ReadError, Source, next_record, parse_draw, reader, shown};
use crate::report::{ChainSource, DrawsReport};
use std::collections::HashMap;

/// Most chains the files may hold (a chain label that changes on every row would otherwise make
/// millions of one-draw chains).
pub const MAX_CHAINS: usize = 4096;
/// Most columns a file may have.
pub const MAX_COLUMNS: usize = 100_000;

/// Rows between two progress reports.
const PROGRESS_ROWS: u64 = 1 << 14;

/// A chain found in the files.
#[derive(Clone, Debug, PartialEq)]
pub struct Chain {
    /// Its file, an index into the sources.
    pub file: usize,
    /// Its label in the chain column; none when its file is the chain.
    pub label: Option<String>,
    /// Its draws in the file.
    pub draws: usize,
    /// Where its first and last rows start: (line, byte).
    first: (u64, u64),
    last: (u64, u64),
    /// The last iteration number and its line, to check that they increase.
    last_iteration: Option<(f64, u64)>,
}

impl Chain {
    /// The chain as messages name it.
    fn called(&self, file: &str) -> String {
        match &self.label {
            Some(label) => format!("chain `{label}` of {file}"),
            None => format!("the chain of {file}"),
        }
    }
}

/// How one file is read in the later passes.
#[derive(Clone, Debug)]
pub(super) struct FilePlan {
    pub name: String,
    /// The chain column's field, or the file's one chain.
    pub chain: ChainOfRow,
    /// The field of every quantity (in the order of [`Scan::quantities`]) in this file.
    pub fields: Vec<usize>,
}

#[derive(Clone, Copy, Debug)]
pub(super) enum ChainOfRow {
    Column(usize),
    Whole(usize),
}

/// What the first pass found: the layout, the quantities, the chains and their lengths. Read
/// the draws with [`Scan::read`].
#[derive(Clone, Debug)]
pub struct Scan {
    pub layout: Layout,
    /// The quantity columns, in the order of the first file's header.
    pub quantities: Vec<String>,
    /// The chains, in order (see the module's documentation).
    pub chains: Vec<Chain>,
    /// Draws per chain to use: all of them, or the shortest chain's number when cutting.
    pub draws: usize,
    /// Warnings about the reading (chains cut to the shortest).
    pub notes: Vec<String>,
    pub(super) files: Vec<FilePlan>,
    /// Chain labels to chain indices.
    pub(super) labels: HashMap<Vec<u8>, usize>,
}

impl Scan {
    /// The report of these chains, with no quantities yet.
    pub fn report(&self) -> DrawsReport {
        let chains = self
            .chains
            .iter()
            .enumerate()
            .map(|(i, c)| ChainSource {
                chain: i + 1,
                file: self.files[c.file].name.clone(),
                label: c.label.clone(),
                draws: c.draws,
            })
            .collect();
        let files = self.files.iter().map(|f| f.name.clone()).collect();
        DrawsReport::new(files, self.layout, chains, self.draws, self.notes.clone())
    }
}

/// Read every file of `sources` once and check it (see the module's documentation).
/// `progress` hears how many bytes of all files have been read so far.
pub fn scan(sources: &[&dyn Source], options: &Options, progress: &mut dyn FnMut(u64)) -> Result<Scan, ReadError> {
    let Some(first) = sources.first() else {
        return Err(ReadError {
            file: "mixwell".into(),
            at: None,
            message: "no files of draws given".into(),
            truncating_helps: false,
        });
    };
    for (i, source) in sources.iter().enumerate() {
        if sources[..i].iter().any(|s| s.name() == source.name()) {
            return Err(ReadError::of_file(*source, "the file is given twice".into()));
        }
    }
    let mut found = Found { chains: Vec::new(), labels: HashMap::new() };
    let mut files = Vec::with_capacity(sources.len());
    let mut quantities: Vec<String> = Vec::new();
    let mut layout = Layout::FilePerChain;
    let mut bytes_before = 0;
    for (f, &source) in sources.iter().enumerate() {
        let mut reader = reader(source, 0)?;
        let mut record = csv::ByteRecord::new();
        let fail_at = |line: u64, column: u64, message: String| ReadError::at(source, (line, column), message);
        if !next_record(source, &mut reader, &mut record)? {
            return Err(fail_at(1, 1, "the file is empty: its first line must name the columns".into()));
        }
        let header_line = record.position().map_or(1, |p| p.line());
        let header = header::read(source, &record, options.layout)?;
        let fields = if f == 0 {
            layout = header.layout;
            quantities = header.quantities.iter().map(|(_, name)| name.clone()).collect();
            header.quantities.iter().map(|&(field, _)| field).collect()
        } else {
            agree(source, &record, &header, layout, &quantities, first.name())?
        };
        let chain = match header.chain {
            Some(field) => ChainOfRow::Column(field),
            None => ChainOfRow::Whole(found.add(source, f, None, (header_line, 0))?),
        };
        let mut rows = 0u64;
        let mut cache: Option<(Vec<u8>, usize)> = None;
        while next_record(source, &mut reader, &mut record)? {
            let (line, byte) = record.position().map_or((0, 0), |p| (p.line(), p.byte()));
            let fail = |field: usize, message: String| ReadError::in_row(source, (line, byte), field, message);
            if record.len() != header.width {
                let field = record.len().min(header.width);
                let cells = if record.len() == 1 { "1 cell".to_string() } else { format!("{} cells", record.len()) };
                return Err(fail(
                    field,
                    format!("this row has {cells}, but the header names {} columns", header.width),
                ));
            }
            let index = match chain {
                ChainOfRow::Whole(index) => index,
                ChainOfRow::Column(field) => match &cache {
                    Some((label, index)) if label.as_slice() == &record[field] => *index,
                    _ => {
                        let index = found.of_label(sources, f, &record[field], (line, byte), &fail, field)?;
                        cache = Some((record[field].to_vec(), index));
                        index
                    }
                },
            };
            let this = &mut found.chains[index];
            if let Some(field) = header.iteration {
                check_iteration(this, &record[field], line, source.name(), &|message| fail(field, message))?;
            }
            check_draws(&header, &record, &fail)?;
            this.draws += 1;
            this.last = (line, byte);
            rows += 1;
            if rows.is_multiple_of(PROGRESS_ROWS) {
                progress(bytes_before + reader.position().byte());
            }
        }
        if rows == 0 {
            return Err(fail_at(header_line + 1, 1, "the file names its columns but holds no draws".into()));
        }
        bytes_before += source.size();
        progress(bytes_before);
        files.push(FilePlan { name: source.name().to_string(), chain, fields });
    }
    let Found { mut chains, mut labels } = found;
    // Chains labelled by whole numbers go in numeric order, as a run numbers them.
    let numbers: Option<Vec<i64>> = chains.iter().map(|c| c.label.as_deref().and_then(|l| l.parse().ok())).collect();
    if let Some(numbers) = numbers {
        let mut order: Vec<usize> = (0..chains.len()).collect();
        order.sort_by_key(|&i| numbers[i]);
        let mut new_index = vec![0; chains.len()];
        for (new, &old) in order.iter().enumerate() {
            new_index[old] = new;
        }
        for index in labels.values_mut() {
            *index = new_index[*index];
        }
        for plan in &mut files {
            if let ChainOfRow::Whole(index) = &mut plan.chain {
                *index = new_index[*index];
            }
        }
        chains = order.iter().map(|&i| chains[i].clone()).collect();
    }
    let draws = equal_lengths(sources, &files, &chains, options.truncate)?;
    let mut notes = Vec::new();
    let longest = chains.iter().map(|c| c.draws).max().unwrap_or(0);
    if longest > draws {
        notes.push(format!(
            "the chains have different lengths ({draws} to {longest} draws), so each was truncated to its first \
             {draws}, as asked; the draws left out are not judged"
        ));
    }
    Ok(Scan { layout, quantities, chains, draws, notes, files, labels })
}

/// Check that the iteration number in `cell`, on `line`, is whole and follows the last of `chain`.
fn check_iteration(
    chain: &mut Chain,
    cell: &[u8],
    line: u64,
    file: &str,
    fail: &dyn Fn(String) -> ReadError,
) -> Result<(), ReadError> {
    let number = std::str::from_utf8(cell)
        .ok()
        .and_then(|t| t.parse::<f64>().ok())
        .filter(|n| n.is_finite() && n.fract() == 0.0)
        .ok_or_else(|| fail(format!("the iteration `{}` is not a whole number", shown(cell))))?;
    if let Some((before, before_line)) = chain.last_iteration
        && number <= before
    {
        return Err(fail(format!(
            "iteration {number} comes after iteration {before} (line {before_line}) in {}: the draws of a chain \
             must be in the order they were made",
            chain.called(file)
        )));
    }
    chain.last_iteration = Some((number, line));
    Ok(())
}

/// Check that every quantity's cell of `record` holds a finite number.
fn check_draws(
    header: &Header,
    record: &csv::ByteRecord,
    fail: &dyn Fn(usize, String) -> ReadError,
) -> Result<(), ReadError> {
    for (field, name) in &header.quantities {
        let cell = &record[*field];
        parse_draw(cell).map_err(|bad| {
            let message = match bad {
                BadCell::Empty => format!("the cell of `{name}` is empty: every row needs a draw of every quantity"),
                BadCell::NotANumber => format!("`{}` is not a number (column `{name}`)", shown(cell)),
                BadCell::NotFinite => format!(
                    "`{}` is not a finite number (column `{name}`): draws must be finite; NaN or infinite draws \
                     mean the sampler or the model went wrong",
                    shown(cell)
                ),
            };
            fail(*field, message)
        })?;
    }
    Ok(())
}

/// The chains found so far, in order of appearance, and the chain of each label.
struct Found {
    chains: Vec<Chain>,
    labels: HashMap<Vec<u8>, usize>,
}

impl Found {
    fn add(
        &mut self,
        source: &dyn Source,
        file: usize,
        label: Option<String>,
        at: (u64, u64),
    ) -> Result<usize, ReadError> {
        if self.chains.len() == MAX_CHAINS {
            return Err(ReadError::at(
                source,
                (at.0, 1),
                format!("more than {MAX_CHAINS} chains: this would be chain {}", MAX_CHAINS + 1),
            ));
        }
        self.chains.push(Chain { file, label, draws: 0, first: at, last: at, last_iteration: None });
        Ok(self.chains.len() - 1)
    }

    /// The chain labelled `label` on a row of file `file`, new or found before in this file.
    fn of_label(
        &mut self,
        sources: &[&dyn Source],
        file: usize,
        label: &[u8],
        at: (u64, u64),
        fail: &dyn Fn(usize, String) -> ReadError,
        field: usize,
    ) -> Result<usize, ReadError> {
        if let Some(&index) = self.labels.get(label) {
            let chain = &self.chains[index];
            if chain.file != file {
                return Err(fail(
                    field,
                    format!(
                        "chain `{}` is in {} too (from line {}): each chain must lie in one file; if these are \
                         different chains, label them differently",
                        shown(label),
                        sources[chain.file].name(),
                        chain.first.0,
                    ),
                ));
            }
            return Ok(index);
        }
        if label.is_empty() {
            return Err(fail(field, "the chain label is empty: every row must say which chain it belongs to".into()));
        }
        let Ok(text) = std::str::from_utf8(label) else {
            return Err(fail(field, "the chain label is not UTF-8 text".into()));
        };
        let index = self.add(sources[file], file, Some(text.to_string()), at)?;
        self.labels.insert(label.to_vec(), index);
        Ok(index)
    }
}

/// Every file's quantity fields, in the first file's order, after checking that `header` has
/// the first file's layout and quantities.
fn agree(
    source: &dyn Source,
    record: &csv::ByteRecord,
    header: &Header,
    layout: Layout,
    quantities: &[String],
    first: &str,
) -> Result<Vec<usize>, ReadError> {
    let row = record.position().map_or((1, 0), |p| (p.line(), p.byte()));
    let fail = |field: usize, message: String| ReadError::in_row(source, row, field, message);
    if header.layout != layout {
        let (has, lacks) =
            if header.layout == Layout::ChainColumn { ("this file", first) } else { (first, "this file") };
        return Err(fail(
            0,
            format!("{has} has a `{}` column but {lacks} has not: all files must be laid out alike", header::CHAIN),
        ));
    }
    let mut fields = Vec::with_capacity(quantities.len());
    for name in quantities {
        match header.quantities.iter().find(|(_, n)| n == name) {
            Some(&(field, _)) => fields.push(field),
            None => {
                return Err(fail(
                    0,
                    format!("there is no column `{name}`, which {first} has: all files must have the same columns"),
                ));
            }
        }
    }
    if let Some((field, name)) = header.quantities.iter().find(|(_, n)| !quantities.contains(n)) {
        return Err(fail(
            *field,
            format!("the column `{name}` is not in {first}: all files must have the same columns"),
        ));
    }
    Ok(fields)
}

/// The draws per chain to use: the common length, or the shortest when `truncate`.
fn equal_lengths(
    sources: &[&dyn Source],
    files: &[FilePlan],
    chains: &[Chain],
    truncate: bool,
) -> Result<usize, ReadError> {
    let Some(shortest) = chains.iter().min_by_key(|c| c.draws) else {
        return Ok(0);
    };
    let Some(longest) = chains.iter().max_by_key(|c| c.draws) else {
        return Ok(0);
    };
    if shortest.draws == longest.draws || truncate {
        return Ok(shortest.draws);
    }
    let source = sources[shortest.file];
    let field = match files[shortest.file].chain {
        ChainOfRow::Column(field) => field,
        ChainOfRow::Whole(_) => 0,
    };
    let long_name = &files[longest.file].name;
    Err(ReadError {
        truncating_helps: true,
        ..ReadError::in_row(
            source,
            shortest.last,
            field,
            format!(
                "{} ends here after {} draws, but {} has {}: every chain needs the same number of draws, or \
             truncate them all to the shortest to use the first {} of each",
                shortest.called(source.name()),
                shortest.draws,
                longest.called(long_name),
                longest.draws,
                shortest.draws
            ),
        )
    })
}
