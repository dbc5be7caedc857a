//! A Pratt parser from tokens to the syntax tree. Precedence lives in [`binding_power`].

use super::ast::*;
use super::diagnostic::{Diagnostic, Span};
use super::lexer::{Token, TokenKind, tokenize};

/// Deepest nesting of expressions accepted; deeper input is refused rather than risking the stack.
pub const MAX_NESTING: usize = 128;
/// Largest model text accepted, in bytes.
pub const MAX_SOURCE_BYTES: usize = 4 << 20;

/// Parse a whole model. The first problem found is returned with its position.
pub fn parse(source: &str) -> Result<Program, Diagnostic> {
    if source.len() > MAX_SOURCE_BYTES {
        return Err(Diagnostic::new(
            format!("the model text is {} bytes, more than the limit of {MAX_SOURCE_BYTES}", source.len()),
            Span::new(MAX_SOURCE_BYTES, MAX_SOURCE_BYTES),
        ));
    }
    let mut parser = Parser { source, tokens: tokenize(source), pos: 0, depth: 0 };
    let mut statements = Vec::new();
    loop {
        parser.eat(TokenKind::Newline);
        if parser.peek().kind == TokenKind::Eof {
            return Ok(Program { statements });
        }
        statements.push(parser.statement()?);
    }
}

struct Parser<'s> {
    source: &'s str,
    tokens: Vec<Token>,
    pos: usize,
    depth: usize,
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

/// Unary minus binds tighter than `*` and looser than `^`: `-x^2` is `-(x^2)`.
const PREFIX_MINUS: u8 = 30;
/// Indexing binds tightest of all.
const POSTFIX_INDEX: u8 = 50;

impl<'s> Parser<'s> {
    fn peek(&self) -> Token {
        self.tokens[self.pos]
    }

    fn text(&self, token: Token) -> &'s str {
        &self.source[token.start..token.end()]
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

    fn expect(&mut self, kind: TokenKind, what: &str) -> Result<Token, Diagnostic> {
        self.eat(kind).ok_or_else(|| self.unexpected(what))
    }

    /// An error at the current token saying what was expected instead.
    fn unexpected(&self, what: &str) -> Diagnostic {
        let token = self.peek();
        let found = match token.kind {
            TokenKind::Eof => "end of text".to_string(),
            TokenKind::Newline => "end of line".to_string(),
            TokenKind::Unknown => format!("the character `{}`, which is not part of the language", self.text(token)),
            _ => format!("`{}`", self.text(token)),
        };
        Diagnostic::new(format!("unexpected {found}"), Span::new(token.start, token.end())).expected(what)
    }

    fn ident(&mut self, what: &str) -> Result<Ident, Diagnostic> {
        let token = self.expect(TokenKind::Ident, what)?;
        Ok(Ident { name: self.text(token).to_string(), span: Span::new(token.start, token.end()) })
    }

    fn statement(&mut self) -> Result<Statement, Diagnostic> {
        let name = self.ident("a statement: `name = value`, `name : support` or `density = …`")?;
        let statement = if self.eat(TokenKind::Equals).is_some() {
            Statement::Bind { name, value: self.expr(0)? }
        } else if self.eat(TokenKind::Colon).is_some() {
            Statement::Declare { name, support: self.support()? }
        } else {
            return Err(self.unexpected("`=` to bind a value or `:` to declare a parameter"));
        };
        if !matches!(self.peek().kind, TokenKind::Newline | TokenKind::Eof) {
            return Err(self.unexpected("an operator or the end of the line"));
        }
        Ok(statement)
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
                let supports = ["real", "positive", "unit", "between", "above", "below"];
                let mut d = Diagnostic::new(format!("unknown support `{other}`"), name.span).expected(what);
                if let Some(s) = super::diagnostic::did_you_mean(other, supports) {
                    d = d.help(format!("did you mean `{s}`?"));
                }
                return Err(d);
            }
        };
        let size = if self.eat(TokenKind::LBracket).is_some() {
            let size = self.expr(0)?;
            self.expect(TokenKind::RBracket, "`]` after the vector length")?;
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
                Span::new(token.start, token.end()),
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
                let indices = self.list(TokenKind::RBracket)?;
                let end = self.tokens[self.pos - 1].end();
                let span = Span::new(lhs.span.start, end);
                lhs = Expr { kind: ExprKind::Index(Box::new(lhs), indices), span };
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
        let span = Span::new(token.start, token.end());
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
                self.expect(TokenKind::RParen, "`)` to close the parenthesis")?;
                Ok(inner)
            }
            TokenKind::LBracket => {
                self.bump();
                let items = self.list(TokenKind::RBracket)?;
                let end = self.tokens[self.pos - 1].end();
                Ok(Expr { kind: ExprKind::List(items), span: Span::new(token.start, end) })
            }
            TokenKind::Ident => {
                let name = self.ident("a name")?;
                if self.eat(TokenKind::LParen).is_none() {
                    return Ok(Expr { kind: ExprKind::Name(name.name), span });
                }
                self.call(name)
            }
            _ => Err(self.unexpected("an expression: a number, a name, `(`, `[` or `-`")),
        }
    }

    /// The rest of `f(…)` after the `(`: plain arguments, or a variate, `;` and parameters.
    fn call(&mut self, func: Ident) -> Result<Expr, Diagnostic> {
        let mut variate = None;
        let args = if self.eat(TokenKind::RParen).is_some() {
            Vec::new()
        } else {
            let first = self.expr(0)?;
            if self.eat(TokenKind::Semicolon).is_some() {
                variate = Some(Box::new(first));
                self.list(TokenKind::RParen)?
            } else {
                let mut args = vec![first];
                if self.eat(TokenKind::Comma).is_some() {
                    args.extend(self.list(TokenKind::RParen)?);
                } else {
                    self.expect(TokenKind::RParen, "`,`, `;` or `)` in the call")?;
                }
                args
            }
        };
        let end = self.tokens[self.pos - 1].end();
        let span = Span::new(func.span.start, end);
        Ok(Expr { kind: ExprKind::Call { func, variate, args }, span })
    }

    /// Comma-separated expressions up to and including `close` (a trailing comma is allowed).
    fn list(&mut self, close: TokenKind) -> Result<Vec<Expr>, Diagnostic> {
        let mut items = Vec::new();
        let closing = if close == TokenKind::RParen { "`)`" } else { "`]`" };
        loop {
            if self.eat(close).is_some() {
                return Ok(items);
            }
            items.push(self.expr(0)?);
            if self.eat(TokenKind::Comma).is_none() {
                self.expect(close, &format!("`,` or {closing}"))?;
                return Ok(items);
            }
        }
    }
}
