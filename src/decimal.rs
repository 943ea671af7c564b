//! Numbers written as decimal text: the one way figures reach GeoJSON, CSV, SVG, HTML and
//! messages, with a fixed or trimmed number of decimals and never as `-0`.

const POW10: [u64; 10] = [
    1,
    10,
    100,
    1_000,
    10_000,
    100_000,
    1_000_000,
    10_000_000,
    100_000_000,
    1_000_000_000,
];

/// Two decimal digits for every number below 100, so digits are made two at a time.
const PAIRS: &[u8; 200] = b"\
0001020304050607080910111213141516171819\
2021222324252627282930313233343536373839\
4041424344454647484950515253545556575859\
6061626364656667686970717273747576777879\
8081828384858687888990919293949596979899";

/// Appends `x` rounded to `decimals` (at most 9) decimals, optionally without trailing zeros.
/// Non-finite values print as `null`; negative zero prints as zero. Layers write millions of
/// these, so the text is built on the stack (no allocation) and divisions are by constants.
pub fn push_decimal(buf: &mut String, x: f64, decimals: usize, trim: bool) {
    use std::fmt::Write as _;
    if !x.is_finite() {
        buf.push_str("null");
        return;
    }
    let scaled = (x * POW10[decimals] as f64).round();
    if scaled.abs() >= 9.0e15 {
        // Beyond exact integers in f64: let the standard formatter handle it.
        let _ = write!(buf, "{:.*}", decimals, x);
        return;
    }
    let v = scaled.abs() as u64;
    let (int, frac) = split(v, decimals);
    // Sign, up to 16 integer digits, the point and up to 9 decimals.
    let mut out = [0u8; 32];
    let mut n = 0;
    if v != 0 && scaled < 0.0 {
        out[0] = b'-';
        n = 1;
    }
    n += digits_at(&mut out[n..], int, 1);
    if decimals > 0 {
        let mut tmp = [0u8; 20];
        let w = digits_at(&mut tmp, frac, decimals);
        let mut d = w;
        if trim {
            while d > 0 && tmp[d - 1] == b'0' {
                d -= 1;
            }
        }
        if d > 0 {
            out[n] = b'.';
            out[n + 1..n + 1 + d].copy_from_slice(&tmp[..d]);
            n += 1 + d;
        }
    }
    buf.push_str(std::str::from_utf8(&out[..n]).unwrap_or("0"));
}

/// `v` split into its whole part and its last `d` digits (d ≤ 9), with constant divisors.
#[inline]
fn split(v: u64, d: usize) -> (u64, u64) {
    macro_rules! by {
        ($p:expr) => {
            (v / $p, v % $p)
        };
    }
    match d {
        0 => (v, 0),
        1 => by!(10),
        2 => by!(100),
        3 => by!(1_000),
        4 => by!(10_000),
        5 => by!(100_000),
        6 => by!(1_000_000),
        7 => by!(10_000_000),
        8 => by!(100_000_000),
        _ => by!(1_000_000_000),
    }
}

/// Writes the decimal digits of `v`, left-padded with zeros to at least `width` digits (at most
/// 20), at the start of `out`; returns how many bytes were written.
#[inline]
fn digits_at(out: &mut [u8], mut v: u64, width: usize) -> usize {
    let mut tmp = [b'0'; 20];
    let mut i = tmp.len();
    while v >= 100 {
        let r = (v % 100) as usize * 2;
        v /= 100;
        i -= 2;
        tmp[i..i + 2].copy_from_slice(&PAIRS[r..r + 2]);
    }
    if v >= 10 {
        let r = v as usize * 2;
        i -= 2;
        tmp[i..i + 2].copy_from_slice(&PAIRS[r..r + 2]);
    } else {
        i -= 1;
        tmp[i] = b'0' + v as u8;
    }
    i = i.min(tmp.len() - width.clamp(1, tmp.len()));
    let n = tmp.len() - i;
    out[..n].copy_from_slice(&tmp[i..]);
    n
}

/// Appends the decimal digits of `v`, left-padded with zeros to at least `width` digits.
pub fn push_digits(buf: &mut String, v: u64, width: usize) {
    let mut out = [0u8; 20];
    let n = digits_at(&mut out, v, width);
    buf.push_str(std::str::from_utf8(&out[..n]).unwrap_or("0"));
}

/// A number for any output, shown with exactly `.1` decimals (the second field): the one way figures are written
/// into SVG, HTML and messages, so nothing that rounds to zero prints as `-0`.
#[derive(Debug, Clone, Copy)]
pub struct Fixed(pub f64, pub usize);

impl std::fmt::Display for Fixed {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(&fixed(self.0, self.1))
    }
}

/// `x` with exactly `decimals` decimals; negative zero prints as zero.
pub fn fixed(x: f64, decimals: usize) -> String {
    let mut s = String::new();
    push_decimal(&mut s, x, decimals, false);
    s
}

/// `x` rounded to `decimals` decimals with trailing zeros (and a bare point) removed.
pub fn trimmed(x: f64, decimals: usize) -> String {
    let mut s = String::new();
    push_decimal(&mut s, x, decimals, true);
    s
}

/// `x` for a message: as written when short, in scientific notation when very large or very
/// small, so a hostile figure (1e308) never fills a screen; at most about 25 characters.
pub fn shown(x: f64) -> String {
    let a = x.abs();
    if x == 0.0 {
        "0".into()
    } else if a.is_finite() && !(1e-6..1e15).contains(&a) {
        format!("{x:e}")
    } else {
        format!("{x}")
    }
}

/// A position `(x, y)` for a message, each figure through [`shown`].
pub fn position(p: [f64; 2]) -> String {
    format!("({}, {})", shown(p[0]), shown(p[1]))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn shown_numbers_are_short_and_exact() {
        assert_eq!(shown(1e308), "1e308");
        assert_eq!(shown(-1.7976931348623157e308), "-1.7976931348623157e308");
        assert_eq!(shown(12.5), "12.5");
        assert_eq!(shown(-0.0), "0");
        assert_eq!(shown(5e-324), "5e-324");
        assert_eq!(shown(f64::NAN), "NaN");
        for x in [
            1e308,
            -1e-300,
            123456789012345.67,
            0.1 + 0.2,
            f64::MAX,
            f64::MIN_POSITIVE,
        ] {
            let t = shown(x);
            assert!(t.len() <= 25, "{t}");
            assert_eq!(t.parse::<f64>().unwrap(), x, "{t} reads back");
        }
    }

    /// The digits as the first version made them (one division per digit): every figure in
    /// the outputs must come out byte for byte as before.
    fn reference(x: f64, decimals: usize, trim: bool) -> String {
        let scaled = (x * POW10[decimals] as f64).round();
        if !x.is_finite() || scaled.abs() >= 9.0e15 {
            return String::new();
        }
        let v = scaled.abs() as u64;
        let mut s = String::new();
        if v != 0 && scaled < 0.0 {
            s.push('-');
        }
        let mut d = decimals;
        let int = v / POW10[d];
        let mut frac = v % POW10[d];
        s.push_str(&int.to_string());
        if trim {
            while d > 0 && frac.is_multiple_of(10) {
                frac /= 10;
                d -= 1;
            }
        }
        if d > 0 {
            s.push('.');
            s.push_str(&format!("{frac:0d$}"));
        }
        s
    }

    #[test]
    fn digits_match_the_first_version() {
        let mut rng = crate::rng::Rng::new(5);
        let mut checked = 0;
        for i in 0..400_000u64 {
            let x = match i % 4 {
                0 => (rng.unit() - 0.5) * 360.0,
                1 => (rng.unit() - 0.5) * 2e6,
                2 => (rng.below(2_000_001) as f64 - 1e6) / 1000.0,
                _ => (rng.unit() - 0.5) * 10f64.powi(rng.below(15) as i32),
            };
            for decimals in 0..=9 {
                for trim in [false, true] {
                    let want = reference(x, decimals, trim);
                    if want.is_empty() {
                        continue;
                    }
                    let mut got = String::new();
                    push_decimal(&mut got, x, decimals, trim);
                    assert_eq!(got, want, "{x} with {decimals} decimals, trim {trim}");
                    checked += 1;
                }
            }
        }
        assert!(checked > 7_000_000);
        for (v, w) in [(0, 1), (7, 3), (123, 2), (u64::MAX, 1), (99, 20), (100, 1)] {
            let mut got = String::new();
            push_digits(&mut got, v, w);
            assert_eq!(got, format!("{v:0w$}"));
        }
    }

    #[test]
    fn formats_numbers() {
        assert_eq!(trimmed(1.5, 7), "1.5");
        assert_eq!(trimmed(-0.00000001, 7), "0");
        assert_eq!(trimmed(9.123456789, 7), "9.1234568");
        assert_eq!(trimmed(10.0, 7), "10");
        assert_eq!(fixed(2.0, 3), "2.000");
        assert_eq!(fixed(-0.0001, 3), "0.000");
        assert_eq!(fixed(-1.25, 3), "-1.250");
        assert_eq!(trimmed(-35.0030621, 7), "-35.0030621");
        assert_eq!(trimmed(f64::NAN, 3), "null");
        assert_eq!(fixed(12.0005, 3), format!("{:.3}", 12.0005_f64));
    }
}
