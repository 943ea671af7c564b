//! Reader for the SteinLib STP format (Koch, Martin & Voß 2001), for tests and benchmarks.
//!
//! Reads the `Graph` section's `Nodes`, `E u v w` lines and the `Terminals` section's `T t` lines;
//! vertices are renumbered from 1-based to 0-based. Other sections are skipped.

use super::graph::EdgeList;

/// A Steiner tree instance: the graph and its terminals.
#[derive(Debug, Clone)]
pub struct Instance {
    /// Graph with integer edge costs.
    pub graph: EdgeList,
    /// Terminal vertices (0-based).
    pub terminals: Vec<u32>,
}

/// Parses STP text; the error names the line.
pub fn parse(text: &str) -> Result<Instance, String> {
    let mut section = String::new();
    let mut nodes: Option<usize> = None;
    let mut g = EdgeList::default();
    let mut terminals = Vec::new();
    for (i, raw) in text.lines().enumerate() {
        let line = raw.trim();
        let err = |m: &str| format!("line {}: {m}: {line:?}", i + 1);
        if line.is_empty() || line.starts_with('#') {
            continue;
        }
        let mut it = line.split_whitespace();
        let head = it.next().unwrap_or("");
        if head.eq_ignore_ascii_case("SECTION") {
            section = it.next().unwrap_or("").to_ascii_lowercase();
            continue;
        }
        if head.eq_ignore_ascii_case("END") || head.eq_ignore_ascii_case("EOF") {
            section.clear();
            continue;
        }
        let num = |s: Option<&str>| -> Result<u64, String> {
            s.ok_or_else(|| err("missing number"))?
                .parse::<u64>()
                .map_err(|_| err("not a whole number"))
        };
        match (section.as_str(), head.to_ascii_lowercase().as_str()) {
            ("graph", "nodes") => {
                if nodes.is_some() {
                    // A second count would leave earlier edges pointing past the new end.
                    return Err(err("a second Nodes line"));
                }
                let n = num(it.next())? as usize;
                if n > u32::MAX as usize / 2 {
                    return Err(err("too many nodes"));
                }
                nodes = Some(n);
                g.vertices = n;
            }
            ("graph", "e") | ("graph", "a") => {
                let n = nodes.ok_or_else(|| err("edge before the Nodes line"))?;
                let (u, v, w) = (num(it.next())?, num(it.next())?, num(it.next())?);
                if u == 0 || v == 0 || u as usize > n || v as usize > n {
                    return Err(err("vertex out of range"));
                }
                if w >= super::graph::UNUSABLE / 4 {
                    return Err(err("cost too large"));
                }
                g.ends.push([(u - 1) as u32, (v - 1) as u32]);
                g.cost.push(w);
            }
            ("terminals", "t") => {
                let n = nodes.ok_or_else(|| err("terminal before the Nodes line"))?;
                let t = num(it.next())?;
                if t == 0 || t as usize > n {
                    return Err(err("terminal out of range"));
                }
                terminals.push((t - 1) as u32);
            }
            _ => {}
        }
    }
    if nodes.is_none() {
        return Err("no Graph section with a Nodes line".into());
    }
    terminals.sort_unstable();
    terminals.dedup();
    Ok(Instance {
        graph: g,
        terminals,
    })
}

#[cfg(test)]
mod tests {
    #[test]
    fn parses_a_small_instance() {
        let text = "33D32945 STP File\nSECTION Graph\nNodes 3\nEdges 2\nE 1 2 5\nE 2 3 7\nEND\n\
                    SECTION Terminals\nTerminals 2\nT 1\nT 3\nEND\nEOF\n";
        let inst = super::parse(text).unwrap();
        assert_eq!(inst.graph.vertices, 3);
        assert_eq!(inst.graph.ends, vec![[0, 1], [1, 2]]);
        assert_eq!(inst.terminals, vec![0, 2]);
        assert!(super::parse("SECTION Graph\nNodes 2\nE 1 5 3\n").is_err());
        assert!(super::parse("garbage").is_err());
        // Found by fuzzing: a second, smaller Nodes count after the edges.
        assert!(
            super::parse("SECTION Graph\nNodes 6\nE 1 5 7\nEND\nSECTION Graph\nNodes 2\n").is_err()
        );
    }
}
