//! Export stage: writes the network, the plan and the summary, all or nothing.
//!
//! Layers are written through one interface ([`sink::LayerSink`]): RFC 7946 GeoJSON files in
//! WGS84 lon/lat with at most 7 decimals, or (`--output-format gpkg`) one GeoPackage
//! ([`gpkg`]); every file is staged and moved into place together ([`staging`]), so outputs are
//! byte-identical for the same inputs.

pub mod backup;
pub mod band;
pub mod clip;
pub mod corridors;
pub mod drawing;
pub mod geojson;
pub mod gpkg;
pub mod guard;
pub mod labels;
pub mod layer_set;
pub mod layout;
pub mod legend;
pub mod metrics;
pub mod ownership;
pub mod page;
pub mod palette;
pub mod picture;
pub mod raster;
pub mod report;
pub mod report_crews;
pub mod report_parts;
pub mod report_tables;
pub mod scene;
pub mod single_failures;
pub mod sink;
pub mod sites;
pub mod specs;
pub mod staging;
pub mod strokes;
pub mod structures;
pub mod summary;
pub mod text;
pub mod work_order_id;
pub mod work_orders;

use crate::network::{Network, cost_to_repair_metres};
use crate::solve::Plan;
use crate::solve::components::Components;
use geojson::Prop;
use layer_set::LayerJob;
use sink::{LayerSink, OutputFormat};
use std::path::PathBuf;
pub use summary::Summary;

/// Errors of the export stage.
#[derive(Debug, thiserror::Error)]
pub enum ExportError {
    /// A file or folder could not be written.
    #[error("{path}: cannot write: {source}")]
    Io {
        /// The output path.
        path: PathBuf,
        /// The operating system's error.
        source: std::io::Error,
    },
    /// The output path exists and is not a folder.
    #[error("{0}: the output path exists and is not a folder")]
    NotAFolder(PathBuf),
    /// The output path is a symbolic link.
    #[error(
        "{0}: the output folder is a symbolic link; give the folder it points to (outputs are never written through a link)"
    )]
    Symlink(PathBuf),
    /// The output folder would mix with or replace what the run reads.
    #[error(
        "{out}: --out {why} {input}; choose a folder of its own so outputs never mix with or replace inputs"
    )]
    OverInputs {
        /// The output folder.
        out: PathBuf,
        /// The input it would hold or lie in.
        input: PathBuf,
        /// How the two overlap.
        why: &'static str,
    },
    /// The output folder is the root of the file system.
    #[error("{0}: --out may not be the root folder; choose a folder of its own")]
    RootFolder(PathBuf),
    /// An entry with an output's name that reknit did not write.
    #[error(
        "{path}: is {what}; reknit replaces only the outputs it recorded writing, even with --force: move it away or choose another --out"
    )]
    NotOurs {
        /// The entry.
        path: PathBuf,
        /// What it is.
        what: &'static str,
    },
    /// The output folder already holds outputs and `--force` was not given.
    #[error("{dir}: already holds outputs ({files}); pass --force to replace them")]
    WouldReplace {
        /// The output folder.
        dir: PathBuf,
        /// The outputs found.
        files: String,
    },
}

/// Everything one planning run writes.
pub struct Outputs<'a> {
    /// The network.
    pub net: &'a Network,
    /// Its components.
    pub comps: &'a Components,
    /// The plan.
    pub plan: &'a Plan,
    /// The sites layer rows, when there are sites.
    pub sites: Option<&'a [sites::SiteRow]>,
    /// QA points.
    pub qa: &'a [crate::ingest::qa::QaPoint],
    /// The plan's repairs in order, with their days.
    pub steps: &'a [crate::solve::order::Step],
    /// Site ids by site index (empty without sites).
    pub site_ids: &'a [String],
    /// The work-order keys of the network's pieces.
    pub keys: &'a work_order_id::WorkOrderIds,
    /// Single points of failure (plans with sites).
    pub single_failures: Option<&'a single_failures::SingleFailureLayer>,
    /// Backup links (with --redundancy).
    pub backup: Option<&'a backup::BackupLayer>,
    /// Corridors from the hub to the joined sites (plans with a hub).
    pub corridors: Option<&'a corridors::CorridorLayer>,
    /// The district's name, for the picture.
    pub title: &'a str,
    /// Sites to draw.
    pub marks: &'a [picture::SiteMark<'a>],
    /// The changes against the previous plan (a re-plan only).
    pub changes: Option<&'a crate::replan::changes::Changes<'a>>,
    /// Outer rings of the damage zones, lon/lat (empty without zones).
    pub zones: &'a [Vec<[f64; 2]>],
    /// True when `--crew-capacity` grouped the repairs into days.
    pub scheduled: bool,
    /// The budget given (`--budget`), repair-metres.
    pub budget: Option<f64>,
    /// The summary.
    pub summary: &'a Summary,
    /// The format of the map layers.
    pub format: OutputFormat,
}

/// The files of one output set in the order of [`staging::OUTPUT_NAMES`] (`summary.json` last):
/// the layers every run writes plus the sites, single-failure, backup and corridor layers when
/// there are any, as GeoJSON files or all in `layers.gpkg`.
pub fn output_names(
    format: OutputFormat,
    sites: bool,
    single_failures: bool,
    backup: bool,
    corridors: bool,
) -> Vec<&'static str> {
    staging::OUTPUT_NAMES
        .iter()
        .copied()
        .filter(|n| match *n {
            n if n.ends_with(".geojson") && format != OutputFormat::GeoJson => false,
            sink::GPKG_FILE => format == OutputFormat::GeoPackage,
            "sites.geojson" => sites,
            "single-failures.geojson" => single_failures,
            "backup.geojson" => backup,
            "corridors.geojson" => corridors,
            // Only a re-plan writes it (the caller adds it).
            "changes.geojson" => false,
            _ => true,
        })
        .collect()
}

/// Writes the map layers (GeoJSON files, or `layers.gpkg`), the work orders, the pictures, the
/// report and `summary.json` into `out` as one set.
pub fn write_outputs(out: &guard::CheckedOut, force: bool, o: &Outputs) -> Result<(), ExportError> {
    let st = staging::Staging::begin(out, force)?;
    let attribution = o.summary.attribution.as_deref();
    let ids = o.keys;
    let sheet = work_orders::Sheet {
        net: o.net,
        steps: o.steps,
        backup: o.backup.map_or(&[][..], |b| &b.rows[..]),
        detour: o.corridors.map_or(&[][..], |c| &c.detour_repairs[..]),
        site_ids: o.site_ids,
        ids,
    };
    let work_orders = || {
        st.write("work-orders.csv", |w| {
            work_orders::write_work_orders(w, sheet)
        })
    };
    let order_of: crate::fxhash::FxHashMap<u32, &crate::solve::order::Step> =
        o.steps.iter().map(|s| (s.edge, s)).collect();
    let backup_edges: Vec<u32> = o
        .backup
        .map_or_else(Vec::new, |b| b.rows.iter().map(|r| r.edge).collect());
    let scene = scene::Scene {
        title: o.title,
        net: o.net,
        plan_edges: &o.plan.edges,
        steps: o.steps,
        backup_edges: &backup_edges,
        zones: o.zones,
        sites: o.marks,
        scheduled: o.scheduled,
        caution: crate::cautions::SHORT,
        attribution,
    };
    // Every file is made from the plan alone, none from another file (only the report embeds
    // the PNG picture), so they are written side by side: each file's bytes are the same
    // whichever thread writes it and whenever, and staging lists them by name.
    // What reading, noding and solving freed goes back to the system before the writers'
    // buffers come on top of the network and the plan.
    crate::heap::release_freed();
    crate::progress::mem_mark("writing: start");
    let (drawn, orders) = rayon::join(|| drawing::prepare(&scene), work_orders);
    orders?;
    crate::progress::mem_mark("writing: drawing prepared, work orders");
    let pictures = || -> Result<(), ExportError> {
        let (svg, png) = rayon::join(
            || {
                st.write("plan.svg", |w| {
                    picture::write_drawing(w, &scene, &drawn, true)
                })
            },
            || {
                raster::render_drawing(&scene, &drawn).map_err(|e| ExportError::Io {
                    path: out.given().join("plan.png"),
                    source: std::io::Error::other(e),
                })
            },
        );
        svg?;
        let png = png?;
        crate::progress::mem_mark("writing: svg and png");
        st.write("plan.png", |w| std::io::Write::write_all(w, &png))?;
        st.write("report.html", |w| {
            report::write_report(
                w,
                &report::Context {
                    title: o.title,
                    png: &png,
                    summary: o.summary,
                    net: o.net,
                    steps: o.steps,
                    keys: ids,
                    sites: o.sites.unwrap_or_default(),
                    site_ids: o.site_ids,
                    single_failures: o.single_failures,
                    backup: o.backup,
                    budget: o.budget,
                    scheduled: o.scheduled,
                },
            )
        })?;
        crate::progress::mem_mark("writing: report");
        Ok(())
    };
    let map_page = || {
        st.write("map.html", |w| {
            let rows = |f: &mut dyn FnMut(&[String; 25])| {
                work_orders::rows(sheet, text::plain).for_each(|r| f(&r))
            };
            page::write_page(
                w,
                &page::Page {
                    scene: &scene,
                    drawing: &drawn,
                    sites: o.sites.unwrap_or_default(),
                    qa: o.qa,
                    single_failures: o.single_failures,
                    backup: o.backup,
                    corridors: o.corridors,
                    rows: &rows,
                    keys: ids,
                },
            )
        })?;
        crate::progress::mem_mark("writing: map page");
        Ok(())
    };
    let all = plan_layers(o, &order_of);
    let layers = || match o.format {
        // The network and the plan are the big layers: side by side, the others after them.
        OutputFormat::GeoJson => layer_set::write_geojson(&st, &all[..2], attribution, true)
            .and_then(|()| layer_set::write_geojson(&st, &all[2..], attribution, false)),
        OutputFormat::GeoPackage => layer_set::write_gpkg(&st, &all, attribution),
    };
    let layers = || {
        layers()?;
        crate::progress::mem_mark("writing: layers");
        Ok::<(), ExportError>(())
    };
    let ((pictured, paged), written) = rayon::join(|| rayon::join(pictures, map_page), layers);
    pictured?;
    paged?;
    written?;
    st.write("summary.json", |w| {
        serde_json::to_writer_pretty(&mut *w, o.summary)?;
        std::io::Write::write_all(w, b"\n")
    })?;
    let mut listed = o.summary.outputs.clone();
    let mut written = st.names();
    listed.sort_unstable();
    written.sort_unstable();
    if listed != written {
        return Err(ExportError::Io {
            path: out.given().join(staging::COMPLETE_MARKER),
            source: std::io::Error::other(format!(
                "internal error (a bug): summary.json lists {listed:?} but {written:?} were written"
            )),
        });
    }
    st.commit()
}

/// Every layer of a plan, in the order of [`staging::OUTPUT_NAMES`] (the network and the plan
/// first): those the run has.
fn plan_layers<'a>(
    o: &'a Outputs<'a>,
    order_of: &'a crate::fxhash::FxHashMap<u32, &'a crate::solve::order::Step>,
) -> Vec<LayerJob<'a>> {
    let (net, comps, ids) = (o.net, o.comps, o.keys);
    let mut v = vec![
        LayerJob::new(specs::edges("network", net, false), move |s| {
            write_edges(s, net, comps, None, None, ids)
        }),
        LayerJob::new(specs::edges("plan", net, true), move |s| {
            write_edges(s, net, comps, Some(&o.plan.edges), Some(order_of), ids)
        }),
    ];
    if let Some(rows) = o.sites {
        v.push(LayerJob::new(specs::sites(rows), move |s| {
            sites::write_sites(s, rows)
        }));
    }
    v.push(LayerJob::new(specs::qa(), move |s| write_qa(s, net, o.qa)));
    if let Some(f) = o.single_failures {
        v.push(LayerJob::new(specs::single_failures(), move |s| {
            single_failures::write_single_failures(s, net, f, ids)
        }));
    }
    if let Some(b) = o.backup {
        v.push(LayerJob::new(specs::backup(net), move |s| {
            backup::write_backup(s, net, b, ids)
        }));
    }
    if let Some(c) = o.corridors {
        v.push(LayerJob::new(specs::corridors(), move |s| {
            corridors::write_corridors(s, net, c)
        }));
    }
    if let Some(c) = o.changes {
        v.push(LayerJob::new(specs::changes(), move |s| {
            c.write(s, net, ids)
        }));
    }
    v
}

/// How many of an edge's fields the `network` layer has: those before `repair`, where the plan's
/// own fields begin (checked on every edge in debug builds).
const NETWORK_FIELDS: usize = 14;

/// Writes the given edges (all when `only` is `None`: the `network` layer; else the `plan`
/// layer's, with their order, crew and days when `order_of` has them) as LineString features.
pub fn write_edges<S: LayerSink + ?Sized>(
    gj: &mut S,
    net: &Network,
    comps: &Components,
    only: Option<&[u32]>,
    order_of: Option<&crate::fxhash::FxHashMap<u32, &crate::solve::order::Step>>,
    keys: &work_order_id::WorkOrderIds,
) -> std::io::Result<()> {
    let n = only.map_or(net.edges.len(), <[u32]>::len);
    gj.lines_each(n, &|i, out, key| {
        let e = only.map_or(i as u32, |ids| ids[i]);
        let edge = &net.edges[e as usize];
        let meta = &net.features[edge.feature as usize];
        let [damage, impassable] = damage_props(edge);
        let cost = if edge.usable() {
            Prop::Fixed3(cost_to_repair_metres(edge.cost))
        } else {
            Prop::Null
        };
        let component = if edge.usable() {
            Prop::Int(comps.of[edge.from as usize] as i64)
        } else {
            Prop::Null
        };
        let source_id = meta.source_id.as_ref().map_or(Prop::Null, Prop::Json);
        keys.key_into(key, net, e);
        let step = order_of.and_then(|m| m.get(&e));
        let int = |x: Option<u32>| x.map_or(Prop::Null, |v| Prop::Int(v as i64));
        let props = [
            ("edge", Prop::Int(e as i64)),
            ("from", Prop::Int(edge.from as i64)),
            ("to", Prop::Int(edge.to as i64)),
            ("length_m", Prop::Fixed3(edge.length_m)),
            damage,
            impassable,
            ("cost", cost),
            ("component", component),
            ("source_index", Prop::Int(meta.source_index as i64)),
            (
                "source_layer",
                net.source_layer(edge.feature).map_or(Prop::Null, Prop::Str),
            ),
            ("source_id", source_id),
            (
                "category",
                net.text(meta.category).map_or(Prop::Null, Prop::Str),
            ),
            (
                "structure",
                net.text(meta.structure).map_or(Prop::Null, Prop::Str),
            ),
            ("work_order", Prop::Str(key)),
            ("repair", Prop::Bool(edge.cost > 0)),
            ("order", int(step.map(|s| s.order))),
            ("crew", int(step.and_then(|s| s.crew))),
            ("first_day", int(step.and_then(|s| s.first_day))),
            ("last_day", int(step.and_then(|s| s.last_day))),
        ];
        debug_assert_eq!(props[NETWORK_FIELDS].0, "repair");
        let props = if only.is_some() {
            &props[..]
        } else {
            &props[..NETWORK_FIELDS]
        };
        out.line(props, net.edge_geometry(e as usize));
    })?;
    Ok(())
}

/// The `damage` (a number, or null when impassable) and `impassable` properties of an edge: one
/// type per property in every layer.
pub(crate) fn damage_props(edge: &crate::network::Edge) -> [(&'static str, Prop<'static>); 2] {
    [
        ("damage", edge.damage.factor().map_or(Prop::Null, Prop::Num)),
        ("impassable", Prop::Bool(edge.damage.factor().is_none())),
    ]
}

/// Writes QA points: kind (code and words), distance moved (or gap), and the input feature where
/// known, as its position in its source layer and that layer's label.
pub fn write_qa<S: LayerSink + ?Sized>(
    gj: &mut S,
    net: &Network,
    qa: &[crate::ingest::qa::QaPoint],
) -> std::io::Result<()> {
    for q in qa {
        let meta = q
            .feature
            .and_then(|f| net.features.get(f as usize).map(|m| (f, m)));
        gj.point(
            &[
                ("kind", Prop::Str(q.kind.code())),
                ("kind_label", Prop::Str(q.kind.label())),
                ("distance_m", Prop::Fixed3(q.distance_m)),
                (
                    "source_index",
                    meta.map_or(Prop::Null, |(_, m)| Prop::Int(m.source_index as i64)),
                ),
                (
                    "source_layer",
                    meta.and_then(|(f, _)| net.source_layer(f))
                        .map_or(Prop::Null, Prop::Str),
                ),
            ],
            q.pos,
        )?;
    }
    Ok(())
}

/// The layers of `reknit check`: the noded network (every edge) and the QA points.
pub fn check_layers<'a>(
    net: &'a Network,
    comps: &'a Components,
    ids: &'a work_order_id::WorkOrderIds,
    qa: &'a [crate::ingest::qa::QaPoint],
) -> Vec<LayerJob<'a>> {
    vec![
        LayerJob::new(specs::edges("network", net, false), move |s| {
            write_edges(s, net, comps, None, None, ids)
        }),
        LayerJob::new(specs::qa(), move |s| write_qa(s, net, qa)),
    ]
}

/// Writes every edge of the network as a GeoJSON layer (as `network.geojson`).
pub fn write_network<W: std::io::Write + Send>(
    w: W,
    net: &Network,
    comps: &Components,
    attribution: Option<&str>,
) -> std::io::Result<()> {
    let ids = work_order_id::WorkOrderIds::new(net);
    let mut gj = geojson::GeoJsonWriter::layer(w, attribution)?;
    write_edges(&mut gj, net, comps, None, None, &ids)?;
    gj.finish().map(drop)
}
