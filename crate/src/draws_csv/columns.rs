//! The later passes: the draws of a range of quantities, read again from the files, and the
//! ranges that fit a memory budget.

use super::scan::{ChainOfRow, Scan};
use super::{ReadError, Source, next_record, parse_draw, reader};
use std::ops::Range;

/// Copies of one quantity's draws that diagnosing it holds at its peak: `diag::summarise` keeps
/// the pooled draws, their sorted copy, the chains, the split chains and their ranks while it
/// ranks the folded draws (about ten copies), and the autocorrelation copies them once more.
/// Measured: peak resident memory of `mixwell diagnose` (DEVELOPERS.md, "Reading draws").
pub const WORKING_COPIES: u64 = 12;

/// Rows between two progress reports.
const PROGRESS_ROWS: u64 = 1 << 14;

/// The draws of some quantities: `[quantity][chain]`, each chain `Scan::draws` long.
pub type Columns = Vec<Vec<Vec<f64>>>;

impl Scan {
    /// Bytes that one quantity's draws take.
    pub fn quantity_bytes(&self) -> u64 {
        8 * self.chains.len() as u64 * self.draws as u64
    }

    /// The quantities in ranges to read one pass at a time, so that a range's draws and the
    /// diagnostics of one quantity fit in `budget` bytes; or, when even one quantity does not,
    /// why not.
    pub fn blocks(&self, budget: u64) -> Result<Vec<Range<usize>>, String> {
        let one = self.quantity_bytes().max(1);
        let fits = budget / one;
        if fits <= WORKING_COPIES {
            return Err(format!(
                "judging one quantity of {} chains × {} draws needs about {} of memory, more than the {} allowed",
                self.chains.len(),
                self.draws,
                gib((WORKING_COPIES + 1) * one),
                gib(budget)
            ));
        }
        let per_pass = usize::try_from(fits - WORKING_COPIES).unwrap_or(usize::MAX).min(self.quantities.len()).max(1);
        let count = self.quantities.len();
        Ok((0..count).step_by(per_pass).map(|start| start..(start + per_pass).min(count)).collect())
    }

    /// Read the draws of the quantities `range` (indices into [`Scan::quantities`]) from
    /// `sources`, the same files as were scanned. `progress` hears how many bytes of all files
    /// have been read in this pass.
    pub fn read(
        &self,
        sources: &[&dyn Source],
        range: Range<usize>,
        progress: &mut dyn FnMut(u64),
    ) -> Result<Columns, ReadError> {
        let mut columns: Columns =
            range.clone().map(|_| self.chains.iter().map(|_| Vec::with_capacity(self.draws)).collect()).collect();
        let changed = |source: &dyn Source, line: u64| {
            ReadError::at(source, (line, 1), "the file changed while it was being read; read it again".into())
        };
        let mut bytes_before = 0;
        for (plan, &source) in self.files.iter().zip(sources) {
            let fields: Vec<usize> = range.clone().map(|q| plan.fields[q]).collect();
            let mut reader = reader(source, 0)?;
            let mut record = csv::ByteRecord::new();
            let mut cache: Option<(Vec<u8>, usize)> = None;
            let mut rows = 0u64;
            next_record(source, &mut reader, &mut record)?;
            while next_record(source, &mut reader, &mut record)? {
                let line = record.position().map_or(0, |p| p.line());
                let chain = match plan.chain {
                    ChainOfRow::Whole(index) => index,
                    ChainOfRow::Column(field) => {
                        let label = record.get(field).ok_or_else(|| changed(source, line))?;
                        match &cache {
                            Some((cached, index)) if cached.as_slice() == label => *index,
                            _ => {
                                let index = *self.labels.get(label).ok_or_else(|| changed(source, line))?;
                                cache = Some((label.to_vec(), index));
                                index
                            }
                        }
                    }
                };
                rows += 1;
                if rows.is_multiple_of(PROGRESS_ROWS) {
                    progress(bytes_before + reader.position().byte());
                }
                // Chains cut to the shortest keep their first draws.
                if columns.first().is_some_and(|c| c[chain].len() >= self.draws) {
                    continue;
                }
                for (column, &field) in columns.iter_mut().zip(&fields) {
                    let cell = record.get(field).ok_or_else(|| changed(source, line))?;
                    column[chain].push(parse_draw(cell).map_err(|_| changed(source, line))?);
                }
            }
            bytes_before += source.size();
            progress(bytes_before);
        }
        for (chain, info) in self.chains.iter().enumerate() {
            if columns.first().is_some_and(|c| c[chain].len() != self.draws) {
                let source = sources[info.file];
                return Err(ReadError::of_file(
                    source,
                    "the file changed while it was being read; read it again".into(),
                ));
            }
        }
        Ok(columns)
    }
}

/// Bytes in GiB, as `--max-memory` takes them.
fn gib(bytes: u64) -> String {
    format!("{:.3} GiB", bytes as f64 / (1u64 << 30) as f64)
}
