//! `mixwell link`: the link that carries a model and a run.

use super::args::LinkArgs;
use super::{Failure, load};
use crate::link::{Shared, encode};
use crate::tape::Tape;

pub fn run(args: &LinkArgs) -> Result<String, Failure> {
    let (_, text, model) = load(&args.model)?;
    let run = args.options.options().resolve(Tape::new(&model).dim())?;
    Ok(encode(&Shared { model: text, run }, &args.page)? + "\n")
}
