//! The field checker shared by every file the engine reads (jobs and readings): it walks a
//! forgiving file, collects every [`Problem`] with the JSON path of its field, and refuses keys it
//! does not know, suggesting the nearest known one, so that a typo never changes an answer.

use crate::figures::{fixed, plain};
use crate::job::Raw;
use serde_json::Value;
use std::collections::BTreeMap;

/// One problem with the input: the JSON path of the field and what is wrong, lowercase.
#[derive(Clone, Debug, PartialEq, Eq, serde::Serialize)]
pub struct Problem {
    pub path: String,
    pub message: String,
}

impl std::fmt::Display for Problem {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        write!(f, "{}: {}", self.path, self.message)
    }
}

/// Keys a file held that its format does not define, kept verbatim so the file round-trips.
pub type Unknown = BTreeMap<String, Value>;

/// What a number must be.
#[derive(Clone, Copy, Debug)]
pub enum Rule {
    /// Finite, > 0 and ≤ max.
    Positive(f64),
    /// Finite, ≥ 0 and ≤ max.
    NonNegative(f64),
    /// Finite, lo ≤ x ≤ hi.
    Between(f64, f64),
}

impl Rule {
    fn accepts(self, v: f64) -> bool {
        v.is_finite()
            && match self {
                Rule::Positive(max) => v > 0.0 && v <= max,
                Rule::NonNegative(max) => (0.0..=max).contains(&v),
                Rule::Between(lo, hi) => (lo..=hi).contains(&v),
            }
    }

    fn message(self) -> String {
        match self {
            Rule::Positive(max) => format!("must be a positive number up to {}", round(max)),
            Rule::NonNegative(max) => format!("must be a number from 0 to {}", round(max)),
            Rule::Between(lo, hi) => {
                format!("must be a number from {} to {}", round(lo), round(hi))
            }
        }
    }
}

/// A limit written for people: at most four significant figures, no trailing zeros.
fn round(v: f64) -> String {
    if v == 0.0 || !v.is_finite() {
        return plain(v).to_string();
    }
    let digits = (3 - v.abs().log10().floor() as i32).max(0) as usize;
    let s = fixed(v, digits).to_string();
    if s.contains('.') {
        s.trim_end_matches('0').trim_end_matches('.').to_string()
    } else {
        s
    }
}

/// A number as a message quotes it: as written, or in powers of ten below 1e-6 or from 1e15 up,
/// where it would take six or more zeros after the point or sixteen or more digits before it
/// (`1e-300` and `2.5e+20`, not hundreds of zeros).
fn quoted(v: f64) -> String {
    let size = v.abs();
    if size != 0.0 && !(1e-6..1e15).contains(&size) {
        zmij::Buffer::new().format(v).to_string()
    } else {
        plain(v).to_string()
    }
}

/// What a file held where a number belongs, for a message: text as it was typed (in quotes, cut
/// after 40 characters), or what kind of value it was.
fn shown(given: &Value) -> String {
    match given {
        Value::String(text) if text.chars().count() > 40 => {
            format!("\"{}…\"", text.chars().take(40).collect::<String>())
        }
        Value::String(text) => format!("\"{text}\""),
        Value::Array(_) => "a list".to_string(),
        Value::Object(_) => "an object".to_string(),
        other => other.to_string(),
    }
}

/// Collects problems while walking a file.
#[derive(Debug, Default)]
pub struct Checker {
    pub problems: Vec<Problem>,
}

impl Checker {
    pub fn new() -> Checker {
        Checker::default()
    }

    pub fn fail(&mut self, path: &str, message: impl Into<String>) {
        self.problems.push(Problem {
            path: path.to_string(),
            message: message.into(),
        });
    }

    /// A number under `rule`, or `None` (with a problem when it was given but wrong).
    pub fn number(&mut self, raw: &Raw<f64>, path: &str, rule: Rule) -> Option<f64> {
        let v = match raw {
            Raw::Absent => return None,
            Raw::Invalid(given) => {
                self.fail(path, format!("{} (got {})", rule.message(), shown(given)));
                return None;
            }
            Raw::Given(v) => *v,
        };
        if rule.accepts(v) {
            Some(v)
        } else {
            self.fail(path, format!("{} (got {})", rule.message(), quoted(v)));
            None
        }
    }

    /// A number that must be given.
    pub fn required_number(&mut self, raw: &Raw<f64>, path: &str, rule: Rule) -> Option<f64> {
        if raw.is_absent() {
            let m = rule.message();
            self.fail(
                path,
                format!("is required: {}", m.trim_start_matches("must be ")),
            );
            return None;
        }
        self.number(raw, path, rule)
    }

    pub fn text<'a>(&mut self, raw: &'a Raw<String>, path: &str) -> Option<&'a str> {
        match raw {
            Raw::Absent => None,
            Raw::Invalid(_) => {
                self.fail(path, "must be text");
                None
            }
            Raw::Given(s) => Some(s.as_str()),
        }
    }

    pub fn flag(&mut self, raw: &Raw<bool>, path: &str) -> Option<bool> {
        match raw {
            Raw::Absent => None,
            Raw::Invalid(_) => {
                self.fail(path, "must be true or false");
                None
            }
            Raw::Given(b) => Some(*b),
        }
    }

    pub fn object<'a, T>(&mut self, raw: &'a Raw<T>, path: &str) -> Option<&'a T> {
        match raw {
            Raw::Absent => None,
            Raw::Invalid(_) => {
                self.fail(path, "must be an object");
                None
            }
            Raw::Given(v) => Some(v),
        }
    }

    /// Reports every key of `unknown` as a problem at `prefix.key`, naming the nearest of `known`
    /// when one is close (`loads[0].wats: unknown field (did you mean watts?)`).
    pub fn unknown_keys(&mut self, unknown: &Unknown, prefix: &str, known: &[&str]) {
        for key in unknown.keys() {
            let path = if prefix.is_empty() {
                key.clone()
            } else {
                format!("{prefix}.{key}")
            };
            match nearest(key, known) {
                Some(k) => self.fail(&path, format!("unknown field (did you mean {k}?)")),
                None => self.fail(
                    &path,
                    format!("unknown field (known here: {})", known.join(", ")),
                ),
            }
        }
    }
}

/// The known key closest to `key` by edit distance (case-insensitive), when it is at most about a
/// third of the key's length away, or when one contains or abbreviates the other.
pub fn nearest<'a>(key: &str, known: &[&'a str]) -> Option<&'a str> {
    let k = key.to_ascii_lowercase();
    known
        .iter()
        .filter_map(|c| {
            let d = edit_distance(&k, c);
            // A key the candidate spells out in full beats a candidate the key merely contains.
            let class = if c.contains(k.as_str()) || abbreviates(&k, c) {
                0
            } else if k.contains(c) {
                1
            } else if d * 3 <= k.len().max(c.len()) + 2 {
                2
            } else {
                return None;
            };
            Some((c, (class, d)))
        })
        .min_by_key(|(_, rank)| *rank)
        .map(|(c, _)| *c)
}

/// True when `short` starts like `long` and its letters appear in `long` in order (`xr` for
/// `x_over_r`).
fn abbreviates(short: &str, long: &str) -> bool {
    if short.len() < 2 || short.chars().next() != long.chars().next() {
        return false;
    }
    let mut rest = long.chars();
    short.chars().all(|ch| rest.any(|l| l == ch))
}

/// Reads a decimal number as a person types it: an optional sign, digits with at most one
/// decimal point (`.5` and `5.` included) and an optional exponent (`1e3`, `2.5E-2`). Returns
/// `None` for anything else, `inf` and `nan` included, and for a number beyond the range of f64;
/// a number too small for it reads as zero. The text is not trimmed.
///
/// The text is rewritten into JSON's number grammar (RFC 8259, section 6: no leading `+`, no
/// leading zeros, digits on both sides of the point) and read by serde_json, the reader of job
/// files, so a value typed into the app is the very f64 that a job file holding the same text
/// gives in the app. Off the phone serde_json reads exactly (its `float_roundtrip` reader, see
/// `core/Cargo.toml`), and the unit tests, which run there, find it equal to the standard
/// library's reader to the last bit. On the phone it is built with its smaller reader, which
/// multiplies or divides the digits, read as an integer, by a power of ten: with up to 15
/// significant digits and powers of ten up to 22 either way both are exact and the one operation
/// rounds correctly, so every number a person types reads to the same bit; longer or larger ones
/// can land a unit or two in the last place away. Not using the standard library's reader keeps
/// its table of powers of five, about 10 KB, out of the phone app.
pub fn decimal(text: &str) -> Option<f64> {
    let (negative, rest) = match text.as_bytes().first() {
        Some(b'-') => (true, &text[1..]),
        Some(b'+') => (false, &text[1..]),
        _ => (false, text),
    };
    let (mantissa, exponent) = match rest.split_once(['e', 'E']) {
        Some((m, e)) => (m, Some(e)),
        None => (rest, None),
    };
    let (whole, fraction) = mantissa.split_once('.').unwrap_or((mantissa, ""));
    let digits = |s: &str| s.bytes().all(|b| b.is_ascii_digit());
    if !digits(whole) || !digits(fraction) || whole.len() + fraction.len() == 0 {
        return None;
    }
    let mut json = String::with_capacity(text.len() + 2);
    if negative {
        json.push('-');
    }
    let whole = whole.trim_start_matches('0');
    json.push_str(if whole.is_empty() { "0" } else { whole });
    if !fraction.is_empty() {
        json.push('.');
        json.push_str(fraction);
    }
    if let Some(e) = exponent {
        let unsigned = e.strip_prefix(['+', '-']).unwrap_or(e);
        if unsigned.is_empty() || !digits(unsigned) {
            return None;
        }
        json.push('e');
        json.push_str(e);
    }
    // Read as a JSON value: its reader has no type to refuse, so none of serde's messages for a
    // wrong type (which print floats with the standard library) is built here.
    serde_json::from_str::<Value>(&json)
        .ok()
        .and_then(|v| v.as_f64())
}

/// Levenshtein distance between two strings, counted in characters.
pub fn edit_distance(a: &str, b: &str) -> usize {
    let b: Vec<char> = b.chars().collect();
    let mut prev: Vec<usize> = (0..=b.len()).collect();
    for (i, ca) in a.chars().enumerate() {
        let mut cur = vec![i + 1; b.len() + 1];
        for (j, cb) in b.iter().enumerate() {
            let sub = prev[j] + usize::from(ca != *cb);
            cur[j + 1] = sub.min(prev[j + 1] + 1).min(cur[j] + 1);
        }
        prev = cur;
    }
    prev[b.len()]
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn suggests_the_nearest_key() {
        let known = ["watts", "rated_v", "earth_return_ohms", "x_over_r"];
        assert_eq!(nearest("wats", &known), Some("watts"));
        assert_eq!(nearest("earth_ohms", &known), Some("earth_return_ohms"));
        assert_eq!(nearest("xr", &known), Some("x_over_r"));
        assert_eq!(nearest("colour", &known), None);
    }

    /// The standard library's reader is the second model here: the same grammar (but for its
    /// `inf` and `nan`) and the same value to the bit for numbers as people type them.
    #[test]
    fn reads_decimals_as_the_standard_library_does() {
        let same = [
            "0",
            "-0",
            "+0",
            "7",
            "007",
            "0.5",
            ".5",
            "5.",
            "-.5",
            "+2.5",
            "1e3",
            "1E3",
            "2.5e-2",
            "2.5E+2",
            "1e007",
            "120",
            "240.0",
            "0.35",
            "0.1",
            "0.2",
            "0.3",
            "1500",
            "0.000001",
            "3.14159",
            "277.128",
            "1e-300",
            "1e300",
            "123456789012345",
            "0.333333333333333",
            "1e-400",
            "0e99999999999",
        ];
        for t in same {
            let std: f64 = t.parse().unwrap();
            let ours = decimal(t).unwrap_or_else(|| panic!("{t} is a number"));
            assert_eq!(ours.to_bits(), std.to_bits(), "{t}");
        }
        let refused = [
            "", "-", "+", ".", "-.", "e3", "1e", "1e+", "1e-", "1.2.3", "1,5", " 1", "1 ", "--1",
            "+-1", "0x10", "1_000", "١", "1e3.5", "1ee3", "1e400", "-1e400",
        ];
        for t in refused {
            let std = t.parse::<f64>().ok().filter(|v| v.is_finite());
            assert_eq!(std, None, "{t}: the standard library reads it");
            assert_eq!(decimal(t), None, "{t}");
        }
        // The standard library reads these as not finite; so does no one typing a rating.
        for t in ["inf", "-inf", "infinity", "nan", "NaN"] {
            assert!(!t.parse::<f64>().unwrap().is_finite());
            assert_eq!(decimal(t), None, "{t}");
        }
    }

    /// Numbers with up to 17 significant digits and any exponent, as a shortest round trip writes
    /// them: off the phone, where serde_json reads exactly, the standard library's value to the
    /// bit.
    #[test]
    fn long_decimals_read_as_the_standard_library_reads_them() {
        let mut x: u64 = 0x9e37_79b9_7f4a_7c15;
        for _ in 0..20_000 {
            // xorshift64: any bit pattern of a finite, positive f64.
            x ^= x << 13;
            x ^= x >> 7;
            x ^= x << 17;
            let v = f64::from_bits(x >> 1);
            if !v.is_finite() || v == 0.0 {
                continue;
            }
            for text in [format!("{v:e}"), format!("{v}")] {
                let std: f64 = text.parse().unwrap();
                let ours = decimal(&text).unwrap();
                assert_eq!(
                    ours.to_bits(),
                    std.to_bits(),
                    "{text}: {ours:e} against {std:e}"
                );
            }
        }
    }

    proptest::proptest! {
        #![proptest_config(proptest::prelude::ProptestConfig { cases: 4000, .. Default::default() })]

        /// Any short text over the characters a number is written with: read by both readers or
        /// by neither, and to the same bit off the phone (the standard library's `inf` and `nan`
        /// cannot be spelt with these characters).
        #[test]
        fn any_text_of_number_characters_reads_as_the_standard_library_reads_it(
            text in "[-+0-9.eE]{0,12}"
        ) {
            let std = text.parse::<f64>().ok().filter(|v| v.is_finite());
            let ours = decimal(&text);
            proptest::prop_assert_eq!(std.is_some(), ours.is_some(), "{}: {:?} against {:?}", text, ours, std);
            if let (Some(a), Some(b)) = (ours, std) {
                proptest::prop_assert_eq!(a.to_bits(), b.to_bits(), "{}: {:e} against {:e}", text, a, b);
            }
        }
    }

    /// A number field that holds something else says what it held, so a person sees which of
    /// their entries was refused (`1,500`, which the app does not guess at, among them).
    #[test]
    fn a_field_that_is_not_a_number_says_what_it_held() {
        let cases = [
            (Value::String("1,500".into()), "(got \"1,500\")"),
            (Value::Bool(true), "(got true)"),
            (Value::Null, "(got null)"),
            (serde_json::json!([1500]), "(got a list)"),
            (serde_json::json!({"w": 1}), "(got an object)"),
            (
                Value::String("x".repeat(50)),
                "(got \"xxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxx…\")",
            ),
        ];
        for (given, said) in cases {
            assert_eq!(
                refusal(Raw::Invalid(given)),
                format!("must be a number from 0.1 to 1000000 {said}")
            );
        }
    }

    /// The one message a watts field between 0.1 and 1,000,000 gets for `raw`.
    fn refusal(raw: Raw<f64>) -> String {
        let mut c = Checker::new();
        assert_eq!(
            c.number(&raw, "loads[0].watts", Rule::Between(0.1, 1e6)),
            None
        );
        assert_eq!(c.problems.len(), 1);
        c.problems.remove(0).message
    }

    /// A number out of range is quoted as a person can read it, however far out it is.
    #[test]
    fn a_number_out_of_range_is_quoted_readably() {
        for (given, said) in [
            (1e9, "(got 1000000000)"),
            (-1.0, "(got -1)"),
            (0.05, "(got 0.05)"),
            (0.0, "(got 0)"),
            (1e-300, "(got 1e-300)"),
            (5e-324, "(got 5e-324)"),
            (2.5e20, "(got 2.5e+20)"),
            (-1e-9, "(got -1e-9)"),
        ] {
            assert_eq!(
                refusal(Raw::Given(given)),
                format!("must be a number from 0.1 to 1000000 {said}")
            );
        }
    }

    #[test]
    fn limits_read_in_round_units() {
        assert_eq!(round(328083.9895013123), "328084");
        assert_eq!(round(0.05), "0.05");
        assert_eq!(round(1000.0), "1000");
    }
}
