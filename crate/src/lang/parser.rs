//! A Pratt parser from tokens to the syntax tree. Precedence lives in [`binding_power`].
//!
//! A syntax error ends the statement it is in: the parser records it and starts again at the next
//! statement, so one pass reports every statement's first problem ([`parse_all`]).

use super::ast::*;
use super::diagnostic::{Diagnostic, Diagnostics, MAX_ERRORS, Span};
use super::lexer::{SUPPORT_WORDS, Token, TokenKind, tokenize};

/// Deepest nesting of expressions accepted; deeper input is refused rather than risking the stack.
pub const MAX_NESTING: usize = 128;
/// Largest model text accepted, in bytes.
pub const MAX_SOURCE_BYTES: usize = 4 << 20;

/// What parsing found: the statements that parsed, the errors of those that did not, and the
/// names of the statements that failed after their name was read (so that checking can treat
/// those names as defined but unusable, instead of reporting each use as unknown).
#[derive(Clone, Debug, Default)]
pub struct Parsed {
    pub program: Program,
    pub errors: Vec<Diagnostic>,
    pub broken: Vec<Ident>,
}

/// Parse a whole model; every statement's first syntax error if any fails.
pub fn parse(source: &str) -> Result<Program, Diagnostics> {
    let parsed = parse_all(source);
    if parsed.errors.is_empty() { Ok(parsed.program) } else { Err(Diagnostics::new(parsed.errors)) }
}

/// Parse a whole model, recovering at each statement that fails.
pub fn parse_all(source: &str) -> Parsed {
    let mut parsed = Parsed::default();
    if source.len() > MAX_SOURCE_BYTES {
        parsed.errors.push(Diagnostic::new(
            format!("the model text is {} bytes, more than the limit of {MAX_SOURCE_BYTES}", source.len()),
            Span::new(MAX_SOURCE_BYTES, MAX_SOURCE_BYTES),
        ));
        return parsed;
    }
    let mut parser = Parser { source, tokens: tokenize(source), pos: 0, depth: 0, name: None };
    loop {
        parser.eat(TokenKind::Newline);
        if parser.peek().kind == TokenKind::Eof {
            return parsed;
        }
        parser.name = None;
        parser.depth = 0;
        match parser.statement() {
            Ok(statement) => parsed.program.statements.push(statement),
            Err(d) => {
                parsed.errors.push(d);
                parsed.broken.extend(parser.name.take());
                // Errors past the cap would not be shown; stop looking.
                if parsed.errors.len() > MAX_ERRORS {
                    return parsed;
                }
                while !matches!(parser.peek().kind, TokenKind::Newline | TokenKind::Eof) {
                    parser.bump();
                }
            }
        }
    }
}

struct Parser<'s> {
    source: &'s str,
    tokens: Vec<Token>,
    pos: usize,
    depth: usize,
    /// The name of the statement being parsed, once it is known.
    name: Option<Ident>,
}

/// Left and right binding power of an infix operator; higher binds tighter. `^` is right-associative.
fn binding_power(kind: TokenKind) -> Option<(BinOp, u8, u8)> {
    Some(match kind {
        TokenKind::Plus => (BinOp::Add, 10, 11),
        TokenKind::Minus => (BinOp::Sub, 10, 11),
        TokenKind::Star => (BinOp::Mul, 20, 21),
        TokenKind::Slash => (BinOp::Div, 20, 21),
        TokenKind::Caret => (BinOp::Pow, 41, 40),
        _ => return None,
    })
}

/// `:` of a range binds loosest of all and does not chain: `1:n - 1` is `1:(n - 1)`.
const RANGE: u8 = 2;
/// Unary minus binds tighter than `*` and looser than `^`: `-x^2` is `-(x^2)`.
const PREFIX_MINUS: u8 = 30;
/// Indexing binds tightest of all.
const POSTFIX_INDEX: u8 = 50;

fn comparisons() -> &'static str {
    "the language has no comparisons or `if`: a choice that depends on data can be written with data \
     of 0s and 1s, `w * a + (1 - w) * b`; a discrete parameter is summed out over its values, \
     `sum(… for k in 1:K)`"
}

/// Words that begin statements in other languages, and what to write here instead.
fn foreign_statement(word: &str) -> Option<(&'static str, &'static str)> {
    Some(match word {
        "for" | "while" | "foreach" | "loop" => (
            "loops are not statements in a model",
            "a product over an index goes inside the density, `prod(normal(y[i]; mu, sigma) for i in 1:n)`; \
             a list computed per index is `[… for i in 1:n]`; a sum over one is `sum(… for i in 1:n)`",
        ),
        "if" | "else" | "elif" | "when" | "switch" | "case" => (
            "the language has no `if`",
            "a choice that depends on data can be written with data of 0s and 1s, `w * a + (1 - w) * b`; \
             a discrete parameter is summed out over its values, `sum(… for k in 1:K)`",
        ),
        "def" | "function" | "fn" | "fun" | "lambda" | "return" => (
            "functions cannot be defined in a model",
            "give a repeated expression a name, `eta = a + b * x`, and use the name; for one value per \
             index, write `[… for i in 1:n]`",
        ),
        "let" | "var" | "const" | "data" | "parameter" | "param" | "local" => (
            "a statement starts with its name",
            "write `x = …` for data or an intermediate, `x : real` for a parameter",
        ),
        _ => return None,
    })
}

impl<'s> Parser<'s> {
    fn peek(&self) -> Token {
        self.tokens[self.pos]
    }

    fn peek_at(&self, ahead: usize) -> Token {
        self.tokens[(self.pos + ahead).min(self.tokens.len() - 1)]
    }

    fn text(&self, token: Token) -> &'s str {
        &self.source[token.start..token.end()]
    }

    fn span(token: Token) -> Span {
        Span::new(token.start, token.end())
    }

    fn bump(&mut self) -> Token {
        let token = self.peek();
        if token.kind != TokenKind::Eof {
            self.pos += 1;
        }
        token
    }

    fn eat(&mut self, kind: TokenKind) -> Option<Token> {
        (self.peek().kind == kind).then(|| self.bump())
    }

    /// The next token if it is the word `word`.
    fn eat_word(&mut self, word: &str) -> Option<Token> {
        (self.peek().kind == TokenKind::Ident && self.text(self.peek()) == word).then(|| self.bump())
    }

    fn expect(&mut self, kind: TokenKind, what: &str) -> Result<Token, Diagnostic> {
        self.eat(kind).ok_or_else(|| self.unexpected(what))
    }

    /// The bracket that closes `open`; when it is missing, the error says where `open` is.
    fn close(&mut self, kind: TokenKind, open: Token, what: &str) -> Result<Token, Diagnostic> {
        self.eat(kind).ok_or_else(|| {
            let at = super::Position::of(self.source, open.start);
            let d = self.unexpected(what);
            if matches!(self.peek().kind, TokenKind::Newline | TokenKind::Eof) {
                d.help(format!("the `{}` at line {}, column {} is not closed", self.text(open), at.line, at.column))
            } else {
                d
            }
        })
    }

    /// An error at the current token saying what was expected instead, with the language's
    /// alternative when the token belongs to another language's syntax.
    fn unexpected(&self, what: &str) -> Diagnostic {
        let token = self.peek();
        let found = match token.kind {
            TokenKind::Eof => "end of text".to_string(),
            TokenKind::Newline => "end of line".to_string(),
            TokenKind::Unknown => format!("the character `{}`, which is not part of the language", self.text(token)),
            _ => format!("`{}`", self.text(token)),
        };
        let d = Diagnostic::new(format!("unexpected {found}"), Self::span(token)).expected(what);
        match self.foreign_token() {
            Some(help) => d.help(help),
            None => d,
        }
    }

    /// What to write instead of a token that is not this language's.
    fn foreign_token(&self) -> Option<&'static str> {
        let token = self.peek();
        let next = self.peek_at(1);
        Some(match (token.kind, self.text(token)) {
            (TokenKind::Unknown, "~") => {
                "a model states its density as one product: put the factor into `density = …`, \
                 e.g. `density = normal(y; mu, sigma) * …` (the variable, `;`, then the parameters)"
            }
            (TokenKind::Unknown, "<") if next.kind == TokenKind::Minus && next.start == token.end() => {
                "write `=` to give a value a name"
            }
            (TokenKind::Unknown, "<" | ">" | "!" | "&" | "|") => comparisons(),
            (TokenKind::Equals, _) if next.kind == TokenKind::Equals && next.start == token.end() => comparisons(),
            (TokenKind::LBrace | TokenKind::RBrace, _) => {
                "braces are not part of the language: a model is a list of statements, one per line"
            }
            (TokenKind::Unknown, "\"" | "'") => "the language has no strings",
            (TokenKind::Semicolon, _) => {
                "`;` only separates a distribution's variable from its parameters, as in \
                 `normal(y; mu, sigma)`; a statement ends at the end of its line"
            }
            (TokenKind::Star, _) if self.tokens[self.pos.saturating_sub(1)].kind == TokenKind::Star => {
                "powers are written with `^`: `x ^ 2`"
            }
            _ => return None,
        })
    }

    fn ident(&mut self, what: &str) -> Result<Ident, Diagnostic> {
        let token = self.expect(TokenKind::Ident, what)?;
        Ok(Ident { name: self.text(token).to_string(), span: Self::span(token) })
    }

    fn statement(&mut self) -> Result<Statement, Diagnostic> {
        let first = self.peek();
        let follows = self.peek_at(1).kind;
        if first.kind == TokenKind::Ident && !matches!(follows, TokenKind::Equals | TokenKind::Colon) {
            let word = self.text(first);
            if word == "report" && follows == TokenKind::Ident {
                return self.report();
            }
            if let Some((message, help)) = foreign_statement(word) {
                return Err(Diagnostic::new(message, Self::span(first)).help(help));
            }
        }
        let name = self.ident("a statement: `name = value`, `name : support` or `density = …`")?;
        self.name = Some(name.clone());
        let statement = if self.eat(TokenKind::Equals).is_some() {
            Statement::Bind { name, value: self.expr(0)?, reported: false }
        } else if self.eat(TokenKind::Colon).is_some() {
            Statement::Declare { name, support: self.support()? }
        } else if self.peek().kind == TokenKind::Unknown && self.text(self.peek()) == "~" {
            return Err(self.tilde(&name));
        } else if self.peek().kind == TokenKind::LParen {
            return Err(Diagnostic::new("functions cannot be defined in a model", name.span).help(
                "give a repeated expression a name, `eta = a + b * x`, and use the name; for one value \
                 per index, write `[… for i in 1:n]`",
            ));
        } else {
            return Err(self.unexpected("`=` to bind a value or `:` to declare a parameter"));
        };
        self.end_of_statement()?;
        Ok(statement)
    }

    /// `y ~ f(a, b)`, another language's way of stating a factor: say how to write it here.
    fn tilde(&mut self, name: &Ident) -> Diagnostic {
        let d = self.unexpected("`=` to bind a value or `:` to declare a parameter");
        self.bump();
        match self.expr(0) {
            Ok(Expr { kind: ExprKind::Call { func, variate: None, args }, .. }) => {
                let factor = Expr {
                    kind: ExprKind::Call {
                        func,
                        variate: Some(Box::new(Expr { kind: ExprKind::Name(name.name.clone()), span: name.span })),
                        args,
                    },
                    span: name.span,
                };
                d.help(format!("a model states its density as one product: write `density = … * {factor}`"))
            }
            _ => d,
        }
    }

    /// `report NAME = EXPR`.
    fn report(&mut self) -> Result<Statement, Diagnostic> {
        self.bump();
        let name = self.ident("the name of the quantity to report")?;
        self.name = Some(name.clone());
        if self.peek().kind == TokenKind::Colon {
            return Err(Diagnostic::new("parameters are always reported", Self::span(self.peek()))
                .help("`report` marks a quantity computed from the parameters: `report gain = b[2] - b[1]`"));
        }
        self.expect(TokenKind::Equals, "`=` and the quantity to report")?;
        let value = self.expr(0)?;
        self.end_of_statement()?;
        Ok(Statement::Bind { name, value, reported: true })
    }

    fn end_of_statement(&mut self) -> Result<(), Diagnostic> {
        if !matches!(self.peek().kind, TokenKind::Newline | TokenKind::Eof) {
            return Err(self.unexpected("an operator or the end of the line"));
        }
        Ok(())
    }

    fn support(&mut self) -> Result<Support, Diagnostic> {
        let what = "a support: `real`, `positive`, `unit`, `between(a, b)`, `above(a)` or `below(b)`";
        let name = self.ident(what)?;
        let kind = match name.name.as_str() {
            "real" => SupportKind::Real,
            "positive" => SupportKind::Positive,
            "unit" => SupportKind::Unit,
            "between" => {
                let lo = self.bound(TokenKind::LParen, "`(` and the lower bound")?;
                let hi = self.bound(TokenKind::Comma, "`,` and the upper bound")?;
                self.expect(TokenKind::RParen, "`)` after the bounds")?;
                SupportKind::Between(lo, hi)
            }
            "above" | "below" => {
                let bound = self.bound(TokenKind::LParen, "`(` and the bound")?;
                self.expect(TokenKind::RParen, "`)` after the bound")?;
                if name.name == "above" { SupportKind::Above(bound) } else { SupportKind::Below(bound) }
            }
            other => {
                let mut d = Diagnostic::new(format!("unknown support `{other}`"), name.span).expected(what);
                if let Some(s) = super::diagnostic::did_you_mean(other, SUPPORT_WORDS.iter().copied()) {
                    d = d.help(format!("did you mean `{s}`?"));
                }
                return Err(d);
            }
        };
        let size = if let Some(open) = self.eat(TokenKind::LBracket) {
            let size = self.expr(0)?;
            self.close(TokenKind::RBracket, open, "`]` after the vector length")?;
            Some(size)
        } else {
            None
        };
        let end = self.tokens[self.pos.saturating_sub(1)].end();
        Ok(Support { kind, size, span: Span::new(name.span.start, end) })
    }

    /// `before` then an expression: one bound of a support.
    fn bound(&mut self, before: TokenKind, what: &str) -> Result<Expr, Diagnostic> {
        self.expect(before, what)?;
        self.expr(0)
    }

    fn expr(&mut self, min_bp: u8) -> Result<Expr, Diagnostic> {
        // A chain such as `a + b + c` or `v[1][2]` is built by a loop, not by recursion, yet each
        // link wraps the tree one level deeper; `expr_inner` counts the links, this restores.
        let outer = self.depth;
        let result = self.nest().and_then(|()| self.expr_inner(min_bp));
        self.depth = outer;
        result
    }

    /// One level deeper in the tree being built. Deeper than [`MAX_NESTING`] is an error here
    /// rather than a stack overflow in whatever walks the tree later.
    fn nest(&mut self) -> Result<(), Diagnostic> {
        self.depth += 1;
        if self.depth > MAX_NESTING {
            let token = self.peek();
            return Err(Diagnostic::new(
                format!("expressions are nested more than {MAX_NESTING} deep here"),
                Self::span(token),
            )
            .help(
                "each operator of a chain such as `a + b + c` is one level: put many terms in a list and \
                 use `sum(…)`, or give parts of the expression names",
            ));
        }
        Ok(())
    }

    fn expr_inner(&mut self, min_bp: u8) -> Result<Expr, Diagnostic> {
        let mut lhs = self.operand()?;
        loop {
            let token = self.peek();
            if token.kind == TokenKind::LBracket {
                if POSTFIX_INDEX < min_bp {
                    break;
                }
                self.nest()?;
                self.bump();
                let indices = self.indices(token)?;
                let end = self.tokens[self.pos - 1].end();
                let span = Span::new(lhs.span.start, end);
                lhs = Expr { kind: ExprKind::Index(Box::new(lhs), indices), span };
                continue;
            }
            if token.kind == TokenKind::Colon {
                if RANGE < min_bp {
                    break;
                }
                self.nest()?;
                let colon = self.bump();
                if matches!(
                    self.peek().kind,
                    TokenKind::Comma | TokenKind::RParen | TokenKind::RBracket | TokenKind::Newline | TokenKind::Eof
                ) {
                    return Err(Diagnostic::new(
                        "a range with an open end only means something in `[…]`",
                        Self::span(colon),
                    )
                    .expected("both ends, `a:b`")
                    .help("inside brackets `y[2:]` runs to the last element and `y[:k]` from the first"));
                }
                let hi = self.expr(RANGE + 1)?;
                let span = lhs.span.to(hi.span);
                lhs = Expr { kind: ExprKind::Range(Some(Box::new(lhs)), Some(Box::new(hi))), span };
                if self.peek().kind == TokenKind::Colon {
                    return Err(Diagnostic::new("a range has two ends", Self::span(self.peek()))
                        .expected("`a:b`, the whole numbers from a to b"));
                }
                continue;
            }
            let Some((op, left_bp, right_bp)) = binding_power(token.kind) else { break };
            if left_bp < min_bp {
                break;
            }
            self.nest()?;
            self.bump();
            let rhs = self.expr(right_bp)?;
            let span = lhs.span.to(rhs.span);
            lhs = Expr { kind: ExprKind::Binary(op, Box::new(lhs), Box::new(rhs)), span };
        }
        Ok(lhs)
    }

    fn operand(&mut self) -> Result<Expr, Diagnostic> {
        let token = self.peek();
        let span = Self::span(token);
        match token.kind {
            TokenKind::Number => {
                self.bump();
                let text = self.text(token);
                match text.parse::<f64>() {
                    Ok(v) if v.is_finite() => Ok(Expr { kind: ExprKind::Number(v), span }),
                    _ => Err(Diagnostic::new(format!("the number `{text}` is too large for a 64-bit float"), span)
                        .expected("a number of magnitude below 1.8e308")),
                }
            }
            TokenKind::Minus => {
                self.bump();
                let inner = self.expr(PREFIX_MINUS)?;
                let span = span.to(inner.span);
                Ok(Expr { kind: ExprKind::Neg(Box::new(inner)), span })
            }
            TokenKind::LParen => {
                self.bump();
                let inner = self.expr(0)?;
                if self.peek().kind == TokenKind::Ident && self.text(self.peek()) == "for" {
                    return Err(Diagnostic::new("a `for` needs brackets or a function around it", inner.span)
                        .expected("`[… for i in …]` for a list, or `sum(… for i in …)`, `prod(…)`, `mean(…)`"));
                }
                self.close(TokenKind::RParen, token, "`)` to close the parenthesis")?;
                Ok(inner)
            }
            TokenKind::LBracket => {
                self.bump();
                if let Some(close) = self.eat(TokenKind::RBracket) {
                    return Ok(Expr { kind: ExprKind::List(Vec::new()), span: Span::new(token.start, close.end()) });
                }
                let first = self.expr(0)?;
                let first = match self.terms(first)? {
                    Ok(terms) => {
                        self.close(TokenKind::RBracket, token, "`]` after the list's `for`")?;
                        let span = Span::new(token.start, self.tokens[self.pos - 1].end());
                        return Ok(Expr { kind: ExprKind::For(Box::new(terms)), span });
                    }
                    Err(first) => first,
                };
                let mut items = vec![first];
                if self.eat(TokenKind::Comma).is_some() {
                    items.extend(self.list(TokenKind::RBracket, token)?);
                } else {
                    self.close(TokenKind::RBracket, token, "`,` or `]`")?;
                }
                let end = self.tokens[self.pos - 1].end();
                Ok(Expr { kind: ExprKind::List(items), span: Span::new(token.start, end) })
            }
            TokenKind::Ident => {
                let name = self.ident("a name")?;
                match self.eat(TokenKind::LParen) {
                    Some(open) => self.call(name, open),
                    None => Ok(Expr { kind: ExprKind::Name(name.name), span }),
                }
            }
            _ => Err(self.unexpected("an expression: a number, a name, `(`, `[` or `-`")),
        }
    }

    /// After `body`: `for NAME in LIST` if that is what follows, or else `body` back.
    fn terms(&mut self, body: Expr) -> Result<Result<Terms, Expr>, Diagnostic> {
        if self.eat_word("for").is_none() {
            return Ok(Err(body));
        }
        let index = self.ident("the name of the index, as in `for i in 1:n`")?;
        if self.eat_word("in").is_none() {
            return Err(self.unexpected("`in` and the list the index runs over, as in `for i in 1:n`"));
        }
        let over = self.expr(0)?;
        if self.peek().kind == TokenKind::Ident && self.text(self.peek()) == "for" {
            return Err(Diagnostic::new("one `for` at a time", Self::span(self.peek()))
                .help("nest them instead: `sum(sum(x[i, j] for j in 1:m) for i in 1:n)`"));
        }
        Ok(Ok(Terms { body, index, over }))
    }

    /// The rest of `f(…)` after the `(`: plain arguments, a variate, `;` and parameters, or
    /// terms across an index.
    fn call(&mut self, func: Ident, open: Token) -> Result<Expr, Diagnostic> {
        let mut variate = None;
        let args = if self.eat(TokenKind::RParen).is_some() {
            Vec::new()
        } else {
            let first = self.expr(0)?;
            let first = match self.terms(first)? {
                Ok(terms) => {
                    if self.peek().kind == TokenKind::Comma {
                        return Err(Diagnostic::new("a `for` must be the only argument", Self::span(self.peek()))
                            .expected("`)` after the list the index runs over"));
                    }
                    self.close(TokenKind::RParen, open, "`)` after the list the index runs over")?;
                    let span = Span::new(func.span.start, self.tokens[self.pos - 1].end());
                    return Ok(Expr { kind: ExprKind::Across { func, terms: Box::new(terms) }, span });
                }
                Err(first) => first,
            };
            if self.eat(TokenKind::Semicolon).is_some() {
                variate = Some(Box::new(first));
                self.list(TokenKind::RParen, open)?
            } else {
                let mut args = vec![first];
                if self.eat(TokenKind::Comma).is_some() {
                    args.extend(self.list(TokenKind::RParen, open)?);
                } else {
                    self.close(TokenKind::RParen, open, "`,`, `;` or `)` in the call")?;
                }
                args
            }
        };
        let end = self.tokens[self.pos - 1].end();
        let span = Span::new(func.span.start, end);
        Ok(Expr { kind: ExprKind::Call { func, variate, args }, span })
    }

    /// Comma-separated expressions up to and including `close` (a trailing comma is allowed).
    fn list(&mut self, close: TokenKind, open: Token) -> Result<Vec<Expr>, Diagnostic> {
        let mut items = Vec::new();
        let closing = if close == TokenKind::RParen { "`)`" } else { "`]`" };
        loop {
            if self.eat(close).is_some() {
                return Ok(items);
            }
            items.push(self.expr(0)?);
            if self.eat(TokenKind::Comma).is_none() {
                self.close(close, open, &format!("`,` or {closing}"))?;
                return Ok(items);
            }
        }
    }

    /// The indices of `v[…]` up to and including `]`: expressions, or ranges whose ends may be
    /// left open (`2:`, `:n`, `:`).
    fn indices(&mut self, open: Token) -> Result<Vec<Expr>, Diagnostic> {
        let mut items = Vec::new();
        loop {
            if self.peek().kind == TokenKind::RBracket && !items.is_empty() {
                self.bump();
                return Ok(items);
            }
            items.push(self.index()?);
            if self.eat(TokenKind::Comma).is_none() {
                self.close(TokenKind::RBracket, open, "`,` or `]`")?;
                return Ok(items);
            }
        }
    }

    fn index(&mut self) -> Result<Expr, Diagnostic> {
        let start = self.peek();
        let ends_here = |p: &Self| matches!(p.peek().kind, TokenKind::Comma | TokenKind::RBracket);
        let lo = if start.kind == TokenKind::Colon { None } else { Some(self.expr(RANGE + 1)?) };
        let Some(colon) = self.eat(TokenKind::Colon) else {
            return lo.ok_or_else(|| self.unexpected("an index"));
        };
        let hi = if ends_here(self) { None } else { Some(self.expr(RANGE + 1)?) };
        if self.peek().kind == TokenKind::Colon {
            return Err(Diagnostic::new("a range has two ends", Self::span(self.peek()))
                .expected("`a:b`, `a:`, `:b` or `:` (every element)"));
        }
        let first = lo.as_ref().map_or(start.start, |e| e.span.start);
        let last = hi.as_ref().map_or(colon.end(), |e| e.span.end);
        Ok(Expr { kind: ExprKind::Range(lo.map(Box::new), hi.map(Box::new)), span: Span::new(first, last) })
    }
}
