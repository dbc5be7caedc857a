//! `mixwell diagnose`: judge draws from CSV files made by any sampler — the same summary,
//! diagnostics and warnings as `mixwell run`, with no sampler section. Files of any size are read
//! in bounded memory: one pass checks every cell, then passes of a few quantities at a time
//! (`crate::draws_csv`).

use super::Failure;
use crate::draws_csv::{self, Layout, Options, ReadError, Source};
use crate::report;
use std::fs::File;
use std::io::{IsTerminal, Read, Seek, SeekFrom};

#[derive(clap::Args, Debug)]
pub struct DiagnoseArgs {
    /// CSV files of draws: as `mixwell run --csv` writes them, files with a `chain` column, or one
    /// file per chain with a column per quantity.
    #[arg(required = true, value_name = "FILE")]
    pub files: Vec<String>,
    /// How chains are told apart: `auto` reads it from the header (a `chain` column if there is
    /// one, else one chain per file).
    #[arg(long, value_enum, default_value_t = LayoutArg::Auto)]
    pub layout: LayoutArg,
    /// Truncate chains of unequal length to the shortest (keeping their first draws) instead of
    /// refusing them; the report says so.
    #[arg(long)]
    pub truncate: bool,
    /// Autocorrelation is reported for lags 0 to this.
    #[arg(long, default_value_t = 20)]
    pub lags: usize,
    /// Write the JSON report to this file, or `-` for standard output (instead of the table).
    #[arg(long, value_name = "FILE|-")]
    pub json: Option<String>,
    /// Memory for the draws, in GiB: files with more draws than fit are read a few quantities at
    /// a time.
    #[arg(long, default_value_t = 2.0, value_name = "GIB")]
    pub max_memory: f64,
    /// No progress bar.
    #[arg(long)]
    pub quiet: bool,
}

#[derive(clap::ValueEnum, Clone, Copy, Debug, PartialEq, Eq)]
pub enum LayoutArg {
    Auto,
    ChainColumn,
    FilePerChain,
}

pub fn run(args: &DiagnoseArgs) -> Result<String, Failure> {
    if !(args.max_memory.is_finite() && args.max_memory > 0.0) {
        return Err(format!("--max-memory must be a positive number of GiB, not {}", args.max_memory).into());
    }
    let files = args.files.iter().map(|path| OnDisk::open(path)).collect::<Result<Vec<_>, _>>()?;
    let sources: Vec<&dyn Source> = files.iter().map(|f| f as &dyn Source).collect();
    let options = Options {
        layout: match args.layout {
            LayoutArg::Auto => None,
            LayoutArg::ChainColumn => Some(Layout::ChainColumn),
            LayoutArg::FilePerChain => Some(Layout::FilePerChain),
        },
        truncate: args.truncate,
    };
    let bar = Bar::new(args.quiet, files.iter().map(|f| f.size).sum());
    bar.phase("checking");
    let scan = draws_csv::scan(&sources, &options, &mut |bytes| bar.at(bytes)).map_err(failure)?;
    let budget = (args.max_memory * (1u64 << 30) as f64) as u64;
    let blocks = scan.blocks(budget).map_err(|why| format!("{why} (--max-memory {})", args.max_memory))?;
    let mut report = scan.report();
    for (pass, block) in blocks.iter().enumerate() {
        bar.phase(&format!("reading {}/{}", pass + 1, blocks.len()));
        let columns = scan.read(&sources, block.clone(), &mut |bytes| bar.at(bytes)).map_err(failure)?;
        // Each quantity's draws are dropped once it is summarised.
        for (q, column) in block.clone().zip(columns) {
            let chains: Vec<&[f64]> = column.iter().map(Vec::as_slice).collect();
            report.add(&scan.quantities[q], &chains, args.lags);
        }
    }
    bar.finish();
    let json = serde_json::to_string_pretty(&report)? + "\n";
    match args.json.as_deref() {
        Some("-") => Ok(json),
        Some(path) => {
            super::write_file(path, |out| out.write_all(json.as_bytes()))?;
            Ok(report::draws_table(&report))
        }
        None => Ok(report::draws_table(&report)),
    }
}

fn failure(error: ReadError) -> Failure {
    let remedy = if error.truncating_helps { " (--truncate)" } else { "" };
    Failure(format!("{error}{remedy}"))
}

/// A file of draws, opened once per pass.
struct OnDisk {
    path: String,
    size: u64,
}

impl OnDisk {
    fn open(path: &str) -> Result<OnDisk, Failure> {
        if path == "-" {
            return Err("diagnose reads each file more than once, so it needs files, not standard input (`-`)".into());
        }
        let cannot = |e: std::io::Error| Failure(format!("{path}: error: cannot read the file: {e}"));
        let metadata = File::open(path).and_then(|f| f.metadata()).map_err(cannot)?;
        if metadata.is_dir() {
            return Err(format!("{path}: error: this is a folder, not a file of draws").into());
        }
        Ok(OnDisk { path: path.to_string(), size: metadata.len() })
    }
}

impl Source for OnDisk {
    fn name(&self) -> &str {
        &self.path
    }

    fn open(&self, offset: u64) -> std::io::Result<Box<dyn Read + '_>> {
        let mut file = File::open(&self.path)?;
        file.seek(SeekFrom::Start(offset))?;
        Ok(Box::new(file))
    }

    fn size(&self) -> u64 {
        self.size
    }
}

/// Progress through the bytes of all files, pass by pass, on standard error when it is a terminal.
struct Bar(Option<indicatif::ProgressBar>);

impl Bar {
    fn new(quiet: bool, total: u64) -> Bar {
        if quiet || !std::io::stderr().is_terminal() {
            return Bar(None);
        }
        let bar = indicatif::ProgressBar::new(total);
        if let Ok(style) = indicatif::ProgressStyle::with_template("{msg:>12} [{bar:40}] {bytes}/{total_bytes}") {
            bar.set_style(style.progress_chars("=> "));
        }
        Bar(Some(bar))
    }

    fn phase(&self, name: &str) {
        if let Some(bar) = &self.0 {
            bar.set_message(name.to_string());
            bar.set_position(0);
        }
    }

    fn at(&self, bytes: u64) {
        if let Some(bar) = &self.0 {
            bar.set_position(bytes);
        }
    }

    fn finish(&self) {
        if let Some(bar) = &self.0 {
            bar.finish_and_clear();
        }
    }
}
