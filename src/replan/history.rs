//! The rounds of an operation: round 1 is the first plan, each re-plan adds one, with the
//! repair-metres finished to date and those remaining (no dates: only the user's label).

use serde::{Deserialize, Serialize};

/// One round of planning, as `summary.json` `history[]` and the report list it.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Round {
    /// 1 for the first plan, then one more for each re-plan.
    pub round: u32,
    /// The `--label` given to the re-plan (null for the first plan and when none was given).
    pub label: Option<String>,
    /// Repair-metres of the previous plan finished in this round (0 for round 1), counted at the
    /// costs that plan gave them.
    pub finished_repair_m: f64,
    /// Repair-metres finished in all rounds to this one.
    pub finished_to_date_m: f64,
    /// Repair-metres of this round's plan: the work remaining.
    pub remaining_repair_m: f64,
}

/// The history of a first plan: round 1 alone.
pub fn first(total_cost_m: f64) -> Vec<Round> {
    vec![Round {
        round: 1,
        label: None,
        finished_repair_m: 0.0,
        finished_to_date_m: 0.0,
        remaining_repair_m: total_cost_m,
    }]
}

/// The history of a re-plan: the previous rounds and this one.
pub fn next(
    before: &[Round],
    label: Option<&str>,
    finished_m: f64,
    remaining_m: f64,
) -> Vec<Round> {
    let last = before.last();
    let mut out = before.to_vec();
    out.push(Round {
        round: last.map_or(1, |r| r.round) + 1,
        label: label.map(str::to_string),
        finished_repair_m: crate::export::summary::round3(finished_m),
        finished_to_date_m: crate::export::summary::round3(
            last.map_or(0.0, |r| r.finished_to_date_m) + finished_m,
        ),
        remaining_repair_m: remaining_m,
    });
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn rounds_count_on_and_finished_work_adds_up() {
        let h = next(&first(100.0), Some("day 3"), 30.0, 70.0);
        let h = next(&h, None, 20.5, 49.5);
        assert_eq!(h.iter().map(|r| r.round).collect::<Vec<_>>(), [1, 2, 3]);
        assert_eq!(h[2].finished_to_date_m, 50.5);
        assert_eq!(h[1].label.as_deref(), Some("day 3"));
    }
}
