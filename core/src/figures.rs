//! How the engine and the app print figures: [`fixed`] to a number of decimals, [`plain`] in the
//! fewest digits that read back to the same value. Both print exactly what the standard library's
//! `{:.N}` and `{}` print for an f64 (the unit tests compare the two on hundreds of thousands of
//! values), so the command line's text is the same either way; they exist so that the phone app
//! does not carry the standard library's float printing (about 12 KB of code and its tables of
//! powers of ten): every figure of the engine and the app goes through them, and the shortest
//! digits come from the writer of JSON numbers, which the app has anyway.

use std::fmt;

/// `v` to `decimals` places, as `format!("{v:.decimals$}")` prints it: the exact binary value
/// rounded to the nearest, a tie to the even last digit, `-` kept on a negative value or zero
/// (`-0.0`), `NaN`, `inf` and `-inf` as such. Width and alignment (`{:>8}`) apply as to text.
pub fn fixed(v: f64, decimals: usize) -> Fixed {
    Fixed { v, decimals }
}

/// `v` in the fewest digits that read back to it, never with an exponent, as `format!("{v}")`
/// prints it: `1500`, `0.1`, `0.0000001`, `-0`, `NaN`, `inf`.
pub fn plain(v: f64) -> Plain {
    Plain(v)
}

/// See [`fixed`].
#[derive(Clone, Copy, Debug)]
pub struct Fixed {
    v: f64,
    decimals: usize,
}

/// See [`plain`].
#[derive(Clone, Copy, Debug)]
pub struct Plain(f64);

impl fmt::Display for Fixed {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let Fixed { v, decimals } = *self;
        if let Some(word) = not_finite(v) {
            return f.pad(word);
        }
        let digits = rounded_digits(v.abs(), decimals);
        let mut out = String::with_capacity(digits.len() + 3);
        if v.is_sign_negative() {
            out.push('-');
        }
        place_point(&mut out, &digits, decimals);
        f.pad(&out)
    }
}

impl fmt::Display for Plain {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let v = self.0;
        if let Some(word) = not_finite(v) {
            return f.pad(word);
        }
        let mut buffer = zmij::Buffer::new();
        let (mut digits, mut point) = shortest(buffer.format_finite(v.abs()));
        // When the value lies exactly halfway between two shortest candidates, the JSON writer
        // takes the even one and the standard library the upper one (1149636667324797.25 prints
        // as ….2 and ….3): the upper one, as `{}` prints it.
        if halfway_above(v.abs(), &digits, point) {
            let up = plus_one(&digits);
            point += up.len() as i64 - digits.len() as i64;
            digits = up.trim_end_matches('0').to_string();
        }
        let digits = digits.as_str();
        let mut out = String::with_capacity(digits.len() + 8);
        if v.is_sign_negative() {
            out.push('-');
        }
        // `digits` × 10^(point − len): as many zeros as it takes on either side, no exponent.
        let len = digits.len() as i64;
        if point >= len {
            out.push_str(digits);
            out.extend(std::iter::repeat_n('0', (point - len) as usize));
        } else if point > 0 {
            out.push_str(&digits[..point as usize]);
            out.push('.');
            out.push_str(&digits[point as usize..]);
        } else {
            out.push_str("0.");
            out.extend(std::iter::repeat_n('0', (-point) as usize));
            out.push_str(digits);
        }
        f.pad(&out)
    }
}

fn not_finite(v: f64) -> Option<&'static str> {
    if v.is_nan() {
        Some("NaN")
    } else if v == f64::INFINITY {
        Some("inf")
    } else if v == f64::NEG_INFINITY {
        Some("-inf")
    } else {
        None
    }
}

/// The significant digits of a JSON writer's shortest text for a finite, non-negative number
/// (`1.5e-7`, `1500.0`, `0.001`, `5e+02`) without leading or trailing zeros (`"0"` for zero), and
/// where the decimal point goes: the number is 0.digits × 10^point.
fn shortest(text: &str) -> (String, i64) {
    let (mantissa, exponent) = match text.split_once(['e', 'E']) {
        Some((m, e)) => (m, e.trim_start_matches('+').parse::<i64>().unwrap_or(0)),
        None => (text, 0),
    };
    let (whole, fraction) = mantissa.split_once('.').unwrap_or((mantissa, ""));
    let mut digits = String::with_capacity(whole.len() + fraction.len());
    digits.push_str(whole);
    digits.push_str(fraction);
    let leading = digits.len() - digits.trim_start_matches('0').len();
    digits.drain(..leading);
    let significant = digits.trim_end_matches('0').len();
    digits.truncate(significant);
    if digits.is_empty() {
        ("0".to_string(), 1)
    } else {
        (digits, whole.len() as i64 + exponent - leading as i64)
    }
}

/// A finite, non-negative `v` as m·2^e exactly: its significand and exponent.
fn binary(v: f64) -> (u64, i64) {
    let bits = v.to_bits();
    let biased = ((bits >> 52) & 0x7ff) as i64;
    let fraction = bits & ((1 << 52) - 1);
    if biased == 0 {
        (fraction, -1074)
    } else {
        (fraction | 1 << 52, biased - 1075)
    }
}

/// The exact value of a finite, non-negative `v` as decimal digits and a scale: v = digits ×
/// 10^−scale, the digits without leading zeros (`"0"` for zero).
///
/// v = m·2^e exactly, which is M/10^s with M = m·2^e and s = 0 when e ≥ 0, or M = m·5^s and s = −e
/// when e < 0 (2^−s = 5^s/10^s). M is worked out in base 10^9, a factor of 2^29 or 5^12 at a time.
fn exact(v: f64) -> (String, usize) {
    const LIMB: u64 = 1_000_000_000;
    let (m, e) = binary(v);
    if m == 0 {
        return ("0".to_string(), 0);
    }
    // M in base 10^9, least significant limb first.
    let mut limbs = vec![m % LIMB, m / LIMB % LIMB, m / LIMB / LIMB];
    let (mut left, base, step) = if e >= 0 {
        (e, 2u64, 29)
    } else {
        (-e, 5u64, 12)
    };
    while left > 0 {
        let k = left.min(step);
        let factor = base.pow(k as u32);
        let mut carry = 0;
        for limb in limbs.iter_mut() {
            let x = *limb * factor + carry;
            *limb = x % LIMB;
            carry = x / LIMB;
        }
        while carry > 0 {
            limbs.push(carry % LIMB);
            carry /= LIMB;
        }
        left -= k;
    }
    while limbs.len() > 1 && limbs.last() == Some(&0) {
        limbs.pop();
    }
    let mut digits = limbs.last().map(u64::to_string).unwrap_or_default();
    for limb in limbs.iter().rev().skip(1) {
        let part = limb.to_string();
        digits.extend(std::iter::repeat_n('0', 9 - part.len()));
        digits.push_str(&part);
    }
    (digits, if e >= 0 { 0 } else { (-e) as usize })
}

/// round(v × 10^decimals) for a finite, non-negative `v`: its exact value rounded to the nearest
/// integer, a tie to the even one, as decimal digits (at least one). v × 10^decimals is the exact
/// digits followed by `decimals` zeros over 10^scale: the last `scale` digits are rounded away.
fn rounded_digits(v: f64, decimals: usize) -> String {
    let (mut digits, scale) = exact(v);
    digits.extend(std::iter::repeat_n('0', decimals));
    // A number shorter than what is rounded away is all fraction.
    if digits.len() <= scale {
        digits.insert_str(0, &"0".repeat(scale + 1 - digits.len()));
    }
    let (kept, dropped) = digits.split_at(digits.len() - scale);
    let first = dropped.as_bytes().first().copied().unwrap_or(b'0');
    let rest_zero = dropped.bytes().skip(1).all(|d| d == b'0');
    let odd = kept.bytes().last().is_some_and(|d| (d - b'0') % 2 == 1);
    let kept = if first > b'5' || (first == b'5' && (!rest_zero || odd)) {
        plus_one(kept)
    } else {
        kept.to_string()
    };
    let start = kept
        .bytes()
        .position(|d| d != b'0')
        .unwrap_or(kept.len() - 1);
    kept[start..].to_string()
}

/// A run of decimal digits plus one in its last place (`"199"` → `"200"`, `"99"` → `"100"`).
fn plus_one(digits: &str) -> String {
    let mut out = digits.as_bytes().to_vec();
    for d in out.iter_mut().rev() {
        if *d == b'9' {
            *d = b'0';
        } else {
            *d += 1;
            return String::from_utf8_lossy(&out).into_owned();
        }
    }
    out.insert(0, b'1');
    String::from_utf8_lossy(&out).into_owned()
}

/// Whether a finite, non-negative `v` lies exactly halfway between 0.digits × 10^point and the
/// next number of as many digits above it.
fn halfway_above(v: f64, digits: &str, point: i64) -> bool {
    // Most values are ruled out without working out their exact digits. With m odd, m·2^−s
    // (s > 0) is m·5^s/10^s, whose last digit, at the s-th place after the point, is a 5 (m·5^s is
    // odd and a multiple of 5): halfway at k = len − point decimals means exactly s = k + 1. An
    // integer below 2^53 (an exponent e ≤ 0 with nothing after the point) is its own shortest
    // text, never halfway.
    let (m, e) = binary(v);
    let odd_e = e + i64::from(m.trailing_zeros());
    let decimals = digits.len() as i64 - point;
    if m == 0 || (odd_e < 0 && -odd_e != decimals + 1) || (odd_e >= 0 && e <= 0) {
        return false;
    }
    let (exact, scale) = exact(v);
    // v × 10^(len − point + 1) must be the integer digits·10 + 5: the exact digits, short by
    // `drop` places, end in that integer and then only zeros.
    let drop = scale as i64 - (digits.len() as i64 - point + 1);
    if drop < 0 {
        return false;
    }
    let drop = drop as usize;
    if exact.len() <= drop || exact.bytes().rev().take(drop).any(|d| d != b'0') {
        return false;
    }
    let head = exact[..exact.len() - drop].trim_start_matches('0');
    head.strip_suffix('5') == Some(digits)
}

/// Writes `digits` (an integer, at least one digit) with a decimal point before its last
/// `decimals` digits, padding with zeros in front so one digit stands before the point.
fn place_point(out: &mut String, digits: &str, decimals: usize) {
    if decimals == 0 {
        out.push_str(digits);
        return;
    }
    if digits.len() <= decimals {
        out.push_str("0.");
        out.extend(std::iter::repeat_n('0', decimals - digits.len()));
        out.push_str(digits);
    } else {
        let (whole, fraction) = digits.split_at(digits.len() - decimals);
        out.push_str(whole);
        out.push('.');
        out.push_str(fraction);
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Any bit pattern of an f64, from a xorshift64 generator.
    fn values(n: usize) -> impl Iterator<Item = f64> {
        let mut x: u64 = 0x2545_f491_4f6c_dd1d;
        std::iter::from_fn(move || {
            x ^= x << 13;
            x ^= x >> 7;
            x ^= x << 17;
            Some(f64::from_bits(x))
        })
        .take(n)
    }

    /// Figures as the engine prints them, ties among them (0.125, 2.5, 0.5: exact in binary, so
    /// the tie is real and goes to the even digit), edges and non-finite values: the same text
    /// as the standard library's `{:.N}` (the second model here).
    #[test]
    fn fixed_prints_what_the_standard_library_prints() {
        let cases = [
            0.0,
            -0.0,
            0.5,
            1.5,
            2.5,
            -2.5,
            0.125,
            0.375,
            0.05,
            0.35,
            119.95,
            120.05,
            239.999_999,
            1e-7,
            1e-300,
            5e-324,
            1e15,
            1e17,
            1e21,
            1e300,
            f64::MAX,
            f64::MIN_POSITIVE,
            0.999_95,
            9.5,
            99.5,
            999.999_5,
            1234.5678,
            f64::NAN,
            f64::INFINITY,
            f64::NEG_INFINITY,
            -1e-9,
        ];
        for v in cases {
            for d in 0..=8 {
                assert_eq!(fixed(v, d).to_string(), format!("{v:.d$}"), "{v:e} to {d}");
            }
        }
        assert_eq!(format!("{:>8}", fixed(1.25, 1)), format!("{:>8.1}", 1.25));
        assert_eq!(format!("{:<8}|", fixed(-3.0, 2)), format!("{:<8.2}|", -3.0));
    }

    /// 200,000 values of every size, to 0 to 6 decimals as the engine and the app use them.
    #[test]
    fn fixed_agrees_with_the_standard_library_on_any_value() {
        for (k, v) in values(200_000).enumerate() {
            // Every other value brought into the range of figures, where the digits matter.
            let v = if k % 2 == 0 {
                v
            } else {
                (v.to_bits() % 1_000_000_000) as f64 / 1e4
            };
            let d = k % 7;
            assert_eq!(fixed(v, d).to_string(), format!("{v:.d$}"), "{v:e} to {d}");
        }
    }

    /// Figures, edges and 200,000 values of every size: the same text as the standard library's
    /// `{}`.
    #[test]
    fn plain_prints_what_the_standard_library_prints() {
        let cases = [
            0.0,
            -0.0,
            1500.0,
            0.1,
            0.2,
            0.3,
            1e-7,
            1.5e-7,
            1e21,
            1e22,
            123_456_789_012_345_680.0,
            5e-324,
            f64::MAX,
            f64::MIN_POSITIVE,
            0.001,
            100.0,
            1e15,
            1e16,
            328_083.989_501_312_3,
            f64::NAN,
            f64::INFINITY,
            f64::NEG_INFINITY,
            -2.5,
            // −1149636667324797.25 exactly, halfway between two shortest texts (….2 and ….3);
            // the standard library prints ….3.
            f64::from_bits(0xc310_565a_94b4_e5f5),
        ];
        for v in cases.into_iter().chain(values(200_000)) {
            assert_eq!(plain(v).to_string(), format!("{v}"), "{v:e}");
        }
        assert_eq!(format!("{:>9}", plain(2.5)), format!("{:>9}", 2.5));
    }
}
