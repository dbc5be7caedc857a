//! A whole run — model text and run configuration — as a link whose fragment carries it,
//! compressed. The fragment never reaches a server. Reopening the link and running it gives the
//! same draws, in any browser and in the command line.
//!
//! A link is untrusted input: its length and unpacked size are capped before anything is
//! allocated for it, and everything in it is validated as if typed by the user.

use crate::plan::RunConfig;
use base64::Engine as _;
use base64::engine::general_purpose::URL_SAFE_NO_PAD;
use serde::{Deserialize, Serialize};

/// Longest link accepted, in characters. Browsers and chat programs cope with links this long;
/// a model with its data must compress below it to travel as a link.
pub const MAX_LINK_CHARS: usize = 60_000;
/// Largest unpacked contents accepted: stops decompression bombs.
pub const MAX_UNPACKED_BYTES: usize = 1 << 20;
/// The fragment key and format version, so a future format can tell old links apart.
const KEY: &str = "run=";
const VERSION: &str = "mw1.";

/// What a link carries.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct Shared {
    pub model: String,
    pub run: RunConfig,
}

/// Why a link could not be made or read, in words for the user.
#[derive(Clone, Debug, PartialEq)]
pub struct LinkError(pub String);

impl std::fmt::Display for LinkError {
    fn fmt(&self, f: &mut std::fmt::Formatter) -> std::fmt::Result {
        f.write_str(&self.0)
    }
}

fn fail<T>(message: impl Into<String>) -> Result<T, LinkError> {
    Err(LinkError(message.into()))
}

/// The link to `page` (an address without fragment) that carries `shared`.
pub fn encode(shared: &Shared, page: &str) -> Result<String, LinkError> {
    let json = serde_json::to_vec(shared).map_err(|e| LinkError(format!("cannot write the link: {e}")))?;
    let packed = miniz_oxide::deflate::compress_to_vec(&json, 9);
    let page = page.split('#').next().unwrap_or(page);
    let link = format!("{page}#{KEY}{VERSION}{}", URL_SAFE_NO_PAD.encode(packed));
    if link.chars().count() > MAX_LINK_CHARS {
        return fail(format!(
            "the link would be {} characters long, more than the {MAX_LINK_CHARS} a link may have; \
             share the model file instead, or make its data smaller",
            link.chars().count()
        ));
    }
    Ok(link)
}

/// Read a link, or just its fragment, and validate what it carries.
pub fn decode(link: &str) -> Result<Shared, LinkError> {
    let chars = link.chars().count();
    if chars > MAX_LINK_CHARS {
        return fail(format!("the link is {chars} characters long, more than the {MAX_LINK_CHARS} accepted"));
    }
    let fragment = link.split_once('#').map_or(link, |(_, f)| f);
    let Some(payload) = fragment.split('&').find_map(|part| part.strip_prefix(KEY)) else {
        return fail("this link does not carry a mixwell run (no `run=` in the part after `#`)");
    };
    let Some(encoded) = payload.strip_prefix(VERSION) else {
        return fail("this link comes from another version of mixwell, or is damaged (unknown format)");
    };
    let packed = URL_SAFE_NO_PAD.decode(encoded.trim()).map_err(|_| {
        LinkError("the link is damaged: its contents are not valid (perhaps cut short when copied)".into())
    })?;
    let json = miniz_oxide::inflate::decompress_to_vec_with_limit(&packed, MAX_UNPACKED_BYTES).map_err(|e| {
        LinkError(match e.status {
            miniz_oxide::inflate::TINFLStatus::HasMoreOutput => {
                format!("the link unpacks to more than {MAX_UNPACKED_BYTES} bytes; refusing it")
            }
            _ => "the link is damaged: its contents do not unpack (perhaps cut short when copied)".into(),
        })
    })?;
    let shared: Shared = serde_json::from_slice(&json)
        .map_err(|e| LinkError(format!("the link is damaged or from another version of mixwell: {e}")))?;
    shared
        .run
        .validate()
        .map_err(|e| LinkError(format!("the link asks for a run that cannot be made: {}", e.message)))?;
    Ok(shared)
}

#[cfg(test)]
mod tests;
