//! The repair days in the picture: each repair drawn in its day's colour, darkest first, and the
//! legend naming every day, as lines up to six days and as a ramp bar beyond (docs/colours.md).

mod common;
use common::*;
use reknit::export::palette::{self, DISTINCT_DAYS};

/// Runs the demo with `capacity` and returns the SVG text and the number of days.
fn demo(capacity: &str) -> (String, u32) {
    let d = tmp();
    let out = d.path().join("o");
    let o = run(&[
        "demo",
        "--out",
        out.to_str().unwrap(),
        "-q",
        "--crew-capacity",
        capacity,
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    let days = read_json(&out.join("summary.json"))["days"]
        .as_array()
        .unwrap()
        .len() as u32;
    (std::fs::read_to_string(out.join("plan.svg")).unwrap(), days)
}

/// The stroke colours of the repairs, in drawing order (the repair order).
fn repair_colours(doc: &roxmltree::Document) -> Vec<String> {
    let g = doc
        .descendants()
        .find(|n| n.attribute("id") == Some("repairs"))
        .unwrap();
    g.children()
        .filter(|c| c.is_element())
        .map(|c| c.attribute("stroke").unwrap().to_string())
        .collect()
}

/// Checks that the repairs, taken in order, go through the bins in order and use every one.
fn repairs_follow_the_bins(colours: &[String], days: u32) {
    let bins = palette::bins(days);
    let index: Vec<u32> = colours
        .iter()
        .map(|c| {
            (0..bins)
                .find(|&k| palette::bin_colour(k, bins) == *c)
                .unwrap_or_else(|| panic!("{c} is no day colour of {days} days"))
        })
        .collect();
    assert!(index.windows(2).all(|w| w[0] <= w[1]), "{index:?}");
    assert_eq!(index.first(), Some(&0));
    assert_eq!(index.last(), Some(&(bins - 1)));
}

#[test]
fn a_few_days_get_a_line_each_in_the_legend() {
    let (svg, days) = demo("6000");
    assert!((2..=DISTINCT_DAYS).contains(&days), "{days} days");
    let doc = roxmltree::Document::parse(&svg).unwrap();
    repairs_follow_the_bins(&repair_colours(&doc), days);
    let legend = doc
        .descendants()
        .find(|n| n.attribute("id") == Some("legend"))
        .unwrap();
    for d in 1..=days {
        let line = legend
            .descendants()
            .find(|n| {
                n.has_tag_name("line")
                    && n.attribute("stroke") == Some(&palette::day_colour(d, days))
            })
            .unwrap_or_else(|| panic!("no legend line for day {d}"));
        let label = line.next_sibling_element().unwrap().text().unwrap();
        assert_eq!(label, format!("repair, day {d}"));
    }
    assert!(!svg.contains("day-ramp"));
}

#[test]
fn many_days_get_a_ramp_bar_of_bins() {
    let (svg, days) = demo("300");
    assert!(days > DISTINCT_DAYS, "{days} days: lower the capacity");
    let doc = roxmltree::Document::parse(&svg).unwrap();
    repairs_follow_the_bins(&repair_colours(&doc), days);
    let ramp = doc
        .descendants()
        .find(|n| n.attribute("id") == Some("day-ramp"))
        .unwrap();
    let blocks: Vec<_> = ramp.children().filter(|n| n.has_tag_name("rect")).collect();
    assert_eq!(blocks.len() as u32, DISTINCT_DAYS);
    // Blocks darkest first, touching one another, their labels covering days 1..=days in order.
    let mut next = 1;
    for (k, b) in blocks.iter().enumerate() {
        assert_eq!(
            b.attribute("fill"),
            Some(palette::bin_colour(k as u32, DISTINCT_DAYS).as_str())
        );
        if k > 0 {
            let y = |n: &roxmltree::Node| n.attribute("y").unwrap().parse::<f64>().unwrap();
            let h = blocks[k - 1]
                .attribute("height")
                .unwrap()
                .parse::<f64>()
                .unwrap();
            assert_eq!(y(b), y(&blocks[k - 1]) + h);
        }
        let label = b
            .next_sibling_element()
            .unwrap()
            .text()
            .unwrap()
            .to_string();
        let range = label.trim_start_matches("days ").trim_start_matches("day ");
        let (first, last) = range.split_once('–').unwrap_or((range, range));
        assert_eq!(first.parse::<u32>().unwrap(), next, "{label}");
        next = last.parse::<u32>().unwrap() + 1;
    }
    assert_eq!(next, days + 1);
}
