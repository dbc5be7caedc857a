//! Errors and warnings as data: a message, the byte range it is about, what was expected there, a
//! hint and notes.
//!
//! The command line renders a [`Diagnostic`] in the GNU `FILE:LINE:COL: error: message` form
//! (GNU Coding Standards, "Formatting Error Messages") followed by the offending line and a caret;
//! the page underlines the same range. A model's errors travel together as [`Diagnostics`].
//! Nothing here prints.

use serde::Serialize;
use std::fmt::Write as _;

/// A half-open byte range `start..end` into the model text.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq, Hash, Serialize)]
pub struct Span {
    pub start: usize,
    pub end: usize,
}

impl Span {
    pub fn new(start: usize, end: usize) -> Self {
        Span { start, end }
    }

    /// The smallest span covering both.
    pub fn to(self, other: Span) -> Span {
        Span::new(self.start.min(other.start), self.end.max(other.end))
    }
}

/// A 1-based line and column; columns count characters, not bytes.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize)]
pub struct Position {
    pub line: usize,
    pub column: usize,
}

impl Position {
    /// The position of byte `offset` in `source` (clamped to the text, and to a character boundary).
    pub fn of(source: &str, offset: usize) -> Position {
        let mut offset = offset.min(source.len());
        while !source.is_char_boundary(offset) {
            offset -= 1;
        }
        let before = &source[..offset];
        let line_start = before.rfind('\n').map_or(0, |i| i + 1);
        Position { line: before.matches('\n').count() + 1, column: before[line_start..].chars().count() + 1 }
    }
}

/// Longest stretch of a line that [`Diagnostic::render`] shows; longer lines are cut around the
/// caret, so an error in a megabyte-long line of data prints a few lines, not the megabyte.
const SHOWN_CHARS: usize = 160;

/// Whether a diagnostic stops the model from being used.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum Severity {
    Error,
    /// The model can be used, but something in it is probably not what was meant.
    Warning,
}

impl Severity {
    fn label(self) -> &'static str {
        match self {
            Severity::Error => "error",
            Severity::Warning => "warning",
        }
    }
}

/// One problem with a model: what went wrong, where, and what would have been right.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct Diagnostic {
    pub severity: Severity,
    pub message: String,
    pub span: Span,
    /// What the reader of the model should have written here, e.g. "an expression".
    pub expected: Option<String>,
    /// A hint such as "did you mean `sigma`?".
    pub help: Option<String>,
    /// Further lines of explanation, e.g. the two ways to write what an ambiguous form could mean.
    pub notes: Vec<String>,
}

impl Diagnostic {
    /// An error.
    pub fn new(message: impl Into<String>, span: Span) -> Self {
        Diagnostic {
            severity: Severity::Error,
            message: message.into(),
            span,
            expected: None,
            help: None,
            notes: vec![],
        }
    }

    /// A warning: the model is usable as written.
    pub fn warning(message: impl Into<String>, span: Span) -> Self {
        Diagnostic { severity: Severity::Warning, ..Diagnostic::new(message, span) }
    }

    pub fn note(mut self, text: impl Into<String>) -> Self {
        self.notes.push(text.into());
        self
    }

    pub fn expected(mut self, what: impl Into<String>) -> Self {
        self.expected = Some(what.into());
        self
    }

    pub fn help(mut self, hint: impl Into<String>) -> Self {
        self.help = Some(hint.into());
        self
    }

    /// Where the problem starts.
    pub fn position(&self, source: &str) -> Position {
        Position::of(source, self.span.start)
    }

    /// `FILE:LINE:COL: error: message` (or `warning:`), the offending line, a caret under the
    /// span, then the expectation, the hint and the notes, each on a line of its own.
    pub fn render(&self, file: &str, source: &str) -> String {
        let at = self.position(source);
        let mut out = format!("{file}:{}:{}: {}: {}\n", at.line, at.column, self.severity.label(), self.message);
        let line: Vec<char> = source.lines().nth(at.line - 1).unwrap_or("").chars().collect();
        let gutter = at.line.to_string();
        let pad = " ".repeat(gutter.len());
        // A long line (a list of data on one line, say) is cut to a stretch around the caret.
        let caret = (at.column - 1).min(line.len());
        let (from, to) = if line.len() <= SHOWN_CHARS {
            (0, line.len())
        } else {
            let from = caret.saturating_sub(SHOWN_CHARS / 3).min(line.len() - SHOWN_CHARS);
            (from, from + SHOWN_CHARS)
        };
        let mut shown: String = line[from..to].iter().collect();
        let mut lead: String = line[from..caret].iter().map(|&c| if c == '\t' { '\t' } else { ' ' }).collect();
        if from > 0 {
            shown.insert(0, '…');
            lead.insert(0, ' ');
        }
        if to < line.len() {
            shown.push('…');
        }
        // Width of the caret: the span's characters on this line, at least one, within what is shown.
        let span_text = source.get(self.span.start..self.span.end.min(source.len())).unwrap_or("");
        let width = span_text.lines().next().map_or(0, |s| s.chars().count()).min(to - caret).max(1);
        let _ = writeln!(out, "{pad} |");
        let _ = writeln!(out, "{gutter} | {shown}");
        let _ = writeln!(out, "{pad} | {lead}{}", "^".repeat(width));
        if let Some(expected) = &self.expected {
            let _ = writeln!(out, "{pad} = expected {expected}");
        }
        if let Some(help) = &self.help {
            let _ = writeln!(out, "{pad} = help: {help}");
        }
        for note in &self.notes {
            let _ = writeln!(out, "{pad} = note: {note}");
        }
        out
    }
}

/// A diagnostic placed in its text for a reader that is not a terminal: the `mixwell check --json`
/// output and the page's editor. `start` and `end` are offsets in whatever unit the reader counts
/// (bytes for JSON files, UTF-16 code units for the page); `from` and `to` are 1-based lines and
/// character columns, as the command line prints them.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct Placed {
    pub severity: Severity,
    pub message: String,
    pub expected: Option<String>,
    pub help: Option<String>,
    pub notes: Vec<String>,
    pub from: Position,
    pub to: Position,
    pub start: usize,
    pub end: usize,
}

impl Diagnostic {
    /// Placed in `source`, offsets counted by `offset` from a byte offset.
    pub fn place(&self, source: &str, offset: impl Fn(usize) -> usize) -> Placed {
        let end = self.span.end.max(self.span.start);
        Placed {
            severity: self.severity,
            message: self.message.clone(),
            expected: self.expected.clone(),
            help: self.help.clone(),
            notes: self.notes.clone(),
            from: Position::of(source, self.span.start),
            to: Position::of(source, end),
            start: offset(self.span.start.min(source.len())),
            end: offset(end.min(source.len())),
        }
    }
}

/// At most this many errors are reported for one model; the rest are counted, not shown.
pub const MAX_ERRORS: usize = 50;

/// The errors of one model, in the order of their positions, with a count of those beyond
/// [`MAX_ERRORS`] that were left out.
#[derive(Clone, Debug, PartialEq)]
pub struct Diagnostics {
    errors: Vec<Diagnostic>,
    more: usize,
}

impl Diagnostics {
    /// At least one error; sorted by position, the first [`MAX_ERRORS`] kept.
    pub fn new(mut errors: Vec<Diagnostic>) -> Self {
        debug_assert!(!errors.is_empty());
        // Stable: two errors at one place keep the order in which they were found.
        errors.sort_by_key(|d| d.span.start);
        let more = errors.len().saturating_sub(MAX_ERRORS);
        errors.truncate(MAX_ERRORS);
        Diagnostics { errors, more }
    }

    /// The first error in the text.
    pub fn first(&self) -> &Diagnostic {
        &self.errors[0]
    }

    pub fn iter(&self) -> impl Iterator<Item = &Diagnostic> {
        self.errors.iter()
    }

    /// Errors found beyond those kept.
    pub fn more(&self) -> usize {
        self.more
    }

    /// Every error rendered as [`Diagnostic::render`] does, separated by blank lines, and a last
    /// line counting those left out.
    pub fn render(&self, file: &str, source: &str) -> String {
        let mut out = self.errors.iter().map(|d| d.render(file, source)).collect::<Vec<_>>().join("\n");
        if self.more > 0 {
            let _ = writeln!(
                out,
                "\n{file}: {} more error{} not shown (at most {MAX_ERRORS} are listed); fix these first",
                self.more,
                if self.more == 1 { "" } else { "s" }
            );
        }
        out
    }
}

impl From<Diagnostic> for Diagnostics {
    fn from(d: Diagnostic) -> Self {
        Diagnostics::new(vec![d])
    }
}

/// Names longer than this get no suggestion: nobody mistypes one, and the edit distance takes
/// time and memory in proportion to the product of the two lengths.
const MAX_SUGGESTED_CHARS: usize = 64;

/// The closest of `candidates` to `name` by edit distance, if close enough to be a likely typo.
pub fn did_you_mean<'a>(name: &str, candidates: impl IntoIterator<Item = &'a str>) -> Option<&'a str> {
    let chars = name.chars().count();
    if chars > MAX_SUGGESTED_CHARS {
        return None;
    }
    let limit = (chars / 3).max(1);
    candidates
        .into_iter()
        // Lengths further apart than the limit are further apart in edit distance too.
        .filter(|c| c.len() <= 4 * (chars + limit) && c.chars().count().abs_diff(chars) <= limit)
        .map(|c| (edit_distance(name, c), c))
        .filter(|&(d, _)| d <= limit)
        // Ties go to the alphabetically first, so the hint does not depend on hash order.
        .min()
        .map(|(_, c)| c)
}

/// Edit distance over characters in which swapping two neighbours counts as one edit
/// (optimal string alignment), so `sigam` is one edit from `sigma`.
fn edit_distance(a: &str, b: &str) -> usize {
    let (a, b): (Vec<char>, Vec<char>) = (a.chars().collect(), b.chars().collect());
    let mut d = vec![vec![0usize; b.len() + 1]; a.len() + 1];
    for (i, row) in d.iter_mut().enumerate() {
        row[0] = i;
    }
    for (j, cell) in d[0].iter_mut().enumerate() {
        *cell = j;
    }
    for i in 1..=a.len() {
        for j in 1..=b.len() {
            let cost = usize::from(a[i - 1] != b[j - 1]);
            d[i][j] = (d[i - 1][j] + 1).min(d[i][j - 1] + 1).min(d[i - 1][j - 1] + cost);
            if i > 1 && j > 1 && a[i - 1] == b[j - 2] && a[i - 2] == b[j - 1] {
                d[i][j] = d[i][j].min(d[i - 2][j - 2] + 1);
            }
        }
    }
    d[a.len()][b.len()]
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn positions_count_lines_and_characters() {
        let src = "a = 1\nbé = 2\n";
        assert_eq!(Position::of(src, 0), Position { line: 1, column: 1 });
        assert_eq!(Position::of(src, 6), Position { line: 2, column: 1 });
        // 'é' is two bytes but one column.
        assert_eq!(Position::of(src, 9), Position { line: 2, column: 3 });
        assert_eq!(Position::of(src, 999), Position { line: 3, column: 1 });
    }

    #[test]
    fn render_points_at_the_span() {
        let src = "mu : real\nsigma : positve\n";
        let d = Diagnostic::new("unknown support `positve`", Span::new(18, 25))
            .expected("a support such as `real` or `positive`")
            .help("did you mean `positive`?");
        assert_eq!(
            d.render("m.mw", src),
            "m.mw:2:9: error: unknown support `positve`\n  |\n2 | sigma : positve\n  |         ^^^^^^^\n  = expected a support such as `real` or `positive`\n  = help: did you mean `positive`?\n"
        );
    }

    #[test]
    fn render_cuts_long_lines_around_the_caret() {
        let src = format!("x = [{}, oops, {}]\n", "1, ".repeat(1000), "2, ".repeat(1000));
        let at = src.find("oops").expect("in the text");
        let text = Diagnostic::new("unknown name `oops`", Span::new(at, at + 4)).render("m.mw", &src);
        let lines: Vec<&str> = text.lines().collect();
        assert!(lines[2].starts_with("1 | …") && lines[2].ends_with('…') && lines[2].contains("oops"), "{text}");
        assert!(lines[2].chars().count() < SHOWN_CHARS + 10);
        // The caret stays under the name.
        let caret = lines[3].chars().position(|c| c == '^').expect("a caret");
        assert_eq!(lines[2].chars().skip(caret).take(4).collect::<String>(), "oops");
        assert_eq!(lines[3].matches('^').count(), 4);
    }

    #[test]
    fn suggestions_are_close_names_only() {
        let names = ["sigma", "mu", "theta"];
        assert_eq!(did_you_mean("sigam", names), Some("sigma"));
        assert_eq!(did_you_mean("tehta", names), Some("theta"));
        assert_eq!(did_you_mean("zzz", names), None);
    }
}
