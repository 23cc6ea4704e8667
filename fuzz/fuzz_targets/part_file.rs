//! Fuzz the part-file loader: JSON text -> `PartRecord` -> validated `Part`, then the part's
//! look-ups at a spread of collector currents.
#![no_main]

use libfuzzer_sys::fuzz_target;
use pinlow::error::parse_json;
use pinlow::parts::{part_from_record, PartRecord, PartSource};
use pinlow::quantity::{amps, Base};

fuzz_target!(|data: &[u8]| {
    let Ok(text) = std::str::from_utf8(data) else {
        return;
    };
    let rec: PartRecord = match parse_json("fuzz.json", text) {
        Ok(r) => r,
        Err(e) => {
            let _ = e.to_string();
            return;
        }
    };
    let part = match part_from_record(&rec, "fuzz.json", PartSource::Builtin("fuzz.json")) {
        Ok(p) => p,
        Err(e) => {
            let _ = e.to_string();
            return;
        }
    };
    for ic in [0.0, 1e-300, 1e-6, 1e-3, 0.05, 1.0, 1e3, 1e300] {
        let g = part.gain_min_at(amps(ic));
        assert!(!g.is_nan(), "gain at {ic} A is NaN");
        let _ = part.gain_max_at(amps(ic));
        let v = part.vce_sat_max_at(amps(ic)).base();
        assert!(!v.is_nan(), "VCE(sat) at {ic} A is NaN");
        let (lo, hi) = part.vbe_sat_at(amps(ic));
        assert!(lo.base() <= hi.base(), "VBE(sat) min above max at {ic} A");
    }
});
