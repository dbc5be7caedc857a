//! Arbitrary bytes as model text: parsing, checking and compiling must end in a model or in
//! diagnostics whose spans lie inside the text and which render, never in a panic, a hang or
//! unbounded memory.
#![no_main]

use libfuzzer_sys::fuzz_target;
use mixwell::model::check;
use mixwell::tape::Tape;

fuzz_target!(|data: &[u8]| {
    let text = String::from_utf8_lossy(data);
    match check(&text) {
        Ok(model) => {
            let tape = Tape::new(&model);
            // One evaluation at the origin, so what compiled also runs.
            let theta = vec![0.0; tape.dim()];
            let mut scratch = tape.scratch();
            let _ = tape.log_density(&theta, &mut scratch);
            let mut draw = vec![0.0; tape.columns().len()];
            tape.write_draw(&theta, &mut scratch, &mut draw);
        }
        Err(errors) => {
            let rendered = errors.render("fuzz.mw", &text);
            for d in errors.iter() {
                assert!(
                    d.span.start <= d.span.end && d.span.end <= text.len(),
                    "span {:?} outside a text of {} bytes: {}",
                    d.span,
                    text.len(),
                    d.message
                );
                assert!(rendered.contains(&d.message));
            }
        }
    }
});
