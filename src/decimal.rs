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

/// Appends `x` rounded to `decimals` (at most 9) decimals, optionally without trailing zeros.
/// Non-finite values print as `null`; negative zero prints as zero.
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
    if v != 0 && scaled < 0.0 {
        buf.push('-');
    }
    let mut d = decimals;
    let int = v / POW10[d];
    let mut frac = v % POW10[d];
    push_digits(buf, int, 1);
    if trim {
        while d > 0 && frac.is_multiple_of(10) {
            frac /= 10;
            d -= 1;
        }
    }
    if d > 0 {
        buf.push('.');
        push_digits(buf, frac, d);
    }
}

/// Appends the decimal digits of `v`, left-padded with zeros to at least `width` digits.
pub fn push_digits(buf: &mut String, mut v: u64, width: usize) {
    let mut tmp = [b'0'; 20];
    let mut i = tmp.len();
    while v > 0 {
        i -= 1;
        tmp[i] = b'0' + (v % 10) as u8;
        v /= 10;
    }
    i = i.min(tmp.len() - width.max(1));
    buf.push_str(std::str::from_utf8(&tmp[i..]).unwrap_or("0"));
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

#[cfg(test)]
mod tests {
    use super::*;

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
