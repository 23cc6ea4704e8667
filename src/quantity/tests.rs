//! Tests of the value parser and formatters.
use super::*;
use crate::eseries::Series;
use ValueKind::*;

fn ok(text: &str, kind: ValueKind) -> f64 {
    match parse_value(text, kind) {
        Ok(v) => v,
        Err(e) => panic!("`{text}` as {kind:?} refused: {e}"),
    }
}

/// Parse must fail, and the reason must contain `needle`.
fn refused(text: &str, kind: ValueKind, needle: &str) -> ParseValueError {
    match parse_value(text, kind) {
        Ok(v) => panic!("`{text}` as {kind:?} accepted as {v}"),
        Err(e) => {
            assert_eq!(e.kind, kind);
            assert!(
                e.reason.contains(needle),
                "`{text}`: reason `{}` lacks `{needle}`",
                e.reason
            );
            e
        }
    }
}

#[test]
fn plain_numbers() {
    assert_eq!(ok("12", Voltage), 12.0);
    assert_eq!(ok("0.25", Power), 0.25);
    assert_eq!(ok("1e-3", Current), 0.001);
    assert_eq!(ok("1E3", Resistance), 1000.0);
    assert_eq!(ok("2.5e+2", Plain), 250.0);
    assert_eq!(ok("+5", Voltage), 5.0);
    assert_eq!(ok(".5", Fraction), 0.5);
    assert_eq!(ok("2.", Plain), 2.0);
    assert_eq!(ok("0", Current), 0.0);
}

#[test]
fn negative_numbers_parse_for_every_kind() {
    assert_eq!(ok("-40", Temperature), -40.0);
    assert_eq!(ok("-40C", Temperature), -40.0);
    assert_eq!(ok("\u{2212}40 °C", Temperature), -40.0); // unicode minus sign
    assert_eq!(ok("-12V", Voltage), -12.0);
    assert_eq!(ok("-20mA", Current), -0.02);
    assert_eq!(ok("-4.7k", Resistance), -4700.0);
    assert_eq!(ok("-4k7", Resistance), -4700.0);
    assert_eq!(ok("-0.5", Plain), -0.5);
    assert_eq!(ok("-5%", Fraction), -0.05);
}

#[test]
fn whitespace_around_and_between_number_and_unit() {
    assert_eq!(ok("20 mA", Current), 0.02);
    assert_eq!(ok("3.3 V", Voltage), 3.3);
    assert_eq!(ok("  12V\t", Voltage), 12.0);
    assert_eq!(ok("470 ohm", Resistance), 470.0);
    assert_eq!(ok("4.7 k", Resistance), 4700.0);
    assert_eq!(ok("-40 °C", Temperature), -40.0);
    assert_eq!(ok("5 %", Fraction), 0.05);
}

#[test]
fn si_prefixes() {
    assert_eq!(ok("100pH", Inductance), 100e-12);
    assert_eq!(ok("100nH", Inductance), 100e-9);
    assert_eq!(ok("4.7uH", Inductance), 4.7e-6);
    assert_eq!(ok("4.7\u{b5}H", Inductance), 4.7e-6); // micro sign
    assert_eq!(ok("4.7\u{3bc}H", Inductance), 4.7e-6); // greek mu
    assert_eq!(ok("3300mV", Voltage), 3.3);
    assert_eq!(ok("1kV", Voltage), 1000.0);
    assert_eq!(ok("2MV", Voltage), 2e6);
    assert_eq!(ok("1GΩ", Resistance), 1e9);
    assert_eq!(ok("250mW", Power), 0.25);
    assert_eq!(ok("1ms", Time), 0.001);
    assert_eq!(ok("10us", Time), 10e-6);
    assert_eq!(ok("5ns", Time), 5e-9);
    assert_eq!(ok("200mH", Inductance), 0.2);
    assert_eq!(ok("1e3mA", Current), 1.0);
}

#[test]
fn m_is_milli_and_capital_m_is_mega() {
    assert_eq!(ok("2m2", Resistance), 0.0022);
    assert_eq!(ok("2M2", Resistance), 2.2e6);
    assert_eq!(ok("1m", Resistance), 0.001);
    assert_eq!(ok("1M", Resistance), 1e6);
    assert_eq!(ok("1mV", Voltage), 0.001);
    assert_eq!(ok("1MV", Voltage), 1e6);
}

#[test]
fn unit_symbols_per_kind() {
    assert_eq!(ok("12V", Voltage), 12.0);
    assert_eq!(ok("12v", Voltage), 12.0);
    assert_eq!(ok("1.5A", Current), 1.5);
    assert_eq!(ok("20ma", Current), 0.02);
    for text in [
        "470ohm",
        "470ohms",
        "470 Ohms",
        "470OHM",
        "470Ω",
        "470\u{2126}",
        "470R",
    ] {
        assert_eq!(ok(text, Resistance), 470.0, "{text}");
    }
    assert_eq!(ok("470r", Resistance), 470.0);
    assert_eq!(ok("4.7kΩ", Resistance), 4700.0);
    assert_eq!(ok("4.7kohm", Resistance), 4700.0);
    assert_eq!(ok("0.25W", Power), 0.25);
    assert_eq!(ok("85C", Temperature), 85.0);
    assert_eq!(ok("85°C", Temperature), 85.0);
    assert_eq!(ok("85℃", Temperature), 85.0);
    assert_eq!(ok("0.2H", Inductance), 0.2);
    assert_eq!(ok("0.001s", Time), 0.001);
    assert_eq!(ok("2m", Length), 2.0);
    assert_eq!(ok("5%", Fraction), 0.05);
}

#[test]
fn prefix_alone_for_resistance() {
    assert_eq!(ok("4.7k", Resistance), 4700.0);
    assert_eq!(ok("4.7K", Resistance), 4700.0);
    assert_eq!(ok("2.2M", Resistance), 2.2e6);
    assert_eq!(ok("470", Resistance), 470.0);
    assert_eq!(ok("1G", Resistance), 1e9);
    assert_eq!(ok("100m", Resistance), 0.1);
}

// RKM code: IEC 60062 (letter and code for resistance values), a letter as the decimal point.
#[test]
fn rkm_resistance() {
    assert_eq!(ok("4k7", Resistance), 4700.0);
    assert_eq!(ok("4K7", Resistance), 4700.0);
    assert_eq!(ok("R47", Resistance), 0.47);
    assert_eq!(ok("r47", Resistance), 0.47);
    assert_eq!(ok("R047", Resistance), 0.047);
    assert_eq!(ok("4R7", Resistance), 4.7);
    assert_eq!(ok("2M2", Resistance), 2.2e6);
    assert_eq!(ok("1k", Resistance), 1000.0);
    assert_eq!(ok("1G5", Resistance), 1.5e9);
    assert_eq!(ok("10k5", Resistance), 10_500.0);
    assert_eq!(ok("4k7Ω", Resistance), 4700.0);
    assert_eq!(ok("4k7 ohm", Resistance), 4700.0);
}

// RKM code (IEC 60062 style) with the unit letter or a prefix as the decimal point.
#[test]
fn rkm_other_kinds() {
    assert_eq!(ok("3V3", Voltage), 3.3);
    assert_eq!(ok("3v3", Voltage), 3.3);
    assert_eq!(ok("3m3", Voltage), 0.0033);
    assert_eq!(ok("1A5", Current), 1.5);
    assert_eq!(ok("2m5", Current), 0.0025);
    assert_eq!(ok("2m5A", Current), 0.0025);
    assert_eq!(ok("0W25", Power), 0.25);
    assert_eq!(ok("4u7", Inductance), 4.7e-6);
    assert_eq!(ok("1m5", Time), 0.0015);
}

#[test]
fn lengths_read_m_as_metres() {
    assert_eq!(ok("500mm", Length), 0.5);
    assert_eq!(ok("2m", Length), 2.0);
    assert_eq!(ok("2", Length), 2.0);
    assert_eq!(ok("50cm", Length), 0.5);
    assert_eq!(ok("1.5 km", Length), 1500.0);
}

#[test]
fn fractions() {
    assert_eq!(ok("0.05", Fraction), 0.05);
    assert_eq!(ok("5%", Fraction), 0.05);
    assert_eq!(ok("100%", Fraction), 1.0);
    assert_eq!(ok("0.5%", Fraction), 0.005);
}

#[test]
fn plain_kind() {
    assert_eq!(ok("2", Plain), 2.0);
    assert_eq!(ok("2.5", Plain), 2.5);
    refused("2V", Plain, "takes no unit");
    refused("2%", Plain, "takes no unit");
    refused("2k", Plain, "takes no unit");
}

#[test]
fn rejects_empty_and_non_finite() {
    refused("", Voltage, "no value");
    refused("   \t", Current, "no value");
    refused("NaN", Plain, "NaN");
    refused("nan", Voltage, "NaN");
    refused("inf", Voltage, "infinity");
    refused("-Infinity", Temperature, "infinity");
    refused("INF", Resistance, "infinity");
    refused("1e999", Plain, "too large");
    refused("-1e999V", Voltage, "too large");
    refused("1e308k", Resistance, "too large");
}

#[test]
fn rejects_trailing_junk() {
    refused("12Vx", Voltage, "unexpected `x` after `V`");
    refused("4k7z", Resistance, "unexpected `z`");
    refused("12 V V", Voltage, "unexpected ` V`");
    refused("3V3V", Voltage, "unexpected `V`");
    refused("4R7k", Resistance, "unexpected `k`");
    refused("1 2", Plain, "`2`");
    refused("2m5", Length, "unexpected `5`");
    refused("500mmm", Length, "unexpected `m`");
}

#[test]
fn rejects_unit_of_the_wrong_kind() {
    let e = refused("20mA", Voltage, "a current");
    assert!(e.reason.contains("unit V"), "{}", e.reason);
    assert!(e.reason.contains("a voltage"), "{}", e.reason);
    refused("12 ohm", Voltage, "a resistance");
    refused("5mm", Voltage, "a length");
    refused("12V", Current, "unit A");
    refused("1ms", Inductance, "unit H");
    refused("3A3", Voltage, "`A3`");
}

#[test]
fn rejects_malformed_numbers() {
    refused("1.2.3", Plain, "two decimal points");
    refused("1..2", Voltage, "two decimal points");
    refused("4k7.5", Resistance, "two decimal points");
    refused("4.7k7", Resistance, "cannot also have a decimal point");
    refused("1e3k5", Resistance, "exponent");
    refused("1,5", Voltage, "decimal point");
    refused("mA", Current, "no number");
    refused("V", Voltage, "no number");
    refused("R", Resistance, "no number");
    refused("k47", Resistance, "no number");
    refused("-", Plain, "no number");
    refused("+-5", Plain, "no number");
    refused(".", Plain, "no digits");
    refused("- 5", Plain, "no number");
}

#[test]
fn rejects_misplaced_prefixes_and_percent() {
    refused("5%", Voltage, "only accepted for fractions");
    refused("20m", Current, "prefix alone");
    refused("20m", Current, "`mA`");
    refused("1KV", Voltage, "lowercase `k`");
    refused("300K", Temperature, "°C");
    refused("100°F", Temperature, "°C");
    refused("5mC", Temperature, "°C");
    refused("12 volts", Voltage, "unexpected `olts` after `v`");
}

#[test]
fn rejects_very_long_input_without_echoing_it_all() {
    let long = "1".repeat(10_000);
    let e = refused(&long, Plain, "too long");
    assert!(e.input.chars().count() < 100);
    let unicode = "µ".repeat(5_000);
    let e = refused(&unicode, Current, "too long");
    assert!(e.input.ends_with('…'));
}

#[test]
fn error_message_names_input_kind_and_forms() {
    let e = refused("20mA", Voltage, "a current");
    let msg = e.to_string();
    assert!(msg.contains("`20mA`"), "{msg}");
    assert!(msg.contains("a voltage"), "{msg}");
    assert!(msg.contains(accepted_forms(Voltage)), "{msg}");
    assert_eq!(e.input, "20mA");
}

#[test]
fn every_accepted_example_parses() {
    // The forms promised in error messages must themselves be accepted.
    let kinds = ValueKind::ALL;
    for kind in kinds {
        assert!(!kind_name(kind).is_empty());
        for example in accepted_forms(kind).split(", ") {
            assert!(ok(example, kind).is_finite(), "{example}");
        }
    }
    assert_eq!(kind_name(Inductance), "an inductance");
    assert_eq!(kind_name(Plain), "a number");
}

#[test]
fn never_panics_on_odd_input() {
    let pieces = [
        "0", "1", "9", ".", "e", "E", "-", "+", "k", "K", "R", "m", "M", "µ", "Ω", "%", "V", "A",
        " ", "°", "C", "\u{301}", "é", "😀", "\u{0}", "..",
    ];
    let kinds = ValueKind::ALL;
    let mut tried = 0;
    for a in pieces {
        for b in pieces {
            for c in pieces {
                let text = format!("{a}{b}{c}");
                for kind in kinds {
                    match parse_value(&text, kind) {
                        Ok(v) => assert!(v.is_finite(), "{text}"),
                        Err(e) => assert!(!e.reason.is_empty(), "{text}"),
                    }
                    tried += 1;
                }
                if let Ok((lo, hi)) = parse_temperature_range(&text) {
                    assert!(lo <= hi);
                }
            }
        }
    }
    assert_eq!(tried, pieces.len().pow(3) * kinds.len());
}

#[test]
fn temperature_ranges() {
    assert_eq!(parse_temperature_range("-40..85"), Ok((-40.0, 85.0)));
    assert_eq!(parse_temperature_range("-40C..85C"), Ok((-40.0, 85.0)));
    assert_eq!(parse_temperature_range("-40 .. 85 °C"), Ok((-40.0, 85.0)));
    assert_eq!(parse_temperature_range("-40°C..-10°C"), Ok((-40.0, -10.0)));
    assert_eq!(parse_temperature_range("25..25"), Ok((25.0, 25.0)));
    assert_eq!(parse_temperature_range("0.5..1.5"), Ok((0.5, 1.5)));
}

#[test]
fn bad_temperature_ranges() {
    let check = |text: &str, needle: &str| match parse_temperature_range(text) {
        Ok(r) => panic!("`{text}` accepted as {r:?}"),
        Err(e) => {
            assert!(e.reason.contains(needle), "`{text}`: {}", e.reason);
            assert_eq!(e.kind, Temperature);
            assert_eq!(e.input, text);
        }
    };
    check("85..-40", "above");
    check("-40", "expected a range");
    check("", "expected a range");
    check("-40...85", "two dots");
    check("..85", "lower end: no value");
    check("-40..", "upper end: no value");
    check("-40..85..100", "more than one");
    check("-40V..85", "lower end");
    check("-40..hot", "upper end");
}

#[test]
fn engineering_format() {
    assert_eq!(format_engineering(0.00274, "A"), "2.74 mA");
    assert_eq!(format_engineering(4700.0, "Ω"), "4.7 kΩ");
    assert_eq!(format_engineering(12.0, "V"), "12 V");
    assert_eq!(format_engineering(0.0, "A"), "0 A");
    assert_eq!(format_engineering(-0.0, "A"), "0 A");
    assert_eq!(format_engineering(-0.5, "V"), "-500 mV");
    assert_eq!(format_engineering(0.1, "A"), "100 mA");
    assert_eq!(format_engineering(1.0, "V"), "1 V");
    assert_eq!(format_engineering(12_345.0, "Ω"), "12.3 kΩ");
    assert_eq!(format_engineering(4.7e-6, "H"), "4.7 µH");
    assert_eq!(format_engineering(3.3e-9, "s"), "3.3 ns");
    assert_eq!(format_engineering(15e-12, "s"), "15 ps");
    assert_eq!(format_engineering(2.2e6, "Ω"), "2.2 MΩ");
    assert_eq!(format_engineering(1.5e9, "Ω"), "1.5 GΩ");
    assert_eq!(format_engineering(12.0, ""), "12");
    assert_eq!(format_engineering(4700.0, ""), "4.7 k");
}

#[test]
fn engineering_format_rounding_and_extremes() {
    assert_eq!(format_engineering(999.7, "V"), "1 kV");
    assert_eq!(format_engineering(0.99996, "A"), "1 A");
    assert_eq!(format_engineering(1.23456, "W"), "1.23 W");
    assert_eq!(format_engineering(1e-15, "A"), "0.001 pA");
    assert_eq!(format_engineering(1.5e12, "W"), "1500 GW");
    assert_eq!(format_engineering(f64::NAN, "A"), "-");
    assert_eq!(format_engineering(f64::INFINITY, "A"), "-");
    assert_eq!(format_engineering(f64::NEG_INFINITY, "A"), "-");
}

#[test]
fn engineering_format_reads_back() {
    for v in Series::E24.values() {
        let ohms = v.base();
        let text = format_engineering(ohms, "Ω");
        assert_eq!(ok(&text, Resistance), ohms, "{text}");
    }
}

// RKM code output per IEC 60062.
#[test]
fn rkm_format() {
    assert_eq!(format_rkm(4700.0), "4k7");
    assert_eq!(format_rkm(0.47), "R47");
    assert_eq!(format_rkm(2.2e6), "2M2");
    assert_eq!(format_rkm(470.0), "470R");
    assert_eq!(format_rkm(10_000.0), "10k");
    assert_eq!(format_rkm(1000.0), "1k");
    assert_eq!(format_rkm(4.7), "4R7");
    assert_eq!(format_rkm(100e3), "100k");
    assert_eq!(format_rkm(1e6), "1M");
    assert_eq!(format_rkm(1.0), "1R");
    assert_eq!(format_rkm(22.0), "22R");
    assert_eq!(format_rkm(0.047), "R047");
    assert_eq!(format_rkm(1.5e9), "1G5");
    assert_eq!(format_rkm(12e9), "12G");
    assert_eq!(format_rkm(0.0), "0R");
    assert_eq!(format_rkm(-4700.0), "-4k7");
    assert_eq!(format_rkm(f64::NAN), "-");
    assert_eq!(format_rkm(f64::INFINITY), "-");
}

// IEC 60062 RKM codes hold at most three significant digits; values are rounded first.
#[test]
fn rkm_format_rounds_to_three_digits() {
    assert_eq!(format_rkm(4746.0), "4k75");
    assert_eq!(format_rkm(4744.0), "4k74");
    assert_eq!(format_rkm(999.6), "1k");
    assert_eq!(format_rkm(12_345.0), "12k3");
    assert_eq!(format_rkm(0.4699999), "R47");
}

#[test]
fn rkm_format_reads_back_for_every_series_value() {
    for series in Series::ALL {
        for v in series.values() {
            let ohms = v.base();
            let code = format_rkm(ohms);
            assert_eq!(ok(&code, Resistance), ohms, "{series} {code}");
        }
    }
}

#[test]
fn quantity_builders_round_trip() {
    assert_eq!(volts(3.3).base(), 3.3);
    assert_eq!(amps(0.02).base(), 0.02);
    assert_eq!(ohms(4700.0).base(), 4700.0);
    assert_eq!(watts(0.25).base(), 0.25);
    approx::assert_relative_eq!(celsius(-40.0).base(), -40.0, max_relative = 1e-12);
    assert_eq!(henries(0.2).base(), 0.2);
    assert_eq!(seconds(0.001).base(), 0.001);
    approx::assert_relative_eq!(kelvins(10.0).base(), 10.0);
    approx::assert_relative_eq!(kelvin_per_watt(62.5).base(), 62.5);
}
