//! Quality-assurance points: every change reknit makes to the geometry, and every suspicion, so an
//! analyst can see and check them (`qa.geojson`).

/// What a QA point records.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Hash)]
pub enum QaKind {
    /// Vertices within the snapping tolerance were merged into one junction or vertex.
    MergedVertices,
    /// A dangling line end near another line's interior was joined to it.
    JoinedUndershoot,
    /// A short dangling piece past a junction was removed.
    TrimmedOvershoot,
    /// An edge identical to another (same vertices) was removed.
    RemovedDuplicate,
    /// An edge running within the tolerance of another between the same junctions was removed.
    RemovedNearDuplicate,
    /// An edge identical or near to another was removed and the two had different damage: the
    /// worst was kept (closed beats any factor, a higher factor a lower one).
    DuplicateDamageDiffered,
    /// A line that collapsed to a point was removed.
    RemovedZeroLength,
    /// Two lines cross without a shared vertex and were joined there (`--node-crossings`).
    NodedCrossing,
    /// Two lines cross without a shared vertex and were left apart (an overpass, or a missing
    /// junction).
    CrossingLeftApart,
    /// A line end touching nothing (a dead end, or a gap wider than the tolerance).
    DanglingEnd,
}

impl QaKind {
    /// Every kind, in the order docs/outputs.md lists them.
    pub const ALL: [QaKind; 10] = [
        QaKind::MergedVertices,
        QaKind::JoinedUndershoot,
        QaKind::TrimmedOvershoot,
        QaKind::RemovedDuplicate,
        QaKind::RemovedNearDuplicate,
        QaKind::DuplicateDamageDiffered,
        QaKind::RemovedZeroLength,
        QaKind::NodedCrossing,
        QaKind::CrossingLeftApart,
        QaKind::DanglingEnd,
    ];

    /// The code written as `kind` in `qa.geojson` and counted in `summary.json`.
    pub fn code(self) -> &'static str {
        match self {
            QaKind::MergedVertices => "merged_vertices",
            QaKind::JoinedUndershoot => "joined_undershoot",
            QaKind::TrimmedOvershoot => "trimmed_overshoot",
            QaKind::RemovedDuplicate => "removed_duplicate",
            QaKind::RemovedNearDuplicate => "removed_near_duplicate",
            QaKind::DuplicateDamageDiffered => "removed_duplicate_other_damage",
            QaKind::RemovedZeroLength => "removed_zero_length",
            QaKind::NodedCrossing => "crossing_joined",
            QaKind::CrossingLeftApart => "crossing_left_apart",
            QaKind::DanglingEnd => "dangling_end",
        }
    }

    /// The words for a kind's code (summary.json counts QA points by code); an unknown code is
    /// returned as it is.
    pub fn label_of(code: &str) -> &str {
        QaKind::ALL
            .iter()
            .find(|k| k.code() == code)
            .map_or(code, |k| k.label())
    }

    /// The kind in words for people, written as `kind_label` in `qa.geojson`.
    pub fn label(self) -> &'static str {
        match self {
            QaKind::MergedVertices => "merged vertices",
            QaKind::JoinedUndershoot => "joined undershoot",
            QaKind::TrimmedOvershoot => "trimmed overshoot",
            QaKind::RemovedDuplicate => "removed duplicate",
            QaKind::RemovedNearDuplicate => "removed near-duplicate",
            QaKind::DuplicateDamageDiffered => "removed duplicate with other damage, worst kept",
            QaKind::RemovedZeroLength => "removed zero-length line",
            QaKind::NodedCrossing => "crossing joined",
            QaKind::CrossingLeftApart => "crossing left apart",
            QaKind::DanglingEnd => "dangling end",
        }
    }
}

/// One QA point.
#[derive(Debug, Clone, PartialEq)]
pub struct QaPoint {
    /// What happened.
    pub kind: QaKind,
    /// Where, lon/lat.
    pub pos: [f64; 2],
    /// How far geometry moved (or the gap), metres.
    pub distance_m: f64,
    /// The road feature concerned, as its position in the network's feature list (not its
    /// position in its source file: `Network::features` gives that and its layer), when one is.
    pub feature: Option<u32>,
}
