//! Share links: round trips, and every kind of damage refused with a clear message.

use super::*;
use crate::kernel::Settings;
use crate::plan::Tuning;
use crate::tune::policy::{BoConfig, Freeze};
use crate::tune::score::Score;

fn shared() -> Shared {
    Shared {
        model: "# <b>bold</b> & <script>alert(1)</script>\nmu : real\ndensity = normal(mu; 0, 1)\n".into(),
        run: RunConfig {
            chains: 4,
            warmup: 500,
            draws: 800,
            seed: 12_345_678_901_234,
            pilot: 200,
            settings: Settings::RandomWalk { scale: 1.682_943_751_122_901, blend: 0.388_994_716_649_519_84 },
            tuning: Tuning::None,
        },
    }
}

fn payload_link(bytes: &[u8]) -> String {
    format!("http://x/#run=mw1.{}", URL_SAFE_NO_PAD.encode(miniz_oxide::deflate::compress_to_vec(bytes, 9)))
}

#[test]
fn a_link_carries_the_run_exactly() {
    let link = encode(&shared(), "http://127.0.0.1:8000/index.html#old").expect("encodes");
    assert!(link.starts_with("http://127.0.0.1:8000/index.html#run=mw1."), "{link}");
    assert_eq!(decode(&link), Ok(shared()));
    // The fragment alone is enough, and other fragment parts are ignored.
    let fragment = link.split_once('#').map(|(_, f)| f).unwrap_or_default();
    assert_eq!(decode(&format!("view=plots&{fragment}")), Ok(shared()));
}

#[test]
fn damaged_links_are_refused_with_a_reason() {
    let link = encode(&shared(), "http://x/").expect("encodes");
    let message = |l: &str| decode(l).expect_err("must be refused").0;
    assert!(message(&link[..link.len() - 20]).contains("damaged"));
    let mut flipped = link.clone().into_bytes();
    let at = flipped.len() - 30;
    flipped[at] = if flipped[at] == b'A' { b'B' } else { b'A' };
    assert!(message(&String::from_utf8(flipped).expect("ascii")).contains("damaged"));
    assert!(message("http://x/#run=mw1.%%%%").contains("damaged"));
    assert!(message("http://x/#run=mw9.abc").contains("another version"));
    assert!(message("http://x/#view=1").contains("does not carry"));
    assert!(message(&format!("http://x/#run=mw1.{}", "A".repeat(MAX_LINK_CHARS))).contains("characters long"));
    assert!(message(&payload_link(b"{not json")).contains("damaged or from another version"));
}

#[test]
fn decompression_bombs_are_refused() {
    let bomb = vec![b' '; 8 * MAX_UNPACKED_BYTES];
    let link = payload_link(&bomb);
    assert!(link.len() < MAX_LINK_CHARS, "the bomb itself is small: {}", link.len());
    assert!(decode(&link).expect_err("refused").0.contains("unpacks to more than"));
}

#[test]
fn runs_that_cannot_be_made_are_refused() {
    for (field, value) in [("chains", "0"), ("draws", "1"), ("chains", "100000"), ("warmup", "1e30")] {
        let mut json = serde_json::to_value(shared()).expect("serialises");
        json["run"][field] = serde_json::from_str(value).expect("number");
        let error = decode(&payload_link(json.to_string().as_bytes())).expect_err("refused").0;
        assert!(error.contains("cannot be made") || error.contains("damaged"), "{field}={value}: {error}");
    }
    let mut json = serde_json::to_value(shared()).expect("serialises");
    json["run"]["settings"]["settings"]["scale"] = serde_json::json!(-1.0);
    assert!(decode(&payload_link(json.to_string().as_bytes())).expect_err("refused").0.contains("scale"));
}

#[test]
fn links_too_long_to_share_are_not_made() {
    let mut big = shared();
    // Incompressible digits: a data list far beyond what a link can carry.
    let mut state = 1u64;
    let numbers: Vec<String> = (0..40_000)
        .map(|_| {
            state = state.wrapping_mul(6364136223846793005).wrapping_add(1442695040888963407);
            format!("{}", state >> 40)
        })
        .collect();
    big.model = format!("y = [{}]\n{}", numbers.join(", "), big.model);
    assert!(encode(&big, "http://x/").expect_err("too long").0.contains("more than"));
}

/// Links made before the run configuration moved to `plan` (tests/golden/earlier_links.json)
/// carry the runs that version built from their flags.
#[test]
fn links_made_by_the_earlier_version_still_carry_the_same_runs() {
    // The default run for the bakery's two coordinates, as that version built it.
    let standard = || RunConfig {
        chains: 4,
        warmup: 1000,
        draws: 1000,
        seed: 0,
        pilot: 200,
        settings: Settings::RandomWalk { scale: 1.682_914_139_223_982_8, blend: 1.0 },
        tuning: Tuning::Bo(BoConfig { score: Score::EssPerEval, trials: 100, window: 100, freeze: Freeze::Best }),
    };
    let expected = [
        RunConfig {
            chains: 3,
            warmup: 150,
            draws: 300,
            seed: 424_242,
            pilot: 120,
            settings: Settings::Slice { width: 3.0, stepout: 20 },
            tuning: Tuning::Bo(BoConfig { score: Score::Acf, trials: 9, window: 40, freeze: Freeze::Mixture }),
        },
        RunConfig { seed: 7, tuning: Tuning::Rm { steps: 320 }, ..standard() },
        RunConfig { chains: 2, seed: 9_007_199_254_740_991, tuning: Tuning::Am { steps: 10_000 }, ..standard() },
        RunConfig {
            seed: 31_337,
            settings: Settings::Slice { width: 2.5, stepout: 12 },
            tuning: Tuning::None,
            ..standard()
        },
        RunConfig { seed: 1, settings: Settings::RandomWalk { scale: 0.5, blend: 0.25 }, ..standard() },
        RunConfig { seed: 5, ..standard() },
    ];
    let model =
        std::fs::read_to_string(concat!(env!("CARGO_MANIFEST_DIR"), "/../examples/bakery.mw")).expect("the example");
    let fixture: serde_json::Value =
        serde_json::from_str(include_str!("../../../tests/golden/earlier_links.json")).expect("JSON");
    let links = fixture["links"].as_array().expect("a list");
    assert_eq!(links.len(), expected.len());
    for (entry, run) in links.iter().zip(expected) {
        let (flags, link) = (entry["flags"].as_str().unwrap_or_default(), entry["link"].as_str().unwrap_or_default());
        let shared = decode(link).unwrap_or_else(|e| panic!("{flags}: {e}"));
        assert_eq!(shared.run, run, "{flags}");
        assert_eq!(shared.model, model, "{flags}");
        assert_eq!(decode(&encode(&shared, "http://x/").expect("encodes")), Ok(shared), "{flags}: and round trips");
    }
}
