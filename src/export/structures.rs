//! The plan's roads on structures (bridges, culverts, tunnels), for `summary.json` and the report:
//! each needs inspection before use, whether it is repaired or only used as it stands.

use super::work_order_id::WorkOrderIds;
use crate::network::Network;
use serde::Serialize;

/// One planned road or repair on a structure.
#[derive(Debug, Clone, Serialize)]
pub struct OnStructure {
    /// Its work-order key (as in work-orders.csv and the layers).
    pub work_order: String,
    /// Edge id.
    pub edge: u32,
    /// The kind of structure, as read from the road layer.
    pub structure: String,
    /// Road name and reference number, when the input has them.
    pub road: Option<String>,
    /// True when the road needs repair; false when the plan uses it as it stands.
    pub repair: bool,
    /// `plan`, or `backup` for a backup link's repair.
    pub purpose: &'static str,
}

/// Structures in the network and the plan.
#[derive(Debug, Clone, Serialize)]
pub struct StructureFigures {
    /// How structures were recognised (the field named, or the common fields).
    pub read_from: String,
    /// Edges of the network on a structure.
    pub network_edges: usize,
    /// Edges of the plan on a structure, repaired or not.
    pub planned: usize,
    /// Of those, the ones that need repair.
    pub repairs: usize,
    /// Backup links' repairs on a structure.
    pub backup_repairs: usize,
    /// Every planned road and repair on a structure, in edge order (plan first, then backup).
    pub on_structures: Vec<OnStructure>,
}

/// Collects the structures the plan (and any backup links) use.
pub fn figures(
    net: &Network,
    ids: &WorkOrderIds,
    plan_edges: &[u32],
    backup_edges: &[u32],
    field: Option<&str>,
) -> StructureFigures {
    let on = |e: u32| net.text(net.features[net.edges[e as usize].feature as usize].structure);
    let network_edges = (0..net.edges.len() as u32)
        .filter(|&e| on(e).is_some())
        .count();
    let mut plan: Vec<u32> = plan_edges
        .iter()
        .copied()
        .filter(|&e| on(e).is_some())
        .collect();
    plan.sort_unstable();
    let mut backup: Vec<u32> = backup_edges
        .iter()
        .copied()
        .filter(|&e| on(e).is_some())
        .collect();
    backup.sort_unstable();
    let row = |e: u32, purpose| {
        let edge = &net.edges[e as usize];
        let meta = &net.features[edge.feature as usize];
        OnStructure {
            work_order: ids.key(net, e),
            edge: e,
            structure: on(e).unwrap_or_default().to_string(),
            road: net.text(meta.label).map(str::to_string),
            repair: edge.cost > 0,
            purpose,
        }
    };
    let mut list: Vec<OnStructure> = plan.iter().map(|&e| row(e, "plan")).collect();
    list.extend(backup.iter().map(|&e| row(e, "backup")));
    StructureFigures {
        read_from: match field {
            Some(f) => format!("--structure-field {f}"),
            None => "the fields bridge, tunnel, culvert and structure (also upper case, capitalised and is_ forms)".into(),
        },
        network_edges,
        planned: plan.len(),
        repairs: list
            .iter()
            .filter(|r| r.repair && r.purpose == "plan")
            .count(),
        backup_repairs: backup.len(),
        on_structures: list,
    }
}

/// Writes the report's section on structures: every planned road and repair on one, to inspect
/// before use, or a sentence saying the data marks none.
pub fn write_html<W: std::io::Write>(w: &mut W, st: &StructureFigures) -> std::io::Result<()> {
    use super::text::html as esc;
    writeln!(w, "<h2>Structures: inspect before use</h2>")?;
    if st.on_structures.is_empty() {
        return writeln!(
            w,
            "<p>The data marks no planned road as lying on a bridge, culvert or tunnel (read from \
             {}; {} network edges are marked). Roads whose data does not say so may still cross \
             structures.</p>",
            esc(&st.read_from),
            st.network_edges
        );
    }
    writeln!(
        w,
        "<p>{} planned roads lie on a bridge, culvert or tunnel ({} of them to repair{}): each \
         needs inspection by a qualified engineer before crews or traffic use it, repaired or not \
         (read from {}).</p>",
        st.planned,
        st.repairs,
        match st.backup_repairs {
            0 => String::new(),
            n => format!("; {n} backup repairs too"),
        },
        esc(&st.read_from)
    )?;
    writeln!(
        w,
        "<table><tr><th>Work order</th><th>Structure</th><th>Road</th><th>Needs</th></tr>"
    )?;
    for r in &st.on_structures {
        writeln!(
            w,
            "<tr><td>{}</td><td>{}</td><td>{}</td><td>{}</td></tr>",
            esc(&r.work_order),
            esc(&r.structure),
            esc(r.road.as_deref().unwrap_or("")),
            match (r.repair, r.purpose) {
                (true, "backup") => "inspection, backup repair",
                (true, _) => "inspection and repair",
                (false, _) => "inspection (used as it stands)",
            }
        )?;
    }
    writeln!(w, "</table>")
}
