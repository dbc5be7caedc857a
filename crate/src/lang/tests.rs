//! Parser tests: precedence in S-expression form, positioned errors (all of them), and the
//! round-trip and never-panic properties.

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

/// Line, column and message of the first error.
fn error_at(src: &str) -> (usize, usize, String) {
    let d = parse(src).expect_err("should not parse");
    let first = d.first();
    let p = first.position(src);
    (p.line, p.column, first.message.clone())
}

/// Every error: line and a fragment of the message.
fn errors(src: &str) -> Vec<(usize, String)> {
    match parse(src) {
        Ok(_) => Vec::new(),
        Err(d) => d.iter().map(|e| (e.position(src).line, e.message.clone())).collect(),
    }
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
    assert_eq!(expr("[]"), "[]");
}

#[test]
fn ranges_bind_loosest_and_slices_may_leave_ends_open() {
    assert_eq!(expr("1:n"), "(: 1 n)");
    assert_eq!(expr("t + 1:n - 1"), "(: (+ t 1) (- n 1))");
    assert_eq!(expr("y[2:n]"), "(index y (: 2 n))");
    assert_eq!(expr("y[2:]"), "(index y (: 2 _))");
    assert_eq!(expr("y[:k]"), "(index y (: _ k))");
    assert_eq!(expr("M[:, j + 1]"), "(index M (: _ _) (+ j 1))");
    assert_eq!(expr("y[(1:3)]"), "(index y (: 1 3))");
    assert_eq!(error_at("x = 1:2:3").2, "a range has two ends");
    assert_eq!(error_at("x = y[1:2:3]").2, "a range has two ends");
}

#[test]
fn for_forms_build_lists_and_reduce_across_terms() {
    assert_eq!(expr("[y[i] ^ 2 for i in 1:n]"), "(list (^ (index y i) 2) for i in (: 1 n))");
    assert_eq!(
        expr("sum(phi[k] * y[t - k] for k in 1:p)"),
        "(sum (* (index phi k) (index y (- t k))) for k in (: 1 p))"
    );
    assert_eq!(expr("prod(normal(v; a, s) for v in y)"), "(prod (normal v; a s) for v in y)");
    assert_eq!(expr("sum([x for i in 1:2])"), "(sum (list x for i in (: 1 2)))");
    assert_eq!(expr("sum(sum(x[i, j] for j in 1:m) for i in 1:n)").matches(" for ").count(), 2);
    assert_eq!(error_at("x = sum(a for i in 1:2, 3)").2, "a `for` must be the only argument");
    assert_eq!(error_at("x = (a for i in 1:2)").2, "a `for` needs brackets or a function around it");
    assert_eq!(error_at("x = [a for i 1:2]").2, "unexpected `1`");
    assert_eq!(error_at("x = [a for i in 1:2 for j in 1:3]").2, "one `for` at a time");
}

#[test]
fn report_marks_a_statement_and_names_stay_free() {
    let p = parse("report gain = b[2] - b[1]\nreport = 3\nfor = 1\n").unwrap();
    assert!(matches!(&p.statements[0], Statement::Bind { name, reported: true, .. } if name.name == "gain"));
    assert!(matches!(&p.statements[1], Statement::Bind { name, reported: false, .. } if name.name == "report"));
    assert_eq!(p.to_string(), "report gain = b[2] - b[1]\nreport = 3\nfor = 1\n");
    assert_eq!(error_at("report mu : real").2, "parameters are always reported");
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
    // The unclosed parenthesis is reported where its line ends, not at the next statement.
    assert_eq!(error_at("a = 1\nb = (2 + 3\nc = 4"), (2, 11, "unexpected end of line".to_string()));
    assert_eq!(error_at("mu : rael"), (1, 6, "unknown support `rael`".to_string()));
    assert_eq!(error_at("x = 1 $ 2").1, 7);
    assert_eq!(error_at("x = 1e999").2, "the number `1e999` is too large for a 64-bit float");
    assert_eq!(error_at("x 1").1, 3);
    assert_eq!(error_at("x = 1 2").1, 7);
}

#[test]
fn every_statement_s_error_is_reported() {
    let src = "a = (1 +\nmu : rael\nb = 2 $ 3\nc = [1, 2\nsigma : positive\nd = 4";
    let found = errors(src);
    assert_eq!(found.iter().map(|e| e.0).collect::<Vec<_>>(), [1, 2, 3, 4], "{found:?}");
    let parsed = parse_all(src);
    let broken: Vec<&str> = parsed.broken.iter().map(|i| i.name.as_str()).collect();
    assert_eq!(broken, ["a", "mu", "b", "c"]);
    assert_eq!(parsed.program.statements.len(), 2);
    // At most MAX_ERRORS are kept, and the rest counted.
    let many = "x = (\n".repeat(200);
    let d = parse(&many).expect_err("all broken");
    assert_eq!(d.iter().count(), diagnostic::MAX_ERRORS);
    assert!(d.render("m", &many).contains("more error"));
}

#[test]
fn other_languages_forms_get_the_language_s_alternative() {
    let help = |src: &str| parse(src).expect_err("refused").first().help.clone().unwrap_or_default();
    assert!(help("for i in 1:n {\n  y[i] ~ normal(mu, 1)\n}").contains("prod(normal(y[i]; mu, sigma) for i in 1:n)"));
    assert!(help("if x > 0\n").contains("0s and 1s"));
    assert!(help("f(x) = x ^ 2\n").contains("give a repeated expression a name"));
    assert!(help("def f(x):\n").contains("give a repeated expression a name"));
    assert!(help("y ~ normal(mu, sigma)\n").contains("`density = … * normal(y; mu, sigma)`"));
    assert!(help("x <- 3\n").contains("write `=`"));
    assert!(help("x = a < b\n").contains("no comparisons"));
    assert!(help("x = a == b\n").contains("no comparisons"));
    assert!(help("x = a ** 2\n").contains("`^`"));
    assert!(help("x = { 1 }\n").contains("braces"));
    assert!(help("let x = 1\n").contains("for data or an intermediate"));
    // A braced block is one statement, so one error.
    assert_eq!(errors("while true {\n a = 1\n b = 2\n}\n").len(), 1);
}

#[test]
fn deep_nesting_is_refused_not_a_stack_overflow() {
    let src = format!("x = {}1{}", "(".repeat(100_000), ")".repeat(100_000));
    assert!(error_at(&src).2.contains("nested"));
    let src = format!("x = {}1", "-".repeat(100_000));
    assert!(error_at(&src).2.contains("nested"));
    let src = format!("x = {}1{}", "sum(".repeat(100_000), " for i in 1:2)".repeat(100_000));
    assert!(error_at(&src).2.contains("nested"));
}

fn ident() -> impl Strategy<Value = Ident> {
    "[a-z][a-z_]{0,6}".prop_map(|name| Ident { name, span: Span::default() })
}

fn node(kind: ExprKind) -> Expr {
    Expr { kind, span: Span::default() }
}

/// Random syntax trees, printed and parsed back, must come back unchanged (spans aside). Open
/// ranges appear only as indices, where the parser produces them.
fn arb_expr() -> impl Strategy<Value = Expr> {
    let leaf = prop_oneof![
        (0.0..1e6f64).prop_map(ExprKind::Number),
        (0u32..1000).prop_map(|n| ExprKind::Number(n as f64)),
        // Any word, built-in or keyword alike, is a plain name where a value stands.
        prop_oneof![
            "[a-z][a-z0-9_]{0,5}",
            Just("beta".to_string()),
            Just("sum".to_string()),
            Just("pi".to_string()),
            Just("report".to_string()),
            Just("in".to_string()),
            Just("normal".to_string()),
        ]
        .prop_map(ExprKind::Name),
    ]
    .prop_map(node);
    leaf.prop_recursive(5, 64, 4, |inner| {
        let op = prop_oneof![Just(BinOp::Add), Just(BinOp::Sub), Just(BinOp::Mul), Just(BinOp::Div), Just(BinOp::Pow)];
        let end = prop::option::of(inner.clone().prop_map(Box::new));
        let index = prop_oneof![
            3 => inner.clone(),
            1 => (end.clone(), end).prop_map(|(lo, hi)| node(ExprKind::Range(lo, hi))),
        ];
        let terms =
            || (inner.clone(), ident(), inner.clone()).prop_map(|(body, index, over)| Terms { body, index, over });
        prop_oneof![
            (op, inner.clone(), inner.clone()).prop_map(|(op, a, b)| ExprKind::Binary(op, Box::new(a), Box::new(b))),
            inner.clone().prop_map(|e| ExprKind::Neg(Box::new(e))),
            prop::collection::vec(inner.clone(), 0..4).prop_map(ExprKind::List),
            (inner.clone(), prop::collection::vec(index, 1..3)).prop_map(|(b, i)| ExprKind::Index(Box::new(b), i)),
            (ident(), prop::option::of(inner.clone()), prop::collection::vec(inner.clone(), 0..3))
                .prop_map(|(func, variate, args)| ExprKind::Call { func, variate: variate.map(Box::new), args }),
            (inner.clone(), inner.clone()).prop_map(|(a, b)| ExprKind::Range(Some(Box::new(a)), Some(Box::new(b)))),
            terms().prop_map(|t| ExprKind::For(Box::new(t))),
            (ident(), terms()).prop_map(|(func, t)| ExprKind::Across { func, terms: Box::new(t) }),
        ]
        .prop_map(node)
    })
}

/// The tree with every span zeroed, so trees can be compared by meaning.
fn without_spans(p: &Program) -> Program {
    fn e(x: &Expr) -> Expr {
        let b = |x: &Expr| Box::new(e(x));
        let t = |t: &Terms| Box::new(Terms { body: e(&t.body), index: id(&t.index), over: e(&t.over) });
        let kind = match &x.kind {
            ExprKind::List(v) => ExprKind::List(v.iter().map(e).collect()),
            ExprKind::Neg(a) => ExprKind::Neg(b(a)),
            ExprKind::Binary(op, l, r) => ExprKind::Binary(*op, b(l), b(r)),
            ExprKind::Index(base, i) => ExprKind::Index(b(base), i.iter().map(e).collect()),
            ExprKind::Call { func, variate, args } => ExprKind::Call {
                func: id(func),
                variate: variate.as_deref().map(b),
                args: args.iter().map(e).collect(),
            },
            ExprKind::Range(lo, hi) => ExprKind::Range(lo.as_deref().map(b), hi.as_deref().map(b)),
            ExprKind::For(terms) => ExprKind::For(t(terms)),
            ExprKind::Across { func, terms } => ExprKind::Across { func: id(func), terms: t(terms) },
            other => other.clone(),
        };
        Expr { kind, span: Span::default() }
    }
    fn id(i: &Ident) -> Ident {
        Ident { name: i.name.clone(), span: Span::default() }
    }
    let statements = p
        .statements
        .iter()
        .map(|s| match s {
            Statement::Bind { name, value, reported } => {
                Statement::Bind { name: id(name), value: e(value), reported: *reported }
            }
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
    fn printing_then_parsing_gives_the_same_tree(
        value in arb_expr(), lo in arb_expr(), size in 1u32..9, reported in any::<bool>(), name in ident(),
    ) {
        let program = Program { statements: vec![
            Statement::Bind { name, value, reported },
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
            prop_assert!(d.iter().all(|e| e.span.start <= e.span.end && e.span.end <= text.len()));
            let _ = d.render("fuzz", &text);
        }
    }

    #[test]
    fn near_miss_models_never_panic(src in "[a-z =:;,()\\[\\]{}~<+*/^#\n0-9.e-]{0,80}") {
        if let Err(d) = parse(&src) {
            prop_assert!(d.iter().all(|e| e.span.start <= e.span.end && e.span.end <= src.len()));
        }
        // Checking a text never panics either, whatever it parses to.
        let _ = crate::model::check(&src);
    }
}
