//! Fuzz target: text to balanced reaction to JSON, as `couplet balance --json -` does it. Any
//! input must give a result or an error, never a panic; a balanced result must conserve every
//! element and the charge, and its JSON object must be one valid line.
#![no_main]

use couplet::balance::{BalanceOptions, ElectronRule, Medium, balance_text};
use couplet::export::balance_json::BalanceJson;
use libfuzzer_sys::fuzz_target;

#[path = "common.rs"]
mod common;

fuzz_target!(|data: &[u8]| {
    // The first byte picks the medium and the electron rule; the rest is the equation.
    let Some((mode, text)) = common::mode_and_text(data) else {
        return;
    };
    let medium = [Medium::None, Medium::Acid, Medium::Base][usize::from(mode % 3)];
    let electrons = [
        ElectronRule::HalfReactions,
        ElectronRule::Always,
        ElectronRule::Never,
    ][usize::from(mode / 3 % 3)];
    let options = BalanceOptions {
        medium,
        electrons,
        ..BalanceOptions::default()
    };
    let result = balance_text(text, &options);
    if let Ok(balanced) = &result {
        assert!(balanced.reaction().imbalance().is_balanced(), "{text}");
    }
    let mut out = Vec::new();
    BalanceJson::new().write(&mut out, text, Some(1), medium, &result);
    let line = std::str::from_utf8(&out).expect("the JSON is UTF-8");
    assert_eq!(line.matches('\n').count(), 1, "one object per line: {line}");
    serde_json::from_str::<serde_json::Value>(line).expect("the JSON object parses");
});
