//! A set of map layers written in the chosen [`OutputFormat`] into a staging folder: one GeoJSON
//! file per layer (each self-contained: its own geometry, cautions and attribution), or every
//! layer into one GeoPackage.

use super::ExportError;
use super::geojson::GeoJsonWriter;
use super::gpkg::GpkgWriter;
use super::sink::{GPKG_FILE, LayerSink, LayerSpec, OutputFormat};
use super::staging::Staging;
use std::io;

/// Fills one layer through its sink.
pub type Fill<'a> = Box<dyn Fn(&mut dyn LayerSink) -> io::Result<()> + Send + Sync + 'a>;

/// One layer to write: what it holds and how to fill it.
pub struct LayerJob<'a> {
    /// Its name, geometry and fields.
    pub spec: LayerSpec,
    /// Its features.
    pub fill: Fill<'a>,
}

impl<'a> LayerJob<'a> {
    /// A layer from its spec and filling function.
    pub fn new<F>(spec: LayerSpec, fill: F) -> Self
    where
        F: Fn(&mut dyn LayerSink) -> io::Result<()> + Send + Sync + 'a,
    {
        LayerJob {
            spec,
            fill: Box::new(fill),
        }
    }
}

/// The files a set of layers makes in `format`.
pub fn file_names(format: OutputFormat, layers: &[&str]) -> Vec<String> {
    match format {
        OutputFormat::GeoJson => layers.iter().map(|l| format!("{l}.geojson")).collect(),
        OutputFormat::GeoPackage => vec![GPKG_FILE.to_string()],
    }
}

/// Writes one GeoJSON file per layer (side by side when `parallel`).
pub fn write_geojson(
    st: &Staging,
    layers: &[LayerJob],
    attribution: Option<&str>,
    parallel: bool,
) -> Result<(), ExportError> {
    let one = |l: &LayerJob| {
        st.write(&l.spec.file_name(), |w| {
            let mut gj = GeoJsonWriter::layer(w, attribution)?;
            (l.fill)(&mut gj)?;
            gj.finish().map(drop)
        })
    };
    if parallel {
        use rayon::prelude::*;
        layers.par_iter().try_for_each(one)
    } else {
        layers.iter().try_for_each(one)
    }
}

/// Writes every layer into `layers.gpkg`, in the order given (one writer: the same bytes
/// whatever the thread count).
pub fn write_gpkg(
    st: &Staging,
    layers: &[LayerJob],
    attribution: Option<&str>,
) -> Result<(), ExportError> {
    st.write_at(GPKG_FILE, |path| {
        let mut g = GpkgWriter::create(path, attribution)?;
        for l in layers {
            g.layer(&l.spec, |sink| (l.fill)(sink))?;
        }
        g.finish()
    })
}

/// Writes the layers in `format`.
pub fn write(
    st: &Staging,
    format: OutputFormat,
    layers: &[LayerJob],
    attribution: Option<&str>,
) -> Result<(), ExportError> {
    match format {
        OutputFormat::GeoJson => write_geojson(st, layers, attribution, false),
        OutputFormat::GeoPackage => write_gpkg(st, layers, attribution),
    }
}
