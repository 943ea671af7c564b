//! Noding on small hand-made fixtures where the right graph is known by construction.

use proptest::prelude::*;
use reknit::ingest::damage::Damage;
use reknit::ingest::noding::node;
use reknit::ingest::roads::LineLayer;
use reknit::network::{FeatureMeta, Network};

/// Degrees per metre near the equator (about 1 / 111,320).
const M: f64 = 1.0 / 111_320.0;

fn layer(lines: &[Vec<[f64; 2]>]) -> LineLayer {
    let mut l = LineLayer::default();
    for (i, line) in lines.iter().enumerate() {
        l.coords.extend_from_slice(line);
        l.part_ends.push(l.coords.len());
        l.part_feature.push(i as u32);
        l.features.push(FeatureMeta {
            source_index: i as u32,
            source_id: None,
            damage: Damage::Factor(1.0),
            category: None,
            label: None,
            structure: None,
        });
    }
    l
}

fn pt(x_m: f64, y_m: f64) -> [f64; 2] {
    [x_m * M, y_m * M]
}

fn degree_sequence(n: &Network) -> Vec<usize> {
    let mut d = vec![0; n.junctions.len()];
    for e in &n.edges {
        d[e.from as usize] += 1;
        d[e.to as usize] += 1;
    }
    d.sort();
    d
}

#[test]
fn t_junction_at_a_shared_vertex_splits_the_through_road() {
    let (n, s) = node(
        layer(&[
            vec![pt(0., 0.), pt(200., 0.), pt(400., 0.)],
            vec![pt(200., 0.), pt(200., 200.)],
        ]),
        0.5,
    );
    n.validate().unwrap();
    assert_eq!(s.junctions, 4);
    assert_eq!(s.edges, 3);
    assert_eq!(degree_sequence(&n), vec![1, 1, 1, 3]);
}

#[test]
fn crossing_without_shared_vertex_stays_an_overpass() {
    let (n, _) = node(
        layer(&[
            vec![pt(0., 0.), pt(200., 0.)],
            vec![pt(100., -100.), pt(100., 100.)],
        ]),
        0.5,
    );
    assert_eq!(n.edges.len(), 2);
    assert_eq!(n.junctions.len(), 4);
}

#[test]
fn gap_within_tolerance_is_snapped_beyond_it_is_not() {
    let lines = vec![
        vec![pt(0., 0.), pt(200., 0.), pt(400., 0.)],
        vec![pt(200.3, 0.2), pt(200., 200.)],
    ];
    let (n, s) = node(layer(&lines), 0.5);
    assert_eq!(s.junctions, 4, "joined at the shared vertex");
    assert_eq!(s.vertices_moved, 1);
    assert!(
        (s.max_move_m - (0.3f64.hypot(0.2))).abs() < 0.01,
        "{}",
        s.max_move_m
    );
    assert_eq!(n.edges.len(), 3);
    let (n, s) = node(layer(&lines), 0.0);
    assert_eq!(s.vertices_moved, 0);
    assert_eq!(n.edges.len(), 2, "left apart without snapping");
}

#[test]
fn duplicate_in_either_direction_is_dropped_once() {
    let a = vec![pt(0., 0.), pt(50., 10.), pt(100., 0.)];
    let mut b = a.clone();
    b.reverse();
    let (n, s) = node(layer(&[a.clone(), b, a]), 0.5);
    assert_eq!(n.edges.len(), 1);
    assert_eq!(s.duplicate_edges_dropped, 2);
    assert_eq!(n.edges[0].feature, 0, "the first feature is kept");
}

#[test]
fn line_collapsing_to_a_point_is_dropped_and_counted() {
    let (n, s) = node(
        layer(&[
            vec![pt(0., 0.), pt(0.1, 0.)],
            vec![pt(0., 0.), pt(100., 0.)],
        ]),
        0.5,
    );
    assert_eq!(s.zero_length_parts_dropped, 1);
    assert_eq!(n.edges.len(), 1);
}

/// Every way a line can vanish leaves no junction behind: a junction no edge ends at would be a
/// component of its own (a phantom in the component count and the plan forest).
#[test]
fn removed_lines_leave_no_junction_behind() {
    let road = vec![pt(0., 0.), pt(100., 0.)];
    type Lines = Vec<Vec<[f64; 2]>>;
    let cases: [(&str, Lines, f64); 5] = [
        // A part whose two vertices are identical, far from the road, snapping off.
        (
            "zero length",
            vec![road.clone(), vec![pt(500., 500.), pt(500., 500.)]],
            0.0,
        ),
        // A part shorter than the tolerance, far from the road.
        (
            "collapsed by the tolerance",
            vec![road.clone(), vec![pt(500., 500.), pt(500.2, 500.)]],
            0.5,
        ),
        // A one-vertex loop: its start and its end are one point.
        (
            "self-loop of one point",
            vec![vec![pt(300., 0.), pt(300., 0.), pt(300., 0.)], road.clone()],
            0.0,
        ),
        // The same road twice, then a zero-length part at its end.
        (
            "duplicate",
            vec![road.clone(), road.clone(), vec![pt(100., 0.), pt(100., 0.)]],
            0.0,
        ),
        // A stub shorter than the tolerance past a junction (trimmed) beside a collapsed part.
        (
            "trimmed",
            vec![
                road.clone(),
                vec![pt(50., 0.), pt(50., 50.)],
                vec![pt(100., 0.), pt(100.3, 0.)],
                vec![pt(700., 0.), pt(700., 0.)],
            ],
            0.5,
        ),
    ];
    for (what, lines, snap) in cases {
        let (n, s) = node(layer(&lines), snap);
        n.validate().unwrap_or_else(|e| panic!("{what}: {e}"));
        assert_eq!(s.junctions, n.junctions.len(), "{what}");
        let mut used = vec![false; n.junctions.len()];
        for e in &n.edges {
            used[e.from as usize] = true;
            used[e.to as usize] = true;
        }
        assert!(used.iter().all(|&u| u), "{what}: a junction ends no edge");
    }
}

#[test]
fn closed_ring_becomes_a_loop_at_one_junction() {
    let (n, _) = node(
        layer(&[vec![pt(0., 0.), pt(100., 0.), pt(100., 100.), pt(0., 0.)]]),
        0.5,
    );
    assert_eq!(n.junctions.len(), 1);
    assert_eq!(n.edges.len(), 1);
    assert_eq!(n.edges[0].from, n.edges[0].to);
}

#[test]
fn snapping_never_moves_a_vertex_farther_than_the_tolerance() {
    // Vertices every 0.4 m: a chain that transitive merging would drag metres away.
    let line: Vec<[f64; 2]> = (0..50).map(|i| pt(i as f64 * 0.4, 0.)).collect();
    let (_, s) = node(layer(&[line]), 0.5);
    assert!(s.max_move_m <= 0.5, "{}", s.max_move_m);
}

proptest! {
    /// On random layers: invariants hold, and with snapping off the edge lengths add up to the input
    /// lengths (nothing lost, nothing counted twice) when no duplicates were dropped.
    #[test]
    fn noding_preserves_length_and_invariants(
        lines in proptest::collection::vec(
            proptest::collection::vec((0i32..20, 0i32..20), 2..8), 1..25)
    ) {
        let lines: Vec<Vec<[f64; 2]>> = lines.iter()
            .map(|l| l.iter().map(|&(x, y)| pt(x as f64 * 50.0, y as f64 * 50.0)).collect())
            .collect();
        let input_len: f64 = lines.iter()
            .map(|l| reknit::ingest::geodesy::polyline_length_m(l.iter().copied()))
            .sum();
        let (n, s) = node(layer(&lines), 0.0);
        n.validate().map_err(TestCaseError::fail)?;
        let total: f64 = n.edges.iter().map(|e| e.length_m).sum();
        if s.duplicate_edges_dropped == 0 {
            prop_assert!((total - input_len).abs() < 1e-6 * input_len.max(1.0), "{total} vs {input_len}");
        } else {
            prop_assert!(total < input_len);
        }
        // Every junction is an end or a meeting point: no junction of degree 2 unless two lines meet
        // end to end there or a line revisits it.
        prop_assert_eq!(s.junctions, n.junctions.len());
    }

    /// With snapping on, lines collapse, merge and get trimmed: the invariants (no junction left
    /// without an edge among them) still hold.
    #[test]
    fn snapped_noding_keeps_the_invariants(
        lines in proptest::collection::vec(
            proptest::collection::vec((0i32..12, 0i32..12), 2..6), 1..20),
        snap in prop_oneof![Just(0.0), Just(20.0), Just(60.0)]
    ) {
        let lines: Vec<Vec<[f64; 2]>> = lines.iter()
            .map(|l| l.iter().map(|&(x, y)| pt(x as f64 * 50.0, y as f64 * 50.0)).collect())
            .collect();
        let (n, _) = node(layer(&lines), snap);
        n.validate().map_err(TestCaseError::fail)?;
    }
}

mod repairs {
    use super::*;
    use reknit::ingest::noding::{NodingOptions, node_with};

    fn opts(snap_m: f64, node_crossings: bool) -> NodingOptions {
        NodingOptions {
            snap_m,
            node_crossings,
            report_crossings: true,
        }
    }

    fn count(s: &reknit::ingest::NodingStats, kind: &str) -> usize {
        s.qa.get(kind).copied().unwrap_or(0)
    }

    #[test]
    fn undershoot_is_joined_into_the_through_road() {
        // A side road stops 0.3 m short of the main road's interior (no vertex there).
        let (n, s) = node_with(
            layer(&[
                vec![pt(0., 0.), pt(400., 0.)],
                vec![pt(200., 0.3), pt(200., 200.)],
            ]),
            opts(0.5, false),
        );
        n.validate().unwrap();
        assert_eq!(s.undershoots_joined, 1);
        assert_eq!(count(&s, "joined_undershoot"), 1);
        assert_eq!(n.edges.len(), 3, "main road split at the join");
        assert_eq!(degree_sequence(&n), vec![1, 1, 1, 3]);
        // Beyond the tolerance it stays a dangling end.
        let (n, s) = node_with(
            layer(&[
                vec![pt(0., 0.), pt(400., 0.)],
                vec![pt(200., 0.8), pt(200., 200.)],
            ]),
            opts(0.5, false),
        );
        assert_eq!(s.undershoots_joined, 0);
        assert_eq!(n.edges.len(), 2);
    }

    #[test]
    fn overshoot_is_trimmed() {
        // The side road runs 0.3 m past the main road (a vertex shared at the crossing).
        let (n, s) = node_with(
            layer(&[
                vec![pt(0., 0.), pt(200., 0.), pt(400., 0.)],
                vec![pt(200., -0.3), pt(200., 0.), pt(200., 200.)],
            ]),
            opts(0.5, false),
        );
        n.validate().unwrap();
        // The stub is gone, and the change is on record (merged into the junction, or trimmed).
        assert_eq!(
            count(&s, "trimmed_overshoot") + count(&s, "merged_vertices"),
            1
        );
        assert_eq!(n.edges.len(), 3);
        assert_eq!(n.junctions.len(), 4);
        assert_eq!(degree_sequence(&n), vec![1, 1, 1, 3]);
    }

    #[test]
    fn near_duplicate_is_removed() {
        // The same road digitised twice, 0.2 m apart between the same junctions.
        let (n, s) = node_with(
            layer(&[
                vec![pt(0., 0.), pt(100., 10.), pt(200., 0.)],
                vec![pt(0., 0.), pt(100., 10.2), pt(200., 0.)],
            ]),
            opts(0.5, false),
        );
        assert_eq!(s.near_duplicates_dropped + s.duplicate_edges_dropped, 1);
        assert_eq!(n.edges.len(), 1);
        assert_eq!(n.edges[0].feature, 0);
    }

    #[test]
    fn crossings_are_reported_or_joined() {
        let lines = vec![
            vec![pt(0., 0.), pt(200., 0.)],
            vec![pt(100., -100.), pt(100., 100.)],
        ];
        let (n, s) = node_with(layer(&lines), opts(0.5, false));
        assert_eq!(n.edges.len(), 2, "left apart by default (an overpass)");
        assert_eq!(count(&s, "crossing_left_apart"), 1);
        let (n, s) = node_with(layer(&lines), opts(0.5, true));
        n.validate().unwrap();
        assert_eq!(count(&s, "crossing_joined"), 1);
        assert_eq!(n.edges.len(), 4);
        assert_eq!(degree_sequence(&n), vec![1, 1, 1, 1, 4]);
        let total: f64 = n.edges.iter().map(|e| e.length_m).sum();
        let input: f64 = lines
            .iter()
            .map(|l| reknit::ingest::geodesy::polyline_length_m(l.iter().copied()))
            .sum();
        assert!((total - input).abs() < 0.02, "{total} vs {input}");
    }
}
