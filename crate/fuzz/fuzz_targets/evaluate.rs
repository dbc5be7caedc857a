//! A valid model evaluated at hostile points: NaN, ±∞, huge and tiny coordinates must give a
//! number (−∞ and NaN included) from `log_density` and `write_draw`, never a panic.
//!
//! Input layout: one byte `k`, then `k` little-endian f64 values, then the model text. θ repeats
//! the `k` values over its coordinates (zeros when `k` is 0). The seed corpus (`seeds/evaluate`)
//! holds every example model behind a few hostile value blocks, so mutations start from models
//! that check.
#![no_main]

use libfuzzer_sys::fuzz_target;
use mixwell::model::check;
use mixwell::tape::Tape;

fuzz_target!(|data: &[u8]| {
    let Some((&k, rest)) = data.split_first() else { return };
    let k = usize::from(k);
    if rest.len() < 8 * k {
        return;
    }
    let (head, text) = rest.split_at(8 * k);
    let values: Vec<f64> =
        head.chunks_exact(8).map(|b| f64::from_le_bytes(b.try_into().expect("chunks of eight"))).collect();
    let text = String::from_utf8_lossy(text);
    let Ok(model) = check(&text) else { return };
    let tape = Tape::new(&model);
    let theta: Vec<f64> =
        (0..tape.dim()).map(|i| if values.is_empty() { 0.0 } else { values[i % values.len()] }).collect();
    let mut scratch = tape.scratch();
    let mut draw = vec![0.0; tape.columns().len()];
    let first = tape.log_density(&theta, &mut scratch);
    tape.write_draw(&theta, &mut scratch, &mut draw);
    // The same point again on the used scratch: evaluations must not depend on what ran before.
    let again = tape.log_density(&theta, &mut scratch);
    assert!(first.to_bits() == again.to_bits() || (first.is_nan() && again.is_nan()), "{first} then {again}");
    // The reversed point, then the constrain/unconstrain round trip on the draw's parameters.
    let reversed: Vec<f64> = theta.iter().rev().copied().collect();
    let _ = tape.log_density(&reversed, &mut scratch);
    tape.write_draw(&reversed, &mut scratch, &mut draw);
    let values = tape.constrain(&theta);
    let _ = tape.unconstrain(&values);
});
