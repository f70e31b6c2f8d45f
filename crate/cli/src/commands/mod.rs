//! One file per command, each with the same two items: its arguments (`Args`, for clap) and its
//! `run`. `main` only dispatches; a new command is a new file here and one line in `main`.

pub mod batch;
pub mod count;
pub mod detect;
pub mod review;
pub mod run;
pub mod score;
pub mod score_counts;
pub mod simulate;
pub mod track;
pub mod tune;

use clap::builder::{PossibleValuesParser, TypedValueParser};
use throughline_core::Method;

/// `--method`: one of the registered tracking methods, checked and parsed by clap.
pub fn method_parser() -> impl TypedValueParser<Value = Method> {
    PossibleValuesParser::new(Method::names())
        .try_map(|name| Method::parse(&name).ok_or_else(|| format!("unknown method `{name}`")))
}
