//! Turns model text into tokens. The lexer cannot fail: a character it does not know becomes an
//! [`TokenKind::Unknown`] token and the parser reports it with its position.

/// What a token is; its text is `source[start..start + len]`.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum TokenKind {
    Ident,
    Number,
    Plus,
    Minus,
    Star,
    Slash,
    Caret,
    LParen,
    RParen,
    LBracket,
    RBracket,
    /// `{` and `}` are not part of the language, but they nest like brackets so that a braced
    /// block written from habit is one statement and gets one error.
    LBrace,
    RBrace,
    Comma,
    Semicolon,
    Colon,
    Equals,
    /// The end of a statement: a line break outside brackets and not after an operator.
    Newline,
    Unknown,
    Eof,
}

#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct Token {
    pub kind: TokenKind,
    pub start: usize,
    pub len: usize,
}

impl Token {
    pub fn end(&self) -> usize {
        self.start + self.len
    }
}

/// All significant tokens of `source`, ending with [`TokenKind::Eof`].
///
/// Comments and spaces are dropped. A line break becomes a [`TokenKind::Newline`] only where it can
/// end a statement: outside brackets, and not right after something that needs a right-hand side
/// (an operator, `=`, `:`, `,`, `;`), and not right before a line that starts with an operator
/// (`+ - * / ^`), which no statement can. That is the whole of the line-continuation rule.
///
/// One exception lets errors be found past a bracket left open or a dangling operator: a line
/// that can only begin a statement (`NAME =`, `report NAME =` or `NAME : WORD` — no expression
/// contains `=`) ends the statement before it, even inside brackets or after an operator.
pub fn tokenize(source: &str) -> Vec<Token> {
    let mut tokens = Vec::new();
    let mut depth = 0usize;
    // Braces are counted apart: inside a braced block (another language's), nothing is reset.
    let mut braces = 0usize;
    let mut chars = source.char_indices().peekable();
    while let Some((start, c)) = chars.next() {
        let single = |kind| Token { kind, start, len: c.len_utf8() };
        let token = match c {
            '\n' => {
                let continues = tokens.last().is_none_or(|t: &Token| {
                    use TokenKind::*;
                    matches!(t.kind, Plus | Minus | Star | Slash | Caret | Comma | Semicolon | Colon | Equals | Newline)
                });
                let blank = tokens.last().is_none_or(|t: &Token| t.kind == TokenKind::Newline);
                if depth > 0 || continues {
                    if blank || braces > 0 || !starts_statement(&source[start + 1..]) {
                        continue;
                    }
                    depth = 0;
                }
                single(TokenKind::Newline)
            }
            c if c.is_whitespace() => continue,
            '#' => {
                while chars.next_if(|&(_, c)| c != '\n').is_some() {}
                continue;
            }
            '+' => single(TokenKind::Plus),
            '-' => single(TokenKind::Minus),
            '*' => single(TokenKind::Star),
            '/' => single(TokenKind::Slash),
            '^' => single(TokenKind::Caret),
            ',' => single(TokenKind::Comma),
            ';' => single(TokenKind::Semicolon),
            ':' => single(TokenKind::Colon),
            '=' => single(TokenKind::Equals),
            '(' | '[' | '{' => {
                depth += 1;
                braces += usize::from(c == '{');
                single(match c {
                    '(' => TokenKind::LParen,
                    '[' => TokenKind::LBracket,
                    _ => TokenKind::LBrace,
                })
            }
            ')' | ']' | '}' => {
                depth = depth.saturating_sub(1);
                braces = braces.saturating_sub(usize::from(c == '}'));
                single(match c {
                    ')' => TokenKind::RParen,
                    ']' => TokenKind::RBracket,
                    _ => TokenKind::RBrace,
                })
            }
            c if c.is_ascii_alphabetic() || c == '_' => {
                let mut end = start + 1;
                while let Some((i, _)) = chars.next_if(|&(_, c)| c.is_ascii_alphanumeric() || c == '_') {
                    end = i + 1;
                }
                Token { kind: TokenKind::Ident, start, len: end - start }
            }
            c if c.is_ascii_digit() || (c == '.' && chars.peek().is_some_and(|&(_, d)| d.is_ascii_digit())) => {
                Token { kind: TokenKind::Number, start, len: number_len(&source[start..]) }
            }
            _ => single(TokenKind::Unknown),
        };
        // Numbers may span several chars: skip what the token consumed beyond this char.
        while chars.next_if(|&(i, _)| i < token.end()).is_some() {}
        tokens.push(token);
    }
    tokens.push(Token { kind: TokenKind::Eof, start: source.len(), len: 0 });
    let operator = |t: &Token| {
        use TokenKind::*;
        matches!(t.kind, Plus | Minus | Star | Slash | Caret)
    };
    let continued: Vec<bool> =
        tokens.windows(2).map(|w| w[0].kind == TokenKind::Newline && operator(&w[1])).chain([false]).collect();
    tokens.into_iter().zip(continued).filter(|(_, skip)| !skip).map(|(t, _)| t).collect()
}

/// The support words, after which `NAME :` is a declaration.
pub const SUPPORT_WORDS: &[&str] = &["real", "positive", "unit", "between", "above", "below"];

/// Whether `line` (the text after a line break) can only be the start of a statement:
/// `NAME =` (not `==`), `report NAME =`, or `NAME : WORD`.
fn starts_statement(line: &str) -> bool {
    let word = |text: &str| -> Option<(usize, usize)> {
        let text_start = text.len() - text.trim_start_matches([' ', '\t']).len();
        let rest = &text[text_start..];
        let first = rest.chars().next()?;
        if !(first.is_ascii_alphabetic() || first == '_') {
            return None;
        }
        let len = rest.find(|c: char| !(c.is_ascii_alphanumeric() || c == '_')).unwrap_or(rest.len());
        Some((text_start, len))
    };
    let Some((at, len)) = word(line) else { return false };
    let mut rest = line[at + len..].trim_start_matches([' ', '\t']);
    if &line[at..at + len] == "report"
        && let Some((next_at, next_len)) = word(rest)
    {
        rest = rest[next_at + next_len..].trim_start_matches([' ', '\t']);
    }
    if let Some(after) = rest.strip_prefix('=') {
        return !after.starts_with('=');
    }
    // `NAME : WORD`: a declaration, even of a misspelt support (a range split over lines would
    // begin with `:` or a number, not with a name and a colon).
    rest.strip_prefix(':').and_then(word).is_some()
}

/// Length of the number at the start of `text`: digits, an optional fraction, an optional exponent.
fn number_len(text: &str) -> usize {
    let bytes = text.as_bytes();
    let digits = |mut i: usize| {
        while i < bytes.len() && bytes[i].is_ascii_digit() {
            i += 1;
        }
        i
    };
    let mut end = digits(0);
    if end < bytes.len() && bytes[end] == b'.' {
        end = digits(end + 1);
    }
    if end < bytes.len() && matches!(bytes[end], b'e' | b'E') {
        let sign = usize::from(matches!(bytes.get(end + 1), Some(b'+' | b'-')));
        let exp_end = digits(end + 1 + sign);
        if exp_end > end + 1 + sign {
            end = exp_end;
        }
    }
    end
}

#[cfg(test)]
mod tests {
    use super::*;
    use TokenKind::*;

    fn kinds(src: &str) -> Vec<TokenKind> {
        tokenize(src).iter().map(|t| t.kind).collect()
    }

    fn texts(src: &str) -> Vec<&str> {
        tokenize(src).iter().map(|t| &src[t.start..t.end()]).collect()
    }

    #[test]
    fn numbers_take_fractions_and_exponents() {
        assert_eq!(texts("1 2.5 .5 1e-3 4E+2 7e x"), ["1", "2.5", ".5", "1e-3", "4E+2", "7", "e", "x", ""]);
    }

    #[test]
    fn comments_and_spaces_vanish() {
        assert_eq!(kinds("a = 1 # note\nb"), [Ident, Equals, Number, Newline, Ident, Eof]);
    }

    #[test]
    fn line_breaks_inside_brackets_or_after_operators_continue_the_statement() {
        assert_eq!(
            kinds("x = [1,\n 2]\ny"),
            [Ident, Equals, LBracket, Number, Comma, Number, RBracket, Newline, Ident, Eof]
        );
        assert_eq!(kinds("d = a *\n b\n\n\nc"), [Ident, Equals, Ident, Star, Ident, Newline, Ident, Eof]);
        assert_eq!(kinds("d = a\n  # note\n  * b\nc"), [Ident, Equals, Ident, Star, Ident, Newline, Ident, Eof]);
    }

    #[test]
    fn a_statement_line_ends_an_unclosed_bracket() {
        assert_eq!(
            kinds("x = (1 +\ny = 2\nz = [1,\n  2]"),
            [Ident, Equals, LParen, Number, Plus, Newline, Ident, Equals, Number, Newline, Ident, Equals, LBracket]
                .into_iter()
                .chain([Number, Comma, Number, RBracket, Eof])
                .collect::<Vec<_>>()
        );
        assert_eq!(kinds("d = f(a,\n  sigma : positive\n")[6..], [Newline, Ident, Colon, Ident, Newline, Eof]);
        // So does one after a dangling operator; blank lines still collapse into one break.
        assert_eq!(kinds("a = b +\nc = 3"), [Ident, Equals, Ident, Plus, Newline, Ident, Equals, Number, Eof]);
        assert_eq!(kinds("a = b\n\n\nc = 3"), [Ident, Equals, Ident, Newline, Ident, Equals, Number, Eof]);
        // A range or a comparison on the next line is not a statement.
        assert_eq!(kinds("v = y[1\n  : n]\nw = (a\n == b)").iter().filter(|k| **k == Newline).count(), 1);
    }

    #[test]
    fn unknown_characters_become_tokens() {
        assert_eq!(kinds("a $ é"), [Ident, Unknown, Unknown, Eof]);
        assert_eq!(tokenize("é")[0].len, 2);
    }
}
