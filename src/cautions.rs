//! The cautions every report and the README carry, because the plan drives real repair work.

/// Cautions, in the order they are printed.
pub const CAUTIONS: &[&str] = &[
    "Decision support only: the plan follows from the data supplied and does not replace the judgement of the people responsible for the work.",
    "Field-verify every segment before sending crews: damage reports and map geometry can be wrong, incomplete or out of date.",
    "Bridges, culverts and slopes need inspection by qualified engineers before they are reopened to traffic.",
    "Local codes and licensed practice decide how, and whether, any repair is carried out.",
];

/// The one-line caution printed on pictures.
pub const SHORT: &str = "Decision support only: field-verify every segment; bridges, culverts and slopes need inspection by qualified engineers before reopening; local codes decide.";
