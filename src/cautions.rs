//! The cautions every output carries, because the plan drives real repair work: one list and one
//! short paragraph, written from here into summary.json, every GeoJSON layer, the work orders,
//! the picture, the report, the batch summaries, `--help` and the terminal (a test checks the
//! README carries the same text).

/// Cautions, in the order they are printed.
pub const CAUTIONS: &[&str] = &[
    "Decision support only: the plan follows from the data supplied and does not replace the judgement of the people responsible for the work.",
    "Field-verify every segment before sending crews: damage reports and map geometry can be wrong, incomplete or out of date.",
    "Bridges, culverts, tunnels and slopes need inspection by qualified engineers before they are reopened to traffic.",
    "Local codes and licensed practice decide how, and whether, any repair is carried out.",
    "Roads marked intact are assumed passable, including any bridges, culverts or tunnels on them: check them too.",
    "The default damage category factors are illustrative, not calibrated: give your own in a cost table.",
    "Costs are relative repair effort (repair-metres), not money or time.",
    "Days reflect crew capacity only, not access, materials, equipment or weather.",
    "Crew safety on site (floodwater, unstable ground, power lines) is decided by those responsible there.",
];

/// The cautions in one paragraph: the picture's band and the line printed at the end of a run.
pub const SHORT: &str = "Caution: decision support only. Field-verify every segment; bridges, culverts, tunnels and slopes need inspection by qualified engineers before reopening, even on roads marked intact; local codes and licensed practice decide. Costs are relative effort, not money or time; days count crew capacity only; default damage factors are illustrative; crew safety on site is decided by those responsible there.";

/// The fixed sentence on every work order row.
pub const WORK_ORDER: &str =
    "Field-verify before work; structures need inspection by a qualified engineer; see cautions";

/// The attribution OpenStreetMap's licence (ODbL 1.0) asks of anything made from its data.
pub const OSM_ATTRIBUTION: &str = "© OpenStreetMap contributors (ODbL)";

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_short_text_names_every_caution_topic() {
        // Each caution's subject must reach the paragraph printed on pictures and terminals.
        for topic in [
            "decision support",
            "field-verify",
            "qualified engineers",
            "local codes",
            "marked intact",
            "not money or time",
            "crew capacity",
            "illustrative",
            "crew safety",
        ] {
            assert!(SHORT.to_lowercase().contains(topic), "{topic}");
        }
        assert_eq!(CAUTIONS.len(), 9);
    }
}
