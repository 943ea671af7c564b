//! Checks of the day ramp against colour science outside the project, with its own conversion from
//! 8-bit sRGB to CIELAB (the ramp itself converts the other way):
//! - sRGB decoding and the sRGB→XYZ matrix: IEC 61966-2-1:1999 (D65, the matrix's row sums as the
//!   white point, so white has a* = b* = 0 exactly);
//! - XYZ→L*a*b*: CIE 15:2004 (Colorimetry, 3rd ed.), §8.2.1;
//! - colour difference ΔE00: CIE 142-2001 (CIEDE2000), checked against the test pairs published by
//!   Sharma, Wu & Dalal, Color Res. Appl. 30(1), 2005, Table 1;
//! - colour-vision deficiency: Machado, Oliveira & Fernandes, IEEE TVCG 15(6), 2009, the severity
//!   1.0 matrices for protanopia, deuteranopia and tritanopia, applied to linear sRGB.

use super::*;

/// The thresholds of docs/colours.md: neighbouring days, and a day against any other map colour.
const NEIGHBOURS: f64 = 5.5;
const OTHERS: f64 = 12.0;

fn decode(v: u8) -> f64 {
    let v = f64::from(v) / 255.0;
    if v <= 0.04045 {
        v / 12.92
    } else {
        ((v + 0.055) / 1.055).powf(2.4)
    }
}

fn hex(c: &str) -> [f64; 3] {
    let v = u32::from_str_radix(c.trim_start_matches('#'), 16).unwrap();
    [
        decode((v >> 16) as u8),
        decode((v >> 8) as u8),
        decode(v as u8),
    ]
}

/// CIELAB of linear sRGB.
fn lab(rgb: [f64; 3]) -> [f64; 3] {
    let m = [
        [0.4124, 0.3576, 0.1805],
        [0.2126, 0.7152, 0.0722],
        [0.0193, 0.1192, 0.9505],
    ];
    let xyz = m.map(|row| row[0] * rgb[0] + row[1] * rgb[1] + row[2] * rgb[2]);
    let white = m.map(|row| row[0] + row[1] + row[2]);
    let f = |t: f64| {
        let d: f64 = 6.0 / 29.0;
        if t > d.powi(3) {
            t.cbrt()
        } else {
            t / (3.0 * d * d) + 4.0 / 29.0
        }
    };
    let [fx, fy, fz] = [0, 1, 2].map(|i| f(xyz[i] / white[i]));
    [116.0 * fy - 16.0, 500.0 * (fx - fy), 200.0 * (fy - fz)]
}

/// CIEDE2000 with kL = kC = kH = 1.
fn de00(p: [f64; 3], q: [f64; 3]) -> f64 {
    let c7 = |c: f64| c.powi(7) / (c.powi(7) + 25f64.powi(7));
    let cbar = 0.5 * (p[1].hypot(p[2]) + q[1].hypot(q[2]));
    let g = 0.5 * (1.0 - c7(cbar).sqrt());
    let prime = |x: [f64; 3]| {
        let a = (1.0 + g) * x[1];
        let h = if a == 0.0 && x[2] == 0.0 {
            0.0
        } else {
            x[2].atan2(a).to_degrees().rem_euclid(360.0)
        };
        (a.hypot(x[2]), h)
    };
    let ((c1, h1), (c2, h2)) = (prime(p), prime(q));
    let dh = if c1 * c2 == 0.0 {
        0.0
    } else if (h2 - h1).abs() <= 180.0 {
        h2 - h1
    } else if h2 - h1 > 180.0 {
        h2 - h1 - 360.0
    } else {
        h2 - h1 + 360.0
    };
    let big_dh = 2.0 * (c1 * c2).sqrt() * (dh / 2.0).to_radians().sin();
    let lbar = 0.5 * (p[0] + q[0]);
    let cbar = 0.5 * (c1 + c2);
    let hbar = if c1 * c2 == 0.0 {
        h1 + h2
    } else if (h1 - h2).abs() <= 180.0 {
        0.5 * (h1 + h2)
    } else if h1 + h2 < 360.0 {
        0.5 * (h1 + h2 + 360.0)
    } else {
        0.5 * (h1 + h2 - 360.0)
    };
    let cos = |deg: f64| deg.to_radians().cos();
    let t = 1.0 - 0.17 * cos(hbar - 30.0) + 0.24 * cos(2.0 * hbar) + 0.32 * cos(3.0 * hbar + 6.0)
        - 0.20 * cos(4.0 * hbar - 63.0);
    let sl = 1.0 + 0.015 * (lbar - 50.0).powi(2) / (20.0 + (lbar - 50.0).powi(2)).sqrt();
    let (sc, sh) = (1.0 + 0.045 * cbar, 1.0 + 0.015 * cbar * t);
    let rt = -2.0
        * c7(cbar).sqrt()
        * (60.0 * (-((hbar - 275.0) / 25.0).powi(2)).exp())
            .to_radians()
            .sin();
    let (l, c, h) = ((q[0] - p[0]) / sl, (c2 - c1) / sc, big_dh / sh);
    (l * l + c * c + h * h + rt * c * h).sqrt()
}

/// Normal vision, then Machado et al. (2009) severity 1.0: protanopia, deuteranopia, tritanopia.
const VIEWS: [(&str, [[f64; 3]; 3]); 4] = [
    (
        "normal",
        [[1.0, 0.0, 0.0], [0.0, 1.0, 0.0], [0.0, 0.0, 1.0]],
    ),
    (
        "protanopia",
        [
            [0.152286, 1.052583, -0.204868],
            [0.114503, 0.786281, 0.099216],
            [-0.003882, -0.048116, 1.051998],
        ],
    ),
    (
        "deuteranopia",
        [
            [0.367322, 0.860646, -0.227968],
            [0.280085, 0.672501, 0.047413],
            [-0.011820, 0.042940, 0.968881],
        ],
    ),
    (
        "tritanopia",
        [
            [1.255528, -0.076749, -0.178779],
            [-0.078411, 0.930809, 0.147602],
            [0.004733, 0.691367, 0.303900],
        ],
    ),
];

/// CIELAB of `colour` as a reader with the matrix `m` sees it.
fn seen(colour: &str, m: &[[f64; 3]; 3]) -> [f64; 3] {
    let c = hex(colour);
    lab(m.map(|r| (r[0] * c[0] + r[1] * c[1] + r[2] * c[2]).clamp(0.0, 1.0)))
}

fn l_star(colour: &str) -> f64 {
    lab(hex(colour))[0]
}

/// Every colour the ramp ever draws: the bins of 1 to DISTINCT_DAYS colours.
fn every_day_colour() -> Vec<String> {
    (1..=DISTINCT_DAYS)
        .flat_map(|b| (0..b).map(move |k| bin_colour(k, b)))
        .collect()
}

#[test]
fn the_conversion_gives_the_reference_lightness() {
    // White and black are defined by IEC 61966-2-1 and CIE 15.
    let w = lab(hex(PAPER));
    assert!((w[0] - 100.0).abs() < 1e-9 && w[1].abs() < 1e-9 && w[2].abs() < 1e-9);
    assert!(l_star(INK).abs() < 1e-12);
    // L* of the sRGB primaries, 53.24, 87.73, 32.30 (widely tabulated; from memory).
    for (c, l) in [("#ff0000", 53.24), ("#00ff00", 87.73), ("#0000ff", 32.30)] {
        assert!((l_star(c) - l).abs() < 0.01, "{c}: L* {}", l_star(c));
    }
}

#[test]
fn ciede2000_matches_the_published_test_pairs() {
    // Sharma, Wu & Dalal (2005), Table 1: pairs 1, 7, 9, 11, 13, 16, 17, 18, 19, 20, 25, 29, 33.
    let pairs = [
        ([50.0, 2.6772, -79.7751], [50.0, 0.0, -82.7485], 2.0425),
        ([50.0, 0.0, 0.0], [50.0, -1.0, 2.0], 2.3669),
        ([50.0, 2.49, -0.001], [50.0, -2.49, 0.0009], 7.1792),
        ([50.0, 2.49, -0.001], [50.0, -2.49, 0.0011], 7.2195),
        ([50.0, -0.001, 2.49], [50.0, 0.0009, -2.49], 4.8045),
        ([50.0, 2.5, 0.0], [50.0, 0.0, -2.5], 4.3065),
        ([50.0, 2.5, 0.0], [73.0, 25.0, -18.0], 27.1492),
        ([50.0, 2.5, 0.0], [61.0, -5.0, 29.0], 22.8977),
        ([50.0, 2.5, 0.0], [56.0, -27.0, -3.0], 31.9030),
        ([50.0, 2.5, 0.0], [58.0, 24.0, 15.0], 19.4535),
        (
            [60.2574, -34.0099, 36.2677],
            [60.4626, -34.1751, 39.4387],
            1.2644,
        ),
        (
            [22.7233, 20.0904, -46.694],
            [23.0331, 14.973, -42.5619],
            2.0373,
        ),
        (
            [6.7747, -0.2908, -2.4247],
            [5.8714, -0.0985, -2.2286],
            0.6377,
        ),
    ];
    for (p, q, want) in pairs {
        assert!(
            (de00(p, q) - want).abs() < 1e-4,
            "{p:?} {q:?}: {}",
            de00(p, q)
        );
        assert!((de00(q, p) - want).abs() < 1e-4);
    }
}

#[test]
fn every_day_is_no_lighter_than_l70_and_lightness_climbs_day_by_day() {
    for days in (1..=80).chain([365, 1000, 100_000]) {
        let l: Vec<f64> = (1..=days.min(2000))
            .map(|d| l_star(&day_colour(d, days)))
            .collect();
        for (i, w) in l.windows(2).enumerate() {
            let d = i as u32 + 1;
            if bin_of(d, days) == bin_of(d + 1, days) {
                assert_eq!(w[0], w[1], "days {d} and {} of {days} share a bin", d + 1);
            } else {
                assert!(w[1] > w[0] + 5.0, "day {} of {days} not lighter", d + 1);
            }
        }
        assert!(l.iter().all(|&x| x <= 70.0), "{days} days: {l:?}");
        if days <= DISTINCT_DAYS {
            assert!(l.windows(2).all(|w| w[1] > w[0]), "{days} days: {l:?}");
        }
    }
}

#[test]
fn the_ramp_stays_inside_srgb_and_keeps_its_lightness() {
    for i in 0..=1000 {
        let t = f64::from(i) / 1000.0;
        let rgb = linear_rgb(lab_at(t));
        assert!(
            rgb.iter().all(|&v| (-1e-9..=1.0 + 1e-9).contains(&v)),
            "t {t}: {rgb:?}"
        );
        let [r, g, b] = srgb_at(t);
        let l = l_star(&format!("#{r:02x}{g:02x}{b:02x}"));
        assert!((l - lab_at(t)[0]).abs() < 0.3, "t {t}: L* {l}");
    }
}

#[test]
fn neighbouring_days_are_told_apart_up_to_the_distinct_count_and_no_further() {
    let worst = |n: u32, m: &[[f64; 3]; 3]| {
        let c: Vec<[f64; 3]> = (0..n).map(|k| seen(&bin_colour(k, n), m)).collect();
        c.windows(2)
            .map(|w| de00(w[0], w[1]))
            .fold(f64::MAX, f64::min)
    };
    for (view, m) in &VIEWS {
        for n in 2..=DISTINCT_DAYS {
            assert!(
                worst(n, m) >= NEIGHBOURS,
                "{n} days, {view}: ΔE00 {}",
                worst(n, m)
            );
        }
    }
    // One more evenly spaced colour breaks the criterion for some reader: the count is the most.
    let n = DISTINCT_DAYS + 1;
    assert!(VIEWS.iter().any(|(_, m)| worst(n, m) < NEIGHBOURS));
}

#[test]
fn roads_sites_and_paper_stand_apart_from_every_day() {
    for day in every_day_colour() {
        assert!(
            l_star(ROAD) - l_star(&day) >= 10.0,
            "{day} against the roads"
        );
        for other in [ROAD, PLAN_INTACT, IMPASSABLE, INK, PAPER] {
            for (view, m) in &VIEWS {
                let d = de00(seen(&day, m), seen(other, m));
                assert!(d >= OTHERS, "{day} against {other}, {view}: ΔE00 {d}");
            }
        }
    }
}

#[test]
fn the_map_pages_own_colours_stand_apart_from_every_day_and_each_other() {
    let page = [SINGLE_FAILURE, CORRIDOR, QA_POINT];
    for c in page {
        for other in every_day_colour()
            .iter()
            .map(String::as_str)
            .chain([ROAD, PLAN_INTACT, IMPASSABLE, DAMAGED, BACKUP, INK, PAPER])
            .chain(page.into_iter().filter(|&o| o != c))
        {
            for (view, m) in &VIEWS {
                let d = de00(seen(c, m), seen(other, m));
                assert!(d >= OTHERS, "{c} against {other}, {view}: ΔE00 {d}");
            }
        }
    }
}

#[test]
fn bins_hold_consecutive_days_and_none_is_empty() {
    for days in 1..=300 {
        let b = bins(days);
        assert_eq!(b, days.min(DISTINCT_DAYS));
        let mut next = 1;
        for k in 0..b {
            let (first, last) = bin_days(k, days);
            assert_eq!(first, next, "{days} days, bin {k}");
            assert!(last >= first);
            assert!((first..=last).all(|d| bin_of(d, days) == k));
            next = last + 1;
        }
        assert_eq!(next, days + 1);
    }
}
