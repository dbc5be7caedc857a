//! The exact place of a cell, for a message. The CSV reader gives each row's line and byte
//! offset but unquoted, trimmed cells; to name a cell's column, the row is read again from its
//! offset by `csv_core`, which says how many raw bytes each field took (quotes, spaces and all).
//! Only errors pay for this.

use super::Source;
use csv_core::ReadFieldResult;
use std::io::Read;

/// Bytes of a row read again to place a cell; a cell beyond them is placed at the end of them.
const ROW_LIMIT: u64 = 1 << 20;

const BOM: &[u8] = b"\xef\xbb\xbf";

/// The 1-based line and column (in characters) where field `field` (0-based) of the row that
/// starts at byte `offset` on line `line` begins; for a field past the row's last one, the column
/// just after the row's end, where the missing cell would be.
pub(super) fn place(source: &dyn Source, line: u64, offset: u64, field: usize) -> (u64, u64) {
    let mut raw = Vec::new();
    if source.open(offset).and_then(|r| r.take(ROW_LIMIT).read_to_end(&mut raw)).is_err() {
        return (line, 1);
    }
    // The byte-order mark is not a character the user sees.
    let skip = if offset == 0 && raw.starts_with(BOM) { BOM.len() } else { 0 };
    let start = field_start(&raw, field).max(skip);
    let before = &raw[skip..start];
    let newlines = before.iter().filter(|&&b| b == b'\n').count() as u64;
    let line_start = before.iter().rposition(|&b| b == b'\n').map_or(0, |i| i + 1);
    let characters = before[line_start..].iter().filter(|&&b| b & 0xC0 != 0x80).count() as u64;
    (line + newlines, characters + 1)
}

/// The raw offset where field `field` starts, or the end of the row (before its line end) for a
/// field past the last.
fn field_start(raw: &[u8], field: usize) -> usize {
    // The same quoting rules as the reader (RFC 4180: `"` quotes, `""` inside quotes is a quote).
    let mut core = csv_core::Reader::new();
    let mut scratch = [0u8; 4096];
    let (mut pos, mut index, mut start) = (0, 0, 0);
    while index < field {
        let input = &raw[pos..];
        let (result, consumed, _) = core.read_field(input, &mut scratch);
        pos += consumed;
        match result {
            ReadFieldResult::OutputFull => {}
            ReadFieldResult::InputEmpty if !input.is_empty() => {}
            ReadFieldResult::Field { record_end: false } => {
                index += 1;
                start = pos;
            }
            ReadFieldResult::Field { record_end: true } | ReadFieldResult::InputEmpty | ReadFieldResult::End => {
                let mut end = pos.max(start);
                while end > start && matches!(raw[end - 1], b'\n' | b'\r') {
                    end -= 1;
                }
                return end;
            }
        }
    }
    start
}

#[cfg(test)]
mod tests {
    use super::super::InMemory;
    use super::place;

    fn at(text: &str, line: u64, offset: u64, field: usize) -> (u64, u64) {
        place(&InMemory { name: "t.csv".into(), bytes: text.as_bytes() }, line, offset, field)
    }

    #[test]
    fn fields_are_placed_in_characters_past_quotes_and_spaces() {
        let text = "a,b,c\n1,\"x,y\",é, 3\n";
        assert_eq!(at(text, 1, 0, 2), (1, 5));
        assert_eq!(at(text, 2, 6, 0), (2, 1));
        assert_eq!(at(text, 2, 6, 1), (2, 3));
        assert_eq!(at(text, 2, 6, 2), (2, 9));
        assert_eq!(at(text, 2, 6, 3), (2, 11), "characters, not bytes");
        assert_eq!(at(text, 2, 6, 4), (2, 13), "past the last field: just after the row");
    }

    #[test]
    fn a_bom_crlf_and_newlines_inside_quotes_are_counted_right() {
        let text = "\u{feff}a,b\r\n1,2\r\n";
        assert_eq!(at(text, 1, 0, 1), (1, 3));
        assert_eq!(at(text, 2, 8, 2), (2, 4));
        let text = "\"a\nb\",c,d\n";
        assert_eq!(at(text, 1, 0, 1), (2, 4));
        assert_eq!(at(text, 1, 0, 5), (2, 7));
    }
}
