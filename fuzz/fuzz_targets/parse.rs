//! Fuzz target: the notation parser must return a value or an error with a valid span, never panic.
#![no_main]

use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    if let Ok(text) = std::str::from_utf8(data) {
        match couplet::notation::parse_input(text) {
            Ok(input) => {
                // What was read must display and read back to the same value.
                if let couplet::notation::Input::Equation(eq) = input {
                    let again = couplet::notation::parse_equation(&eq.ascii())
                        .expect("canonical text parses");
                    assert_eq!(again, eq);
                }
            }
            Err(error) => {
                assert!(error.span.start <= text.len());
                let _ = error.render();
            }
        }
    }
});
