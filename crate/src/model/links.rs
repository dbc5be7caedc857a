//! Links written as on paper — `bernoulli(y; logistic(eta))`, `binomial(k; n, logistic(eta))`,
//! `poisson(k; exp(eta))` — recognised and computed by families that take η itself, so that
//! nothing overflows or loses its digits where the probability or rate rounds to 0 or 1.
//!
//! The families that take η are internal: the language names only the distributions as they are
//! written on paper ([`written`]).

use super::builtins::{BinaryFn, UnaryFn};
use super::{Derived, Node, NodeKind};
use crate::dist::Family;

/// One recognised composition: `written` with parameter `param` equal to `link(η)` is
/// `internal` with η in that place.
struct Link {
    written: Family,
    param: usize,
    link: UnaryFn,
    internal: Family,
}

const LINKS: &[Link] = &[
    Link { written: Family::Bernoulli, param: 0, link: UnaryFn::Logistic, internal: Family::BernoulliLogit },
    Link { written: Family::Binomial, param: 1, link: UnaryFn::Logistic, internal: Family::BinomialLogit },
    Link { written: Family::Poisson, param: 0, link: UnaryFn::Exp, internal: Family::PoissonLog },
];

/// The distribution a model names `name`, if any (the internal families have no written name).
pub fn written(name: &str) -> Option<Family> {
    Family::from_name(name).filter(|f| !LINKS.iter().any(|l| l.internal == *f))
}

/// Every distribution name a model can write, for suggestions.
pub fn written_names() -> impl Iterator<Item = &'static str> {
    Family::ALL.iter().filter(|f| written(f.name()).is_some()).map(|f| f.name())
}

/// `family` with `params`, or the internal family and parameters it equals when one parameter is
/// its link applied to some η. A named intermediate (`p = logistic(eta)`) is looked through;
/// for the Poisson rate an exposure in front, `E * exp(eta)` or `exp(eta) * E`, becomes the
/// log-rate log E + η.
pub(crate) fn apply(family: Family, mut params: Vec<Node>, derived: &[Derived]) -> (Family, Vec<Node>) {
    for link in LINKS.iter().filter(|l| l.written == family) {
        let Some(eta) = inverse(&params[link.param], link.link, derived) else { continue };
        params[link.param] = eta;
        return (link.internal, params);
    }
    (family, params)
}

/// η when `node` is `f(η)` (or names an intermediate that is), for the Poisson's `exp` also
/// log E + η when it is `E · exp(η)`.
fn inverse(node: &Node, f: UnaryFn, derived: &[Derived]) -> Option<Node> {
    let node = look_through(node, derived);
    match &node.kind {
        NodeKind::Map(g, eta) if *g == f => Some((**eta).clone()),
        NodeKind::Zip(BinaryFn::Mul, a, b) if f == UnaryFn::Exp => {
            let (exposure, eta) = match (inverse(a, f, derived), inverse(b, f, derived)) {
                (_, Some(eta)) => (a, eta),
                (Some(eta), None) => (b, eta),
                (None, None) => return None,
            };
            let log_exposure = Node {
                kind: NodeKind::Map(UnaryFn::Log, exposure.clone()),
                shape: exposure.shape,
                constant: exposure.constant,
                per_index: exposure.per_index,
            };
            let shape = if eta.shape == super::Shape::Scalar { exposure.shape } else { eta.shape };
            Some(Node {
                constant: log_exposure.constant && eta.constant,
                per_index: log_exposure.per_index || eta.per_index,
                kind: NodeKind::Zip(BinaryFn::Add, Box::new(log_exposure), Box::new(eta)),
                shape,
            })
        }
        _ => None,
    }
}

/// The node a name stands for, when `node` is a name.
fn look_through<'a>(node: &'a Node, derived: &'a [Derived]) -> &'a Node {
    let mut node = node;
    while let NodeKind::Derived(i) = node.kind {
        node = &derived[i].node;
    }
    node
}
