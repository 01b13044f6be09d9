//! Figures from the CLI: `burnin plot`, and `--figure` of `run` and
//! `merge`. The chart itself is the core's (`burnin::chart`), the same the
//! page draws.

use std::path::Path;

use burnin::chart::{Options, View, figure};
use burnin::experiment::Output;

/// How a figure is drawn (the page's chart controls, and its export size).
#[derive(clap::Args, Clone)]
pub struct FigureArgs {
    /// What the figure shows: cumulative, episode, difference (two learners'
    /// paired difference), or for a sweep: sweep (regret at K), sweep-slope,
    /// sweep-burn-in, sweep-scaling or sweep-regret-scaling (burn-in or
    /// regret at K against the size the sweep changes, log-log, with fitted
    /// and published orders) (default: cumulative, or sweep for a sweep).
    #[arg(long, value_name = "VIEW", help_heading = "Figure")]
    pub view: Option<String>,
    /// Log-log axes.
    #[arg(long, help_heading = "Figure")]
    pub log: bool,
    /// Leave out the 95% bands.
    #[arg(long, help_heading = "Figure")]
    pub no_bands: bool,
    /// Draw the minimax lower-bound shape.
    #[arg(long, help_heading = "Figure")]
    pub lower: bool,
    /// Draw each learner's published bound.
    #[arg(long, help_heading = "Figure")]
    pub bounds: bool,
    /// The two learners (by label) of the difference view (default: the first two).
    #[arg(long, num_args = 2, value_names = ["A", "B"], help_heading = "Figure")]
    pub compare: Option<Vec<String>>,
    /// Leave out the caption under the chart.
    #[arg(long, help_heading = "Figure")]
    pub no_caption: bool,
    /// Figure width in pixels.
    #[arg(
        long,
        value_name = "PX",
        default_value_t = 1280,
        help_heading = "Figure"
    )]
    pub width: u32,
    /// Figure height in pixels.
    #[arg(
        long,
        value_name = "PX",
        default_value_t = 720,
        help_heading = "Figure"
    )]
    pub height: u32,
    /// Type and line scale (the page's exports use 1.25).
    #[arg(
        long,
        value_name = "X",
        default_value_t = 1.25,
        help_heading = "Figure"
    )]
    pub type_scale: f64,
}

/// Widest and tallest figure, in pixels.
const MAX_SIDE: u32 = 8192;

/// The kinds of figure file, by extension.
#[derive(Clone, Copy, PartialEq)]
enum Kind {
    Svg,
    Png,
}

fn kind(path: &Path) -> Result<Kind, String> {
    match path
        .extension()
        .and_then(|e| e.to_str())
        .map(str::to_ascii_lowercase)
        .as_deref()
    {
        Some("svg") => Ok(Kind::Svg),
        Some("png") => Ok(Kind::Png),
        _ => Err(format!(
            "{}: a figure is written as .svg or .png; name the file with one of those extensions",
            path.display()
        )),
    }
}

impl FigureArgs {
    /// The chart options, or what is wrong with the arguments (checked
    /// before anything runs).
    pub fn options(&self) -> Result<Options, String> {
        for (flag, v) in [("--width", self.width), ("--height", self.height)] {
            if !(16..=MAX_SIDE).contains(&v) {
                return Err(format!("{flag} {v}: expected 16 to {MAX_SIDE} pixels"));
            }
        }
        if !(self.type_scale > 0.1 && self.type_scale <= 10.0) {
            return Err(format!(
                "--type-scale {}: expected a number above 0.1 and at most 10",
                self.type_scale
            ));
        }
        let view = match &self.view {
            None => None,
            Some(k) => Some(View::from_key(k).ok_or_else(|| {
                let keys: Vec<&str> = View::ALL.iter().map(|v| v.key()).collect();
                format!("--view {k}: expected one of {}", keys.join(", "))
            })?),
        };
        let compare = self.compare.as_ref().map(|p| (p[0].clone(), p[1].clone()));
        if compare.is_some() && view != Some(View::Difference) {
            return Err(
                "--compare chooses the learners of --view difference; give that view too".into(),
            );
        }
        Ok(Options {
            view,
            log: self.log,
            bands: !self.no_bands,
            lower: self.lower,
            bounds: self.bounds,
            compare,
            caption: !self.no_caption,
        })
    }

    /// Checks the options and the file's extension before a run.
    pub fn check(&self, path: &Path) -> Result<(), String> {
        self.options()?;
        kind(path).map(|_| ())
    }

    /// The figure's bytes: an SVG document or a PNG image, by `path`'s extension.
    pub fn render(&self, out: &Output, path: &Path) -> Result<Vec<u8>, String> {
        let opts = self.options()?;
        let fig = figure(out, &opts)?;
        let (w, h, s) = (self.width, self.height, self.type_scale);
        Ok(match kind(path)? {
            Kind::Svg => burnin::chart::draw::svg(&fig, w, h, s).into_bytes(),
            Kind::Png => burnin::chart::raster::png(&fig, w, h, s),
        })
    }
}
