//! Parser tests: precedence in S-expression form, positioned errors, and the round-trip and
//! never-panic properties.

use super::ast::*;
use super::print::sexpr;
use super::*;
use proptest::prelude::*;

fn expr(src: &str) -> String {
    let program = parse(&format!("x = {src}")).unwrap_or_else(|d| panic!("{}", d.render("t", src)));
    match &program.statements[0] {
        Statement::Bind { value, .. } => sexpr(value),
        other => panic!("not a binding: {other:?}"),
    }
}

fn error_at(src: &str) -> (usize, usize, String) {
    let d = parse(src).expect_err("should not parse");
    let p = d.position(src);
    (p.line, p.column, d.message)
}

#[test]
fn precedence_and_associativity() {
    assert_eq!(expr("1 + 2 * 3"), "(+ 1 (* 2 3))");
    assert_eq!(expr("1 - 2 - 3"), "(- (- 1 2) 3)");
    assert_eq!(expr("a / b * c"), "(* (/ a b) c)");
    assert_eq!(expr("2 ^ 3 ^ 2"), "(^ 2 (^ 3 2))");
    assert_eq!(expr("-x ^ 2"), "(- (^ x 2))");
    assert_eq!(expr("-a * b"), "(* (- a) b)");
    assert_eq!(expr("(1 + 2) * 3"), "(* (+ 1 2) 3)");
    assert_eq!(expr("v[2] ^ 2"), "(^ (index v 2) 2)");
    assert_eq!(expr("m[1, 2]"), "(index m 1 2)");
}

#[test]
fn calls_lists_and_density_factors() {
    assert_eq!(expr("normal(y; mu, sigma)"), "(normal y; mu sigma)");
    assert_eq!(expr("exp(-a) * f(b)"), "(* (exp (- a)) (f b))");
    assert_eq!(expr("[[1, 2], [3, 4]]"), "[[1 2] [3 4]]");
    assert_eq!(expr("[1, 2,]"), "[1 2]");
    assert_eq!(expr("g()"), "(g )");
}

#[test]
fn statements_continue_inside_brackets_and_after_operators() {
    let p = parse("y = [1,\n  2,\n  3]\nmu : real\ndensity = normal(y; mu, 1) *\n  normal(mu; 0, 10)\n").unwrap();
    assert_eq!(p.statements.len(), 3);
}

#[test]
fn supports_parse_with_bounds_and_sizes() {
    let p = parse("a : between(0, 10)[3]\nb : above(-1)\nc : unit\n").unwrap();
    assert_eq!(p.to_string(), "a : between(0, 10)[3]\nb : above(-1)\nc : unit\n");
}

#[test]
fn errors_point_at_the_problem() {
    assert_eq!(error_at("a = 1\nb = 2 +\n").0, 3);
    assert_eq!(error_at("a = 1\nb = (2 + 3\nc = 4"), (3, 1, "unexpected `c`".to_string()));
    assert_eq!(error_at("mu : rael"), (1, 6, "unknown support `rael`".to_string()));
    assert_eq!(error_at("x = 1 $ 2").1, 7);
    assert_eq!(error_at("x = 1e999").2, "the number `1e999` is too large for a 64-bit float");
    assert_eq!(error_at("x 1").1, 3);
    assert_eq!(error_at("x = 1 2").1, 7);
}

#[test]
fn deep_nesting_is_refused_not_a_stack_overflow() {
    let src = format!("x = {}1{}", "(".repeat(100_000), ")".repeat(100_000));
    assert!(error_at(&src).2.contains("nested"));
    let src = format!("x = {}1", "-".repeat(100_000));
    assert!(error_at(&src).2.contains("nested"));
}

/// Random syntax trees, printed and parsed back, must come back unchanged (spans aside).
fn arb_expr() -> impl Strategy<Value = Expr> {
    let leaf = prop_oneof![
        (0.0..1e6f64).prop_map(ExprKind::Number),
        (0u32..1000).prop_map(|n| ExprKind::Number(n as f64)),
        "[a-z][a-z0-9_]{0,5}".prop_map(ExprKind::Name),
    ]
    .prop_map(|kind| Expr { kind, span: Span::default() });
    leaf.prop_recursive(5, 48, 4, |inner| {
        let op = prop_oneof![Just(BinOp::Add), Just(BinOp::Sub), Just(BinOp::Mul), Just(BinOp::Div), Just(BinOp::Pow)];
        let ident = "[a-z][a-z_]{0,6}".prop_map(|name| Ident { name, span: Span::default() });
        prop_oneof![
            (op, inner.clone(), inner.clone()).prop_map(|(op, a, b)| ExprKind::Binary(op, Box::new(a), Box::new(b))),
            inner.clone().prop_map(|e| ExprKind::Neg(Box::new(e))),
            prop::collection::vec(inner.clone(), 0..4).prop_map(ExprKind::List),
            (inner.clone(), prop::collection::vec(inner.clone(), 1..3))
                .prop_map(|(b, i)| ExprKind::Index(Box::new(b), i)),
            (ident, prop::option::of(inner.clone()), prop::collection::vec(inner, 0..3))
                .prop_map(|(func, variate, args)| ExprKind::Call { func, variate: variate.map(Box::new), args }),
        ]
        .prop_map(|kind| Expr { kind, span: Span::default() })
    })
}

/// The tree with every span zeroed, so trees can be compared by meaning.
fn without_spans(p: &Program) -> Program {
    fn e(x: &Expr) -> Expr {
        let kind = match &x.kind {
            ExprKind::List(v) => ExprKind::List(v.iter().map(e).collect()),
            ExprKind::Neg(a) => ExprKind::Neg(Box::new(e(a))),
            ExprKind::Binary(op, a, b) => ExprKind::Binary(*op, Box::new(e(a)), Box::new(e(b))),
            ExprKind::Index(b, i) => ExprKind::Index(Box::new(e(b)), i.iter().map(e).collect()),
            ExprKind::Call { func, variate, args } => ExprKind::Call {
                func: Ident { name: func.name.clone(), span: Span::default() },
                variate: variate.as_ref().map(|v| Box::new(e(v))),
                args: args.iter().map(e).collect(),
            },
            other => other.clone(),
        };
        Expr { kind, span: Span::default() }
    }
    let id = |i: &Ident| Ident { name: i.name.clone(), span: Span::default() };
    let statements = p
        .statements
        .iter()
        .map(|s| match s {
            Statement::Bind { name, value } => Statement::Bind { name: id(name), value: e(value) },
            Statement::Declare { name, support } => {
                let kind = match &support.kind {
                    SupportKind::Between(a, b) => SupportKind::Between(e(a), e(b)),
                    SupportKind::Above(a) => SupportKind::Above(e(a)),
                    SupportKind::Below(b) => SupportKind::Below(e(b)),
                    other => other.clone(),
                };
                let support = Support { kind, size: support.size.as_ref().map(e), span: Span::default() };
                Statement::Declare { name: id(name), support }
            }
        })
        .collect();
    Program { statements }
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(512))]

    #[test]
    fn printing_then_parsing_gives_the_same_tree(value in arb_expr(), lo in arb_expr(), size in 1u32..9) {
        let program = Program { statements: vec![
            Statement::Bind { name: Ident { name: "x".into(), span: Span::default() }, value },
            Statement::Declare {
                name: Ident { name: "p".into(), span: Span::default() },
                support: Support {
                    kind: SupportKind::Above(lo),
                    size: Some(Expr { kind: ExprKind::Number(size as f64), span: Span::default() }),
                    span: Span::default(),
                },
            },
        ]};
        let text = program.to_string();
        let reparsed = parse(&text).map_err(|d| TestCaseError::fail(d.render("printed", &text)))?;
        prop_assert_eq!(without_spans(&reparsed), program);
    }

    #[test]
    fn random_bytes_never_panic(bytes in prop::collection::vec(any::<u8>(), 0..200)) {
        let text = String::from_utf8_lossy(&bytes);
        if let Err(d) = parse(&text) {
            prop_assert!(d.span.start <= text.len());
            let _ = d.render("fuzz", &text);
        }
    }

    #[test]
    fn near_miss_models_never_panic(src in "[a-z =:;,()\\[\\]+*/^#\n0-9.e-]{0,80}") {
        if let Err(d) = parse(&src) {
            prop_assert!(d.span.start <= src.len());
        }
    }
}
