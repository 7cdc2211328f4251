//! The field checker shared by every file the engine reads (jobs and readings): it walks a
//! forgiving file, collects every [`Problem`] with the JSON path of its field, and refuses keys it
//! does not know, suggesting the nearest known one, so that a typo never changes an answer.

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
        return format!("{v}");
    }
    let digits = (3 - v.abs().log10().floor() as i32).max(0) as usize;
    let s = format!("{v:.digits$}");
    if s.contains('.') {
        s.trim_end_matches('0').trim_end_matches('.').to_string()
    } else {
        s
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
            Raw::Invalid(_) => {
                self.fail(path, rule.message());
                return None;
            }
            Raw::Given(v) => *v,
        };
        if rule.accepts(v) {
            Some(v)
        } else {
            self.fail(path, format!("{} (got {v})", rule.message()));
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

    #[test]
    fn limits_read_in_round_units() {
        assert_eq!(round(328083.9895013123), "328084");
        assert_eq!(round(0.05), "0.05");
        assert_eq!(round(1000.0), "1000");
    }
}
