//! Fuzz the one parser of typed values (`quantity::parse_value`, every `ValueKind`) and the
//! ambient-range parser. The first byte picks the kind; the rest is the text.
//!
//! Beyond "no panic", each accepted value is checked: finite, and for resistances in the range
//! the RKM formatter prints, the RKM code reads back to the same value within its 3 digits.
#![no_main]

use libfuzzer_sys::fuzz_target;
use pinlow::quantity::{
    format_engineering, format_rkm, parse_temperature_range, parse_value, ValueKind,
};

fuzz_target!(|data: &[u8]| {
    let Some((&selector, rest)) = data.split_first() else {
        return;
    };
    let text = String::from_utf8_lossy(rest);
    let kind = ValueKind::ALL[usize::from(selector) % ValueKind::ALL.len()];
    match parse_value(&text, kind) {
        Ok(v) => {
            assert!(v.is_finite(), "{text:?} as {kind:?} gave {v}");
            let _ = format_engineering(v, "V");
            let code = format_rkm(v);
            if kind == ValueKind::Resistance && (1e-3..1e12).contains(&v.abs()) {
                let back = parse_value(&code, ValueKind::Resistance)
                    .unwrap_or_else(|e| panic!("{v} printed as {code:?} does not read back: {e}"));
                // Three significant digits: the round trip is within half a unit of the third.
                assert!(
                    (back - v).abs() <= 5e-3 * v.abs(),
                    "{v} -> {code:?} -> {back}"
                );
            }
        }
        Err(e) => {
            // The message must render (it quotes the input).
            let _ = e.to_string();
        }
    }
    match parse_temperature_range(&text) {
        Ok((lo, hi)) => {
            assert!(lo.is_finite() && hi.is_finite(), "{text:?} gave {lo}..{hi}");
            assert!(lo <= hi, "{text:?} gave {lo}..{hi}");
        }
        Err(e) => {
            let _ = e.to_string();
        }
    }
});
