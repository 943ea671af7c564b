//! The picture's colours: the greys of the network, the impassable roads, the site symbols, and the
//! repair-day ramp, an ordered ramp of our own designed in CIE L*C*h (rationale in docs/colours.md).
//!
//! The ramp runs from a deep blue-green (day 1, L* 27) through blue to an orchid (the last day,
//! L* 69.5). Lightness climbs evenly with the day and never passes L* 70, so every day stays darker
//! than the light grey roads (L* 80.6) and the white paper, and the order survives grey-scale print
//! and colour-vision deficiency; the hue turns and the chroma grows with the room sRGB leaves at each
//! lightness. Up to [`DISTINCT_DAYS`] days each get a colour of their own; more days are grouped
//! into that many bins of consecutive days, shown as a ramp bar in the legend.

#[cfg(test)]
#[path = "palette_check.rs"]
mod check;

/// Usable roads (the background network): light grey, L* 80.6.
pub const ROAD: &str = "#c8c8c8";
/// Impassable roads (drawn dashed): dark red-brown.
pub const IMPASSABLE: &str = "#8c2d04";
/// Intact roads the plan uses: mid grey, L* 46.4.
pub const PLAN_INTACT: &str = "#6e6e6e";
/// Damaged roads the plan leaves alone: ochre, apart in hue from the grey intact roads and the
/// blue-to-orchid repairs.
pub const DAMAGED: &str = "#d69e3c";
/// Backup links (ways round), drawn dashed: dark green.
pub const BACKUP: &str = "#1a7f4b";
/// Fill of the damage zones: a pale peach under every road.
pub const ZONE_FILL: &str = "#fbe4d8";
/// Outline of the damage zones.
pub const ZONE_EDGE: &str = "#d08b6c";
/// Ink of the site and hub symbols, of labels and of the scale bar.
pub const INK: &str = "#000000";
/// The paper, the label halo and the fill of sites not joined.
pub const PAPER: &str = "#ffffff";

/// Roads with no way round on the map page: a wide yellow halo under the lines (the picture does
/// not draw them).
pub const SINGLE_FAILURE: &str = "#f7d117";
/// Corridors from the hub on the map page, drawn dotted over the plan: navy.
pub const CORRIDOR: &str = "#000088";
/// Geometry-check (QA) points on the map page: dark maroon diamonds.
pub const QA_POINT: &str = "#553333";

/// The most days that each get a colour of their own; more days share this many bins.
pub const DISTINCT_DAYS: u32 = 6;

/// L* of the first and of the last colour (lightness is linear in between).
const L_FIRST: f64 = 27.0;
const L_LAST: f64 = 69.5;
/// Knots of the ramp: position along it, chroma C*, hue angle h in degrees; linear in between.
/// Chroma stays inside the sRGB gamut at every lightness (a test checks it).
const KNOTS: [(f64, f64, f64); 4] = [
    (0.0, 18.0, 235.0),
    (0.3, 30.0, 258.0),
    (0.5, 44.0, 275.0),
    (1.0, 45.0, 330.0),
];

/// CIE L*, a*, b* of the ramp at `t` in 0..=1.
fn lab_at(t: f64) -> [f64; 3] {
    let t = t.clamp(0.0, 1.0);
    let k = KNOTS
        .windows(2)
        .find(|w| t <= w[1].0)
        .unwrap_or(&KNOTS[KNOTS.len() - 2..]);
    let u = (t - k[0].0) / (k[1].0 - k[0].0);
    let c = k[0].1 + (k[1].1 - k[0].1) * u;
    let h = (k[0].2 + (k[1].2 - k[0].2) * u).to_radians();
    [L_FIRST + (L_LAST - L_FIRST) * t, c * h.cos(), c * h.sin()]
}

/// Linear sRGB of a CIELAB colour (D65; inverse matrix of IEC 61966-2-1), not clamped.
fn linear_rgb(lab: [f64; 3]) -> [f64; 3] {
    // CIE 15 inverse of f(t): cube above 6/29, the linear segment below.
    let finv = |f: f64| {
        let d = 6.0 / 29.0;
        if f > d {
            f * f * f
        } else {
            3.0 * d * d * (f - 4.0 / 29.0)
        }
    };
    let fy = (lab[0] + 16.0) / 116.0;
    let (x, y, z) = (
        0.9505 * finv(fy + lab[1] / 500.0),
        finv(fy),
        1.0890 * finv(fy - lab[2] / 200.0),
    );
    [
        3.2406 * x - 1.5372 * y - 0.4986 * z,
        -0.9689 * x + 1.8758 * y + 0.0415 * z,
        0.0557 * x - 0.2040 * y + 1.0570 * z,
    ]
}

/// The 8-bit sRGB colour of the ramp at `t` in 0..=1.
fn srgb_at(t: f64) -> [u8; 3] {
    linear_rgb(lab_at(t)).map(|v| {
        let v = v.clamp(0.0, 1.0);
        let e = if v <= 0.003_130_8 {
            12.92 * v
        } else {
            1.055 * v.powf(1.0 / 2.4) - 0.055
        };
        (e * 255.0).round() as u8
    })
}

/// How many colours `days` days use: one per day up to [`DISTINCT_DAYS`], then that many bins.
pub fn bins(days: u32) -> u32 {
    days.clamp(1, DISTINCT_DAYS)
}

/// The 0-based bin of `day` (1-based) out of `days`: consecutive days share a bin, and every bin
/// holds at least one day.
pub fn bin_of(day: u32, days: u32) -> u32 {
    let days = days.max(1);
    let day = day.clamp(1, days);
    ((u64::from(day - 1) * u64::from(bins(days))) / u64::from(days)) as u32
}

/// The first and last day (1-based) of `bin` out of `days`.
pub fn bin_days(bin: u32, days: u32) -> (u32, u32) {
    let (days, b) = (u64::from(days.max(1)), u64::from(bins(days)));
    // Day d is in bin floor((d-1)·b/days): bin k starts at ceil(k·days/b)+1.
    let start = |k: u64| (k * days).div_ceil(b);
    let k = u64::from(bin).min(b - 1);
    ((start(k) + 1) as u32, start(k + 1) as u32)
}

/// The colour of `bin` out of `bins`, as `#rrggbb`: the first bin darkest, evenly spaced in L*.
pub fn bin_colour(bin: u32, bins: u32) -> String {
    let t = if bins <= 1 {
        0.0
    } else {
        f64::from(bin.min(bins - 1)) / f64::from(bins - 1)
    };
    let [r, g, b] = srgb_at(t);
    format!("#{r:02x}{g:02x}{b:02x}")
}

/// The colour of repair day `day` (1-based) out of `days`, as `#rrggbb`.
pub fn day_colour(day: u32, days: u32) -> String {
    bin_colour(bin_of(day, days), bins(days))
}
