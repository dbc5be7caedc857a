//! Arbitrary input as a share link: decoding must end in a validated run or a clear error, never
//! a panic, a hang or unbounded memory (links come from strangers). The first byte chooses how
//! the rest is read: as link text as it is, or as the contents a link packs (so the JSON and the
//! validation behind the base64 and deflate layers are reached too).
#![no_main]

use base64::Engine as _;
use libfuzzer_sys::fuzz_target;
use mixwell::link::decode;
use mixwell::model::check;

fuzz_target!(|data: &[u8]| {
    let Some((&mode, rest)) = data.split_first() else { return };
    let link = if mode % 2 == 0 {
        String::from_utf8_lossy(rest).into_owned()
    } else {
        let packed = miniz_oxide::deflate::compress_to_vec(rest, 6);
        format!("http://x/#run=mw1.{}", base64::engine::general_purpose::URL_SAFE_NO_PAD.encode(packed))
    };
    match decode(&link) {
        Ok(shared) => {
            assert!(shared.run.validate().is_ok(), "a decoded run is valid");
            let _ = check(&shared.model);
        }
        Err(e) => assert!(!e.0.is_empty(), "an error says something"),
    }
});
