//! Typed quantities used inside the crate, and the one parser of values a user types.
//!
//! Everything the user types (flags) goes through [`parse_value`]; everything inside the crate is a
//! `uom` quantity. Renderers turn quantities back into numbers with [`format_engineering`].

pub mod limits;

pub use uom::si::f64::{
    ElectricCurrent as Current, ElectricPotential as Voltage, ElectricalResistance as Resistance,
    Energy, Inductance, Length, Power, TemperatureInterval, ThermalResistance,
    ThermodynamicTemperature as Temperature, Time,
};

/// What kind of value a flag takes; decides which unit symbols are accepted.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum ValueKind {
    /// volts: `12`, `12V`, `3V3`, `3300mV`
    Voltage,
    /// amperes: `0.02`, `20mA`, `20 mA`, `1.5A`
    Current,
    /// ohms: `4.7k`, `4k7`, `R47`, `2M2`, `470R`, `470 ohm`, `470Ω`
    Resistance,
    /// watts: `0.25W`, `250mW`
    Power,
    /// degrees Celsius: `-40C`, `-40 °C`, `85`
    Temperature,
    /// henries: `0.2H`, `200mH`
    Inductance,
    /// seconds: `1ms`, `0.001s`
    Time,
    /// metres: `2m`, `2` (note: `m` alone after a number means metres here, not milli)
    Length,
    /// a fraction: `0.05`, `5%`
    Fraction,
    /// a bare number with no unit: `2`, `2.5`
    Plain,
}

impl ValueKind {
    /// Every kind, in declaration order.
    pub const ALL: [ValueKind; 10] = [
        ValueKind::Voltage,
        ValueKind::Current,
        ValueKind::Resistance,
        ValueKind::Power,
        ValueKind::Temperature,
        ValueKind::Inductance,
        ValueKind::Time,
        ValueKind::Length,
        ValueKind::Fraction,
        ValueKind::Plain,
    ];
}

/// A value the user typed could not be read.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[error("cannot read `{input}` as {what}: {reason}; accepted forms: {forms}", what = kind_name(*kind), forms = accepted_forms(*kind))]
pub struct ParseValueError {
    /// The text as typed.
    pub input: String,
    /// The kind of value that was expected.
    pub kind: ValueKind,
    /// Why it was refused, in a few words.
    pub reason: String,
}

/// Human name of a kind ("a voltage").
pub fn kind_name(kind: ValueKind) -> &'static str {
    match kind {
        ValueKind::Voltage => "a voltage",
        ValueKind::Current => "a current",
        ValueKind::Resistance => "a resistance",
        ValueKind::Power => "a power",
        ValueKind::Temperature => "a temperature",
        ValueKind::Inductance => "an inductance",
        ValueKind::Time => "a time",
        ValueKind::Length => "a length",
        ValueKind::Fraction => "a fraction",
        ValueKind::Plain => "a number",
    }
}

/// Examples of accepted forms for a kind, for error messages.
pub fn accepted_forms(kind: ValueKind) -> &'static str {
    match kind {
        ValueKind::Voltage => "12, 12V, 3.3 V, 3V3, 3300mV",
        ValueKind::Current => "0.02, 20mA, 20 mA, 2m5, 1.5A, 1A5",
        ValueKind::Resistance => "470, 470R, 4.7k, 4k7, R47, 2M2, 470 ohm, 4.7kΩ",
        ValueKind::Power => "0.25, 0.25W, 250mW, 0W25",
        ValueKind::Temperature => "85, -40, -40C, -40 °C",
        ValueKind::Inductance => "0.2, 0.2H, 200mH, 200 mH",
        ValueKind::Time => "0.001, 1ms, 1 ms, 0.001s",
        ValueKind::Length => "2, 2m, 500mm, 50cm",
        ValueKind::Fraction => "0.05, 5%",
        ValueKind::Plain => "2, 2.5, 1e-3",
    }
}

/// Longest input read, in bytes; nobody types a value longer than this.
const MAX_INPUT_BYTES: usize = 64;

/// Exponents are clamped to this size before the final conversion; anything that large
/// overflows to infinity or underflows to zero anyway.
const MAX_EXPONENT: i64 = 100_000;

/// SI prefixes shared by every kind that takes prefixes, with their power of ten.
const SI_PREFIXES: &[(&str, i32)] = &[
    ("p", -12),
    ("n", -9),
    ("u", -6),
    ("\u{b5}", -6),  // MICRO SIGN
    ("\u{3bc}", -6), // GREEK SMALL LETTER MU
    ("m", -3),
    ("k", 3),
    ("M", 6),
    ("G", 9),
];

/// The prefixes one kind accepts: `K` is kilo only for ohms, `c` (centi) only for lengths.
fn prefixes(kind: ValueKind) -> impl Iterator<Item = (&'static str, i32)> {
    let base: &'static [(&'static str, i32)] = match kind {
        ValueKind::Temperature | ValueKind::Fraction | ValueKind::Plain => &[],
        _ => SI_PREFIXES,
    };
    let extra: &'static [(&'static str, i32)] = match kind {
        ValueKind::Resistance => &[("K", 3)],
        ValueKind::Length => &[("c", -2)],
        _ => &[],
    };
    base.iter().chain(extra.iter()).copied()
}

/// Unit symbols a kind accepts. Letters that are not prefixes may be typed in either case.
fn unit_symbols(kind: ValueKind) -> &'static [&'static str] {
    match kind {
        ValueKind::Voltage => &["V", "v"],
        ValueKind::Current => &["A", "a"],
        ValueKind::Resistance => &[
            "ohms", "Ohms", "OHMS", "ohm", "Ohm", "OHM", "\u{3a9}", "\u{2126}", "R", "r",
        ],
        ValueKind::Power => &["W", "w"],
        ValueKind::Temperature => &["\u{b0}C", "\u{b0}c", "\u{2103}", "degC", "C", "c"],
        ValueKind::Inductance => &["H", "h"],
        ValueKind::Time => &["s"],
        ValueKind::Length => &["m"],
        ValueKind::Fraction => &["%"],
        ValueKind::Plain => &[],
    }
}

/// The unit named in error messages.
fn unit_label(kind: ValueKind) -> &'static str {
    match kind {
        ValueKind::Voltage => "V",
        ValueKind::Current => "A",
        ValueKind::Resistance => "Ω",
        ValueKind::Power => "W",
        ValueKind::Temperature => "°C",
        ValueKind::Inductance => "H",
        ValueKind::Time => "s",
        ValueKind::Length => "m",
        ValueKind::Fraction => "%",
        ValueKind::Plain => "no unit",
    }
}

/// Kinds whose values may be written as an RKM code with a prefix letter as decimal point.
fn rkm_allowed(kind: ValueKind) -> bool {
    matches!(
        kind,
        ValueKind::Voltage
            | ValueKind::Current
            | ValueKind::Resistance
            | ValueKind::Power
            | ValueKind::Inductance
            | ValueKind::Time
    )
}

/// The unit letter that may stand for the decimal point in an RKM code (`3V3`, `1A5`, `4R7`).
fn rkm_unit_letter(kind: ValueKind, c: char) -> bool {
    match kind {
        ValueKind::Voltage => matches!(c, 'V' | 'v'),
        ValueKind::Current => matches!(c, 'A' | 'a'),
        ValueKind::Power => matches!(c, 'W' | 'w'),
        ValueKind::Resistance => matches!(c, 'R' | 'r'),
        _ => false,
    }
}

/// If `s` starts with an RKM letter of `kind` followed by a digit, the letter's length in bytes
/// and its power of ten.
fn rkm_letter(s: &str, kind: ValueKind) -> Option<(usize, i32)> {
    if !rkm_allowed(kind) {
        return None;
    }
    let c = s.chars().next()?;
    let (len, exp) = if rkm_unit_letter(kind, c) {
        (c.len_utf8(), 0)
    } else {
        let (p, e) = prefixes(kind).find(|(p, _)| s.starts_with(p))?;
        (p.len(), e)
    };
    split_matched(s, len)
        .1
        .starts_with(|d: char| d.is_ascii_digit())
        .then_some((len, exp))
}

/// Split `s` after a prefix of `len` bytes that the caller matched (so `len` is a char boundary).
/// Never panics: were `len` not a boundary, nothing would be split off.
fn split_matched(s: &str, len: usize) -> (&str, &str) {
    s.split_at_checked(len).unwrap_or(("", s))
}

/// The longest unit (with optional prefix) at the start of `s`: (power of ten, bytes used).
/// A prefix without a unit counts only for resistances, and only when `bare_prefix` is set.
fn match_unit(s: &str, kind: ValueKind, bare_prefix: bool) -> Option<(i32, usize)> {
    let mut best: Option<(i32, usize)> = None;
    let mut consider = |exp: i32, len: usize| {
        if best.is_none_or(|(_, l)| len > l) {
            best = Some((exp, len));
        }
    };
    // `%` is the only unit that scales the number by itself (5% = 0.05).
    let unit_exp = |u: &str| if u == "%" { -2 } else { 0 };
    for u in unit_symbols(kind) {
        if s.starts_with(u) {
            consider(unit_exp(u), u.len());
        }
    }
    for (p, e) in prefixes(kind) {
        if let Some(after) = s.strip_prefix(p) {
            if bare_prefix && kind == ValueKind::Resistance {
                consider(e, p.len());
            }
            for u in unit_symbols(kind) {
                if after.starts_with(u) {
                    consider(e, p.len() + u.len());
                }
            }
        }
    }
    best
}

/// Why `suffix` (all the text after the number) is not a unit of `kind`.
fn explain_bad_unit(suffix: &str, kind: ValueKind) -> String {
    let name = kind_name(kind);
    let label = unit_label(kind);
    if kind == ValueKind::Plain {
        return format!("a plain number takes no unit, found `{suffix}`");
    }
    if suffix.starts_with('%') {
        return format!("`%` is only accepted for fractions; give {name} in {label}");
    }
    if suffix.starts_with(',') {
        return "use `.` as the decimal point, not `,`".to_string();
    }
    if kind == ValueKind::Temperature && matches!(suffix, "K" | "\u{b0}F" | "F") {
        return format!("`{suffix}` is not accepted; give the temperature in °C");
    }
    if let Some((p, _)) = prefixes(kind).find(|(p, _)| *p == suffix) {
        return format!("a prefix alone is only accepted for resistances; write the unit after `{p}`, e.g. `{p}{label}`");
    }
    for other in ValueKind::ALL.into_iter().filter(|k| *k != kind) {
        if match_unit(suffix, other, false).is_some_and(|(_, len)| len == suffix.len()) {
            return format!(
                "`{suffix}` is a unit of {}, but {name} was expected (unit {label})",
                kind_name(other)
            );
        }
    }
    if suffix.starts_with('K') {
        return format!(
            "`{suffix}` is not a unit of {name} (kilo is a lowercase `k`; unit {label})"
        );
    }
    format!("`{suffix}` is not a unit of {name} (expected {label})")
}

/// Take the longest run of ASCII digits at the start of `s`.
fn digits(s: &str) -> (&str, &str) {
    let end = s.find(|c: char| !c.is_ascii_digit()).unwrap_or(s.len());
    s.split_at(end)
}

/// A decimal number as typed: integer digits, fraction digits, exponent.
struct Number<'a> {
    int: &'a str,
    frac: &'a str,
    point: bool,
    exp: i64,
    has_exp: bool,
}

/// Read `[digits][.digits][e[+-]digits]` from the start of `s`; returns the number and the rest.
fn scan_number(s: &str) -> (Number<'_>, &str) {
    let (int, rest) = digits(s);
    let (point, frac, rest) = match rest.strip_prefix('.') {
        Some(after) => {
            let (frac, rest) = digits(after);
            (true, frac, rest)
        }
        None => (false, "", rest),
    };
    let mut number = Number {
        int,
        frac,
        point,
        exp: 0,
        has_exp: false,
    };
    if int.is_empty() && frac.is_empty() {
        return (number, rest);
    }
    if let Some(after_e) = rest.strip_prefix(['e', 'E']) {
        let (negative, unsigned) = match after_e.strip_prefix(['+', '-']) {
            Some(u) => (after_e.starts_with('-'), u),
            None => (false, after_e),
        };
        let (exp_digits, after) = digits(unsigned);
        if !exp_digits.is_empty() {
            let magnitude = exp_digits.bytes().fold(0i64, |acc, b| {
                (acc * 10 + i64::from(b - b'0')).min(MAX_EXPONENT)
            });
            number.exp = if negative { -magnitude } else { magnitude };
            number.has_exp = true;
            return (number, after);
        }
    }
    (number, rest)
}

/// `int.frac * 10^exp`, correctly rounded by the standard library's decimal reader.
fn decimal_value(int: &str, frac: &str, exp: i64) -> Option<f64> {
    let int = if int.is_empty() { "0" } else { int };
    let exp = exp.clamp(-MAX_EXPONENT, MAX_EXPONENT);
    format!("{int}.{frac}0e{exp}").parse::<f64>().ok()
}

/// [`parse_value`], then the range pinlow accepts for the kind ([`limits::span_of`]): a value
/// outside it is refused saying what it was read as, so that a prefix of the wrong case
/// (`50MA`, mega for milli) is seen at once.
pub fn parse_value_in_span(text: &str, kind: ValueKind) -> Result<f64, ParseValueError> {
    let v = parse_value(text, kind)?;
    let Some(span) = limits::span_of(kind) else {
        return Ok(v);
    };
    match span.reason(v) {
        None => Ok(v),
        Some(reason) if v.is_finite() && v > 0.0 => Err(ParseValueError {
            input: text.to_string(),
            kind,
            reason: format!(
                "it reads as {} = {} {}, and {reason} (m is milli, M is mega)",
                format_engineering(v, span.unit),
                limits::show_number(v),
                span.unit
            ),
        }),
        Some(_) => Ok(v),
    }
}

/// Parse text into a number in base SI units (V, A, ohm, W, degrees C, H, s, m; fractions as 0..1).
///
/// The number may carry a unit of its kind with an SI prefix (`20mA`, `20 mA`), or be an
/// IEC 60062 RKM code where a letter stands for the decimal point (`4k7`, `R47`, `3V3`, `2m5`).
/// Negative numbers are read for every kind; callers decide whether a sign is allowed.
pub fn parse_value(text: &str, kind: ValueKind) -> Result<f64, ParseValueError> {
    let fail = |reason: String| ParseValueError {
        input: text.to_string(),
        kind,
        reason,
    };
    let t = text.trim();
    if t.len() > MAX_INPUT_BYTES {
        // The longest run of whole characters that fits in the limit.
        let shown: String = t
            .char_indices()
            .take_while(|(i, c)| i + c.len_utf8() <= MAX_INPUT_BYTES)
            .map(|(_, c)| c)
            .collect();
        return Err(ParseValueError {
            input: format!("{shown}…"),
            kind,
            reason: format!("too long (more than {MAX_INPUT_BYTES} bytes)"),
        });
    }
    if t.is_empty() {
        return Err(fail("no value given".to_string()));
    }
    let (negative, unsigned) = match t.strip_prefix(['-', '\u{2212}']) {
        Some(rest) => (true, rest),
        None => (false, t.strip_prefix('+').unwrap_or(t)),
    };
    let lower = unsigned.to_ascii_lowercase();
    if lower.starts_with("nan") || lower.starts_with("inf") {
        return Err(fail("NaN and infinity are not values".to_string()));
    }
    let (number, rest) = scan_number(unsigned);

    let magnitude = if number.int.is_empty() && number.frac.is_empty() {
        // Only the resistance form `R47` may start without a digit.
        match rkm_letter(rest, kind) {
            Some((len, 0)) if kind == ValueKind::Resistance && !number.point => {
                read_rkm("", split_matched(rest, len).1, 0, kind).map_err(fail)?
            }
            _ if number.point => return Err(fail("no digits around the decimal point".into())),
            _ => return Err(fail("there is no number".to_string())),
        }
    } else if rest.starts_with('.') {
        return Err(fail("two decimal points".to_string()));
    } else if let Some((len, exp)) = rkm_letter(rest, kind) {
        let (letter, after_letter) = split_matched(rest, len);
        if number.point || number.has_exp {
            return Err(fail(format!(
                "`{letter}` is an RKM letter standing for the decimal point, so the number cannot also have a decimal point or exponent"
            )));
        }
        read_rkm(number.int, after_letter, exp, kind).map_err(fail)?
    } else {
        let suffix = rest.trim_start();
        let exp = if suffix.is_empty() {
            0
        } else if let Some((exp, len)) = match_unit(suffix, kind, true) {
            let (unit, after) = split_matched(suffix, len);
            if !after.is_empty() {
                return Err(fail(format!("unexpected `{after}` after `{unit}`")));
            }
            exp
        } else {
            return Err(fail(explain_bad_unit(suffix, kind)));
        };
        decimal_value(number.int, number.frac, number.exp + i64::from(exp))
            .ok_or_else(|| fail("not a number".to_string()))?
    };
    if !magnitude.is_finite() {
        return Err(fail("too large".to_string()));
    }
    Ok(if negative { -magnitude } else { magnitude })
}

/// The part of an RKM code after its letter: fraction digits, then (after a prefix letter only)
/// an optional unit symbol such as `4k7Ω` or `2m5A`.
fn read_rkm(int: &str, after_letter: &str, exp: i32, kind: ValueKind) -> Result<f64, String> {
    let (frac, rest) = digits(after_letter);
    if rest.starts_with('.') {
        return Err("two decimal points".to_string());
    }
    // Prefix letters all have a non-zero exponent; a zero exponent means a unit letter (`3V3`),
    // after which no unit may follow.
    let unit_letter = exp == 0;
    let tail = rest.trim_start();
    if !tail.is_empty() {
        let unit_len = unit_symbols(kind)
            .iter()
            .filter(|u| tail.starts_with(**u))
            .map(|u| u.len())
            .max();
        match unit_len {
            Some(len) if !unit_letter && len == tail.len() => {}
            Some(len) if !unit_letter => {
                return Err(format!(
                    "unexpected `{}` after the RKM code",
                    split_matched(tail, len).1
                ))
            }
            _ => return Err(format!("unexpected `{tail}` after the RKM code")),
        }
    }
    decimal_value(int, frac, i64::from(exp)).ok_or_else(|| "not a number".to_string())
}

/// Parse an ambient range such as `-40..85`, `-40C..85C` or `-40 .. 85 °C` into (min, max) in degrees C.
/// Refuses min above max.
pub fn parse_temperature_range(text: &str) -> Result<(f64, f64), ParseValueError> {
    let fail = |reason: String| ParseValueError {
        input: text.to_string(),
        kind: ValueKind::Temperature,
        reason,
    };
    if text.contains("...") {
        return Err(fail(
            "write the range with two dots, like -40..85".to_string(),
        ));
    }
    let Some((low, high)) = text.split_once("..") else {
        return Err(fail("expected a range such as -40..85".to_string()));
    };
    if high.contains("..") {
        return Err(fail("more than one `..` in the range".to_string()));
    }
    let low = parse_value(low, ValueKind::Temperature)
        .map_err(|e| fail(format!("lower end: {}", e.reason)))?;
    let high = parse_value(high, ValueKind::Temperature)
        .map_err(|e| fail(format!("upper end: {}", e.reason)))?;
    if low > high {
        return Err(fail(format!(
            "the lower end {low} °C is above the upper end {high} °C"
        )));
    }
    Ok((low, high))
}

/// A finite, non-negative value rounded to 3 significant digits: the digits as a number of 100
/// ..= 999 (0 for zero) and the decimal exponent of the first digit.
fn three_digits(v: f64) -> Option<(u16, i32)> {
    if !(v.is_finite() && v >= 0.0) {
        return None;
    }
    if v == 0.0 {
        return Some((0, 0));
    }
    // Scale to [100, 1000) and round; exact powers of ten keep decimal inputs such as 4700 or
    // 0.00274 exact. Far outside the prefix range, fall back to the exact decimal formatter.
    let mut exp = v.log10().floor() as i32;
    let shift = 2 - exp;
    let scaled = match EXACT_POW10_F64.get(shift.unsigned_abs() as usize) {
        Some(p) if shift >= 0 => v * p,
        Some(p) => v / p,
        None => return three_digits_exact(v),
    };
    // log10 can land one decade off right at a power of ten.
    let (mut m, scaled) = if scaled >= 999.5 {
        exp += 1;
        ((scaled / 10.0).round(), scaled / 10.0)
    } else if scaled < 99.5 {
        exp -= 1;
        ((scaled * 10.0).round(), scaled * 10.0)
    } else {
        (scaled.round(), scaled)
    };
    // A value within rounding noise of a half step goes to the exact formatter, which rounds
    // the true decimal value.
    if ((scaled - scaled.floor()) - 0.5).abs() < 1e-9 {
        return three_digits_exact(v);
    }
    if m >= 1000.0 {
        m = 100.0;
        exp += 1;
    }
    // 100 ..= 999 here.
    Some((m as u16, exp))
}

/// Exact powers of ten that f64 holds: 10^0 ..= 10^22.
const EXACT_POW10_F64: [f64; 23] = [
    1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11, 1e12, 1e13, 1e14, 1e15, 1e16,
    1e17, 1e18, 1e19, 1e20, 1e21, 1e22,
];

/// Three significant digits by the exact decimal formatter (slow, always right).
fn three_digits_exact(v: f64) -> Option<(u16, i32)> {
    let s = format!("{v:.2e}");
    let (mantissa, exp) = s.split_once('e')?;
    let exp = exp.parse::<i32>().ok()?;
    let digits: String = mantissa.chars().filter(char::is_ascii_digit).collect();
    if digits.len() != 3 {
        return None;
    }
    let m = digits.parse::<u16>().ok()?;
    Some((if m == 0 { 0 } else { m }, exp))
}

#[cfg(test)]
#[test]
fn fast_three_digits_agree_with_the_exact_formatter() {
    let mut x = 1.234_567e-13;
    while x < 1e13 {
        for v in [x, x * 1.0049, x * 2.745, x * 9.995, x * 9.9949, x * 1.5] {
            assert_eq!(three_digits(v), three_digits_exact(v), "{v}");
        }
        x *= 1.37;
    }
}

/// The three digits of `m` (100 ..= 999, or 0) as ASCII.
fn digit_bytes(m: u16) -> [u8; 3] {
    // Each is a single decimal digit, so the casts cannot truncate.
    [
        b'0' + (m / 100 % 10) as u8,
        b'0' + (m / 10 % 10) as u8,
        b'0' + (m % 10) as u8,
    ]
}

/// Push the integer part of the three digits of `m` placed with `int_len` integer digits
/// (padding with zeros past them); nothing when `int_len <= 0`.
fn push_int(out: &mut String, m: u16, int_len: i32) {
    let d = digit_bytes(m);
    for i in 0..int_len.max(0) {
        let c = usize::try_from(i).ok().and_then(|i| d.get(i)).copied();
        out.push(char::from(c.unwrap_or(b'0')));
    }
}

/// Push the fraction part (after `int_len` integer digits, zeros before the digits when
/// `int_len < 0`, trailing zeros dropped); false when it is empty and nothing was pushed.
fn push_frac(out: &mut String, m: u16, int_len: i32) -> bool {
    let d = digit_bytes(m);
    let start = usize::try_from(int_len.max(0)).unwrap_or(3).min(3);
    let end = d.iter().rposition(|&c| c != b'0').map_or(0, |i| i + 1);
    if end <= start {
        return false;
    }
    for _ in 0..int_len.min(0).unsigned_abs() {
        out.push('0');
    }
    for &c in d.get(start..end).unwrap_or_default() {
        out.push(char::from(c));
    }
    true
}

/// Format a number with an SI prefix and 3 significant digits: `format_engineering(0.00274, "A")`
/// gives `2.74 mA`; `4700.0, "Ω"` gives `4.7 kΩ`; zero gives `0 A`; non-finite values give `-`.
/// Prefixes run from p to G; values outside that range keep the end prefix.
pub fn format_engineering(value: f64, unit: &str) -> String {
    let Some((m, exp)) = three_digits(value.abs()).filter(|_| value.is_finite()) else {
        return "-".to_string();
    };
    let mut out = String::with_capacity(12 + unit.len());
    let prefix = if m == 0 {
        out.push('0');
        ""
    } else {
        let e3 = (exp.div_euclid(3) * 3).clamp(-12, 9);
        let int_len = exp - e3 + 1;
        if value < 0.0 {
            out.push('-');
        }
        if int_len <= 0 {
            out.push('0');
        } else {
            push_int(&mut out, m, int_len);
        }
        let before = out.len();
        out.push('.');
        if !push_frac(&mut out, m, int_len) {
            out.truncate(before);
        }
        match e3 {
            -12 => "p",
            -9 => "n",
            -6 => "µ",
            -3 => "m",
            3 => "k",
            6 => "M",
            9 => "G",
            _ => "",
        }
    };
    if !prefix.is_empty() || !unit.is_empty() {
        out.push(' ');
        out.push_str(prefix);
        out.push_str(unit);
    }
    out.truncate(out.trim_end().len());
    out
}

/// The IEC 60062 RKM code of a resistance in ohms: 4700 -> `4k7`, 0.47 -> `R47`, 2.2e6 -> `2M2`,
/// 470 -> `470R`, 10_000 -> `10k`. At most 3 significant digits (the value is rounded first).
/// Zero gives `0R`, negative values get a leading `-`, non-finite values give `-`.
pub fn format_rkm(ohms: f64) -> String {
    if !ohms.is_finite() {
        return "-".to_string();
    }
    let Some((m, exp)) = three_digits(ohms.abs()) else {
        return "-".to_string();
    };
    if m == 0 {
        return "0R".to_string();
    }
    let (letter, letter_exp) = match exp {
        e if e >= 9 => ('G', 9),
        e if e >= 6 => ('M', 6),
        e if e >= 3 => ('k', 3),
        _ => ('R', 0),
    };
    let int_len = exp - letter_exp + 1;
    let mut out = String::with_capacity(8);
    if ohms < 0.0 {
        out.push('-');
    }
    push_int(&mut out, m, int_len);
    out.push(letter);
    push_frac(&mut out, m, int_len);
    out
}

/// Build a voltage from volts.
pub fn volts(v: f64) -> Voltage {
    Voltage::new::<uom::si::electric_potential::volt>(v)
}
/// Build a current from amperes.
pub fn amps(a: f64) -> Current {
    Current::new::<uom::si::electric_current::ampere>(a)
}
/// Build a resistance from ohms.
pub fn ohms(r: f64) -> Resistance {
    Resistance::new::<uom::si::electrical_resistance::ohm>(r)
}
/// Build a power from watts.
pub fn watts(p: f64) -> Power {
    Power::new::<uom::si::power::watt>(p)
}
/// Build a temperature from degrees Celsius.
pub fn celsius(t: f64) -> Temperature {
    Temperature::new::<uom::si::thermodynamic_temperature::degree_celsius>(t)
}
/// Build a temperature difference from kelvins.
pub fn kelvins(k: f64) -> TemperatureInterval {
    TemperatureInterval::new::<uom::si::temperature_interval::kelvin>(k)
}
/// Build an inductance from henries.
pub fn henries(h: f64) -> Inductance {
    Inductance::new::<uom::si::inductance::henry>(h)
}
/// Build a time from seconds.
pub fn seconds(s: f64) -> Time {
    Time::new::<uom::si::time::second>(s)
}
/// Build a thermal resistance from kelvins per watt.
pub fn kelvin_per_watt(k: f64) -> ThermalResistance {
    ThermalResistance::new::<uom::si::thermal_resistance::kelvin_per_watt>(k)
}

/// Read-back helpers: the plain number of a quantity in its base unit.
pub trait Base {
    /// The value in the base SI unit (V, A, ohm, W, degrees C for temperatures, H, s, K/W, J).
    fn base(&self) -> f64;
}
macro_rules! base_impl {
    ($t:ty, $unit:path) => {
        impl Base for $t {
            fn base(&self) -> f64 {
                self.get::<$unit>()
            }
        }
    };
}
base_impl!(Voltage, uom::si::electric_potential::volt);
base_impl!(Current, uom::si::electric_current::ampere);
base_impl!(Resistance, uom::si::electrical_resistance::ohm);
base_impl!(Power, uom::si::power::watt);
base_impl!(
    Temperature,
    uom::si::thermodynamic_temperature::degree_celsius
);
base_impl!(TemperatureInterval, uom::si::temperature_interval::kelvin);
base_impl!(Inductance, uom::si::inductance::henry);
base_impl!(Time, uom::si::time::second);
base_impl!(
    ThermalResistance,
    uom::si::thermal_resistance::kelvin_per_watt
);
base_impl!(Energy, uom::si::energy::joule);

#[cfg(test)]
mod tests;
