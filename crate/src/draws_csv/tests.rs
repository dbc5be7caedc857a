//! The reader on small files: layouts, chain order, positions of problems, cutting to the
//! shortest, and reading in blocks. The table of malformed files is in tests/cli/diagnose.rs.

use super::*;

fn files<'a>(named: &'a [(&'a str, &'a str)]) -> Vec<InMemory<'a>> {
    named.iter().map(|(name, text)| InMemory { name: (*name).into(), bytes: text.as_bytes() }).collect()
}

fn scanned(named: &[(&str, &str)], options: Options) -> Result<(Scan, Columns), ReadError> {
    let sources = files(named);
    let sources: Vec<&dyn Source> = sources.iter().map(|s| s as &dyn Source).collect();
    let scan = scan(&sources, &options, &mut |_| {})?;
    let columns = scan.read(&sources, 0..scan.quantities.len(), &mut |_| {})?;
    Ok((scan, columns))
}

fn error(named: &[(&str, &str)], options: Options) -> String {
    scanned(named, options).expect_err("refused").to_string()
}

#[test]
fn the_runs_own_layout_gives_chains_in_order_without_bookkeeping_columns() {
    let text = "chain,iteration,mu,\"m[1,2]\"\n1,1,0.5,1\n1,2,0.25,2\n2,1,-1,3\n2,2,1e-3,4\n";
    let (scan, columns) = scanned(&[("run.csv", text)], Options::default()).unwrap();
    assert_eq!(scan.layout, Layout::ChainColumn);
    assert_eq!(scan.quantities, ["mu", "m[1,2]"]);
    assert_eq!((scan.chains.len(), scan.draws), (2, 2));
    assert_eq!(columns[0], vec![vec![0.5, 0.25], vec![-1.0, 0.001]]);
    assert_eq!(columns[1], vec![vec![1.0, 2.0], vec![3.0, 4.0]]);
}

#[test]
fn numbered_chains_are_ordered_by_number_and_others_by_appearance() {
    let parts = [("b.csv", "chain,x\n10,1\n10,2\n"), ("a.csv", "chain,x\n2,3\n2,4\n")];
    let (scan, columns) = scanned(&parts, Options::default()).unwrap();
    let labels: Vec<_> = scan.chains.iter().map(|c| c.label.clone().unwrap()).collect();
    assert_eq!(labels, ["2", "10"]);
    assert_eq!(columns[0], vec![vec![3.0, 4.0], vec![1.0, 2.0]]);
    let (scan, columns) = scanned(&[("n.csv", "chain,x\nb,1\na,2\nb,3\na,4\n")], Options::default()).unwrap();
    let labels: Vec<_> = scan.chains.iter().map(|c| c.label.clone().unwrap()).collect();
    assert_eq!(labels, ["b", "a"], "interleaved rows, chains in order of appearance");
    assert_eq!(columns[0], vec![vec![1.0, 3.0], vec![2.0, 4.0]]);
}

#[test]
fn files_without_a_chain_column_are_one_chain_each() {
    let parts = [("one.csv", "x,y\n1,2\n3,4\n"), ("two.csv", "y,x\n20,10\n40,30\n")];
    let (scan, columns) = scanned(&parts, Options::default()).unwrap();
    assert_eq!(scan.layout, Layout::FilePerChain);
    assert_eq!(columns[0], vec![vec![1.0, 3.0], vec![10.0, 30.0]], "columns are matched by name");
    assert_eq!(columns[1], vec![vec![2.0, 4.0], vec![20.0, 40.0]]);
    let forced = Options { layout: Some(Layout::FilePerChain), truncate: false };
    let (scan, _) = scanned(&[("c.csv", "chain,x\n1,2\n1,3\n")], forced).unwrap();
    assert_eq!(scan.quantities, ["chain", "x"], "with the layout given, `chain` is a quantity");
}

#[test]
fn bom_crlf_quotes_spaces_comments_and_blank_lines_are_read() {
    let text = "\u{feff}# made by hand\r\nchain, x ,\"y\"\r\n\r\n1, 1.5 ,\"2\"\r\n1,2,3\r\n";
    let (scan, columns) = scanned(&[("w.csv", text)], Options::default()).unwrap();
    assert_eq!(scan.quantities, ["x", "y"]);
    assert_eq!(columns, vec![vec![vec![1.5, 2.0]], vec![vec![2.0, 3.0]]]);
    let bad = "\u{feff}chain,x\r\n1,2\r\n1,oops\r\n";
    assert_eq!(error(&[("w.csv", bad)], Options::default()), "w.csv:3:3: error: `oops` is not a number (column `x`)");
}

#[test]
fn unequal_chains_are_refused_or_cut_to_the_shortest() {
    let text = "chain,x\n1,1\n1,2\n1,3\n2,4\n2,5\n";
    let refused = scanned(&[("u.csv", text)], Options::default()).unwrap_err();
    assert!(refused.truncating_helps);
    assert!(
        refused.to_string().starts_with("u.csv:6:1: error: chain `2` of u.csv ends here after 2 draws, but chain `1`"),
        "{refused}"
    );
    let (scan, columns) = scanned(&[("u.csv", text)], Options { layout: None, truncate: true }).unwrap();
    assert_eq!(scan.draws, 2);
    assert_eq!(columns[0], vec![vec![1.0, 2.0], vec![4.0, 5.0]]);
    assert!(scan.notes[0].contains("truncated to its first 2"), "{:?}", scan.notes);
    assert_eq!(scan.report().chain_sources[0].draws, 3, "the report says how many draws the file had");
}

#[test]
fn blocks_fit_the_budget_and_reading_in_blocks_gives_the_same_draws() {
    let mut text = String::from("chain,a,b,c,d,e\n");
    for i in 0..40 {
        text += &format!("{},{i},{},{},{},{}\n", i % 2 + 1, i * 2, i * 3, -i, i as f64 / 7.0);
    }
    let named = [("blocks.csv", text.as_str())];
    let sources = files(&named);
    let sources: Vec<&dyn Source> = sources.iter().map(|s| s as &dyn Source).collect();
    let scan = scan(&sources, &Options::default(), &mut |_| {}).unwrap();
    let one = scan.quantity_bytes();
    assert_eq!(one, 8 * 40);
    assert_eq!(scan.blocks(u64::MAX).unwrap(), vec![0..5]);
    assert_eq!(scan.blocks((WORKING_COPIES + 2) * one).unwrap(), vec![0..2, 2..4, 4..5]);
    assert!(scan.blocks(WORKING_COPIES * one).unwrap_err().contains("more than the"));
    let whole = scan.read(&sources, 0..5, &mut |_| {}).unwrap();
    let mut pieces = Vec::new();
    for block in scan.blocks((WORKING_COPIES + 1) * one).unwrap() {
        pieces.extend(scan.read(&sources, block, &mut |_| {}).unwrap());
    }
    assert_eq!(pieces, whole);
}

#[test]
fn progress_reaches_the_total() {
    let sources = files(&[("p.csv", "x\n1\n2\n3\n4\n")]);
    let sources: Vec<&dyn Source> = sources.iter().map(|s| s as &dyn Source).collect();
    let mut last = 0;
    scan(&sources, &Options::default(), &mut |bytes| last = bytes).unwrap();
    assert_eq!(last, 10);
}

#[test]
fn a_file_without_line_breaks_is_refused_before_it_is_held_whole() {
    let text = format!("x\n{}", "1".repeat(MAX_LINE_BYTES + 10));
    let message = error(&[("long.csv", &text)], Options::default());
    assert!(message.starts_with("long.csv: error: cannot read the file: a line is longer than 64 MiB"), "{message}");
}
