//! Charts of results, drawn once for every front end: the page draws them
//! into its canvases (plotters-canvas), the page's SVG export and
//! `burnin plot` write the same SVG (plotters' SVG backend), and the CLI
//! writes PNG through plotters' bitmap backend with glyphs from the
//! embedded typeface (`font/`), so no system font is needed.
//!
//! A chart is made in three steps: [`figure`] turns results and [`Options`]
//! into series (what is drawn: curves, bands, bounds, marks, legend
//! entries); [`layout::Layout`] places them in a w×h box (ticks, legend,
//! title, caption, and the data↔pixel mapping the page's hover read-out
//! uses); [`draw`] draws them on any plotters backend.

pub mod colours;
pub mod draw;
pub mod layout;
#[cfg(not(target_arch = "wasm32"))]
pub mod raster;

use serde::{Deserialize, Serialize};

use crate::experiment::{Output, Results};
use colours::{MUTED, Rgb, series_colour};

/// What a chart shows.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "lowercase")]
pub enum View {
    /// Cumulative expected regret against the episode.
    Cumulative,
    /// Expected regret of each episode.
    Episode,
    /// The paired difference of two learners' cumulative regret.
    Difference,
    /// Regret at K against the swept value.
    Sweep,
    /// The tail slope (with its bootstrap interval) against the swept value.
    #[serde(rename = "sweep-slope")]
    SweepSlope,
    /// The burn-in (with its bootstrap interval) against the swept value;
    /// points that had not settled by K are left out.
    #[serde(rename = "sweep-burn-in")]
    SweepBurnIn,
    /// Burn-in against the size the sweep changes, on log–log axes, with
    /// each learner's fitted power law and its published order.
    #[serde(rename = "sweep-scaling")]
    SweepScaling,
    /// The same for regret at K.
    #[serde(rename = "sweep-regret-scaling")]
    SweepRegretScaling,
}

impl View {
    pub const ALL: [View; 8] = [
        View::Cumulative,
        View::Episode,
        View::Difference,
        View::Sweep,
        View::SweepSlope,
        View::SweepBurnIn,
        View::SweepScaling,
        View::SweepRegretScaling,
    ];

    pub fn key(self) -> &'static str {
        match self {
            View::Cumulative => "cumulative",
            View::Episode => "episode",
            View::Difference => "difference",
            View::Sweep => "sweep",
            View::SweepSlope => "sweep-slope",
            View::SweepBurnIn => "sweep-burn-in",
            View::SweepScaling => "sweep-scaling",
            View::SweepRegretScaling => "sweep-regret-scaling",
        }
    }

    pub fn from_key(key: &str) -> Option<View> {
        View::ALL.into_iter().find(|v| v.key() == key)
    }
}

/// How to draw a chart: the page's controls, and `burnin plot`'s options.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(default, deny_unknown_fields)]
pub struct Options {
    /// None: the first view the results have ([`views`]).
    pub view: Option<View>,
    /// Log-log axes.
    pub log: bool,
    /// 95% bands (none with one seed: a zero-width band would read as certainty).
    pub bands: bool,
    /// The minimax lower-bound shape.
    pub lower: bool,
    /// Each learner's published bound.
    pub bounds: bool,
    /// The learners compared by the difference view, by label (None: the
    /// first two).
    pub compare: Option<(String, String)>,
    /// Whether the caption is drawn under the chart (exports carry it; the
    /// page shows it as text under its canvas).
    pub caption: bool,
}

impl Default for Options {
    fn default() -> Options {
        Options {
            view: None,
            log: false,
            bands: true,
            lower: false,
            bounds: false,
            compare: None,
            caption: true,
        }
    }
}

/// One thing drawn: a curve with an optional band, a mark, or a legend-only
/// entry (no points).
#[derive(Debug, Clone, PartialEq)]
pub struct Series {
    pub label: String,
    pub colour: Rgb,
    pub x: Vec<f64>,
    pub y: Vec<f64>,
    /// The band's lower and upper edges (same length as `y`), if drawn.
    pub band: Option<(Vec<f64>, Vec<f64>)>,
    /// Dash and gap lengths (at scale 1), or solid.
    pub dash: Option<(f64, f64)>,
    /// Line width at scale 1.
    pub width: f64,
    /// Whether the legend lists it.
    pub legend: bool,
    /// Whether it is a curve over the chart's x values (read out on hover),
    /// rather than a mark.
    pub curve: bool,
}

impl Series {
    fn curve(label: String, colour: Rgb, x: Vec<f64>, y: Vec<f64>) -> Series {
        Series {
            label,
            colour,
            x,
            y,
            band: None,
            dash: None,
            width: 2.0,
            legend: true,
            curve: true,
        }
    }

    fn mark(label: String, colour: Rgb, x: Vec<f64>, y: Vec<f64>, width: f64) -> Series {
        Series {
            width,
            curve: false,
            ..Series::curve(label, colour, x, y)
        }
    }
}

/// A chart's content, before it is placed in a box.
#[derive(Debug, Clone, PartialEq)]
pub struct Figure {
    pub title: String,
    pub x_label: String,
    /// What the hover read-out calls x ("k", or the swept parameter).
    pub x_name: String,
    pub y_label: String,
    pub log: bool,
    /// Points with error bars (the sweep) instead of curves with bands.
    pub bars: bool,
    pub series: Vec<Series>,
    /// Drawn under the chart when not empty.
    pub caption: String,
}

/// The views these results can be shown in, with the page's words for
/// them (the first is the default).
pub fn views(out: &Output) -> Vec<(View, String)> {
    match out {
        Output::Sweep(s) => {
            let mut v = vec![
                (View::Sweep, format!("regret at K against {}", s.parameter)),
                (View::SweepSlope, format!("slope against {}", s.parameter)),
                (
                    View::SweepBurnIn,
                    format!("burn-in against {}", s.parameter),
                ),
            ];
            if let Some(x) = &s.scaling_in {
                v.push((View::SweepScaling, format!("burn-in scaling in {x}")));
                v.push((
                    View::SweepRegretScaling,
                    format!("regret-at-K scaling in {x}"),
                ));
            }
            v
        }
        Output::Single(r) => {
            let mut v = vec![
                (View::Cumulative, "cumulative regret".to_string()),
                (
                    View::Episode,
                    if r.learners.iter().any(|l| !l.certificate_mean.is_empty()) {
                        "per-episode regret and certificates".to_string()
                    } else {
                        "per-episode regret".to_string()
                    },
                ),
            ];
            if !r.comparisons.is_empty() {
                v.push((View::Difference, "paired difference A − B".to_string()));
            }
            v
        }
    }
}

/// Checks `opts` against the results an experiment will give (a sweep or
/// not, with these learner labels) before it runs, so a figure that cannot
/// be drawn is refused before hours of running rather than after.
pub fn check_planned(opts: &Options, sweep: bool, labels: &[&str]) -> Result<(), String> {
    let have: Vec<View> = if sweep {
        vec![
            View::Sweep,
            View::SweepSlope,
            View::SweepBurnIn,
            View::SweepScaling,
            View::SweepRegretScaling,
        ]
    } else if labels.len() >= 2 {
        vec![View::Cumulative, View::Episode, View::Difference]
    } else {
        vec![View::Cumulative, View::Episode]
    };
    if let Some(v) = opts.view
        && !have.contains(&v)
    {
        let keys: Vec<&str> = have.iter().map(|v| v.key()).collect();
        return Err(format!(
            "this experiment's results will have no {} view; they will have: {}",
            v.key(),
            keys.join(", ")
        ));
    }
    if let Some((a, b)) = &opts.compare {
        for name in [a, b] {
            if !labels.contains(&name.as_str()) {
                return Err(format!(
                    "no learner is labelled {name:?}; the labels are: {}",
                    labels.join(", ")
                ));
            }
        }
    }
    Ok(())
}

/// Whether these results ran one seed per learner (no interval exists).
fn one_seed(out: &Output) -> bool {
    match out {
        Output::Single(r) => r.seeds < 2,
        Output::Sweep(s) => s.points.first().is_none_or(|p| p.seeds < 2),
    }
}

/// The chart of `out` as `opts` asks; a view the results do not have is
/// refused with the views they have.
pub fn figure(out: &Output, opts: &Options) -> Result<Figure, String> {
    let have = views(out);
    let view = opts.view.unwrap_or(have[0].0);
    if !have.iter().any(|(v, _)| *v == view) {
        let keys: Vec<&str> = have.iter().map(|(v, _)| v.key()).collect();
        return Err(format!(
            "these results have no {} view; they have: {}",
            view.key(),
            keys.join(", ")
        ));
    }
    let bands = opts.bands && !one_seed(out);
    let mut fig = match (out, view) {
        (Output::Sweep(s), View::SweepSlope | View::SweepBurnIn) => {
            sweep_readings(s, view == View::SweepBurnIn, opts, bands)
        }
        (Output::Sweep(s), View::SweepScaling | View::SweepRegretScaling) => {
            scaling(s, view == View::SweepScaling)
        }
        (Output::Sweep(s), _) => {
            let series = s
                .learners
                .iter()
                .enumerate()
                .map(|(i, l)| Series {
                    band: bands.then(|| (l.regret_lo.clone(), l.regret_hi.clone())),
                    ..Series::curve(
                        l.label.clone(),
                        series_colour(i),
                        s.values.clone(),
                        l.regret_mean.clone(),
                    )
                })
                .collect();
            let k = s.points.first().map_or(0, |p| p.episodes);
            Figure {
                title: format!(
                    "Regret at K = {} against {}",
                    grouped(k as f64),
                    s.parameter
                ),
                x_label: s.parameter.clone(),
                x_name: s.parameter.clone(),
                y_label: "regret at K".into(),
                log: opts.log,
                bars: true,
                series,
                caption: String::new(),
            }
        }
        (Output::Single(r), View::Difference) => difference(r, opts, bands)?,
        (Output::Single(r), _) => curves(r, opts, view == View::Episode, bands),
    };
    if opts.caption {
        fig.caption = caption(out, opts);
    }
    for s in &mut fig.series {
        s.tidy();
    }
    Ok(fig)
}

/// A sweep's slope or burn-in against the swept value, per learner, with
/// the bootstrap intervals as error bars; a point whose reading does not
/// exist (not settled, or a slope with no positive regret) is left out, and
/// a learner's bars are drawn only when every point it has carries both
/// ends of its interval.
fn sweep_readings(
    s: &crate::experiment::SweepResults,
    burn_in: bool,
    opts: &Options,
    bands: bool,
) -> Figure {
    let series = s
        .learners
        .iter()
        .enumerate()
        .map(|(li, l)| {
            let (mut x, mut y, mut lo, mut hi) = (Vec::new(), Vec::new(), Vec::new(), Vec::new());
            let mut whole = true;
            for (p, &v) in s.points.iter().zip(&s.values) {
                let r = &p.learners[li];
                let (point, interval) = if burn_in {
                    (
                        r.burn_in.map(|b| b as f64),
                        r.burn_in_interval
                            .and_then(|(a, b)| Some((a? as f64, b? as f64))),
                    )
                } else {
                    (r.slope, r.slope_interval)
                };
                let Some(point) = point else { continue };
                x.push(v);
                y.push(point);
                match interval {
                    Some((a, b)) => {
                        lo.push(a);
                        hi.push(b);
                    }
                    None => whole = false,
                }
            }
            Series {
                band: (bands && whole).then_some((lo, hi)),
                ..Series::curve(l.label.clone(), series_colour(li), x, y)
            }
        })
        .collect();
    let (what, axis) = if burn_in {
        ("Burn-in", "burn-in (episodes)")
    } else {
        ("Slope of regret", "log-log slope over the last decade")
    };
    Figure {
        title: format!("{what} against {}", s.parameter),
        x_label: s.parameter.clone(),
        x_name: s.parameter.clone(),
        y_label: axis.into(),
        log: opts.log,
        bars: true,
        series,
        caption: String::new(),
    }
}

/// Burn-in (or regret at K) against the size a sweep changes, log–log:
/// the measured points, the fitted power law over them, and the published
/// order as a line of its exponent through the first measured point.
fn scaling(s: &crate::experiment::SweepResults, burn_in: bool) -> Figure {
    use crate::experiment::scaling::{exponent, exponent_text};
    let x_name = s.scaling_in.clone().unwrap_or_default();
    let mut series = Vec::new();
    for (li, l) in s.learners.iter().enumerate() {
        let colour = series_colour(li);
        let (mut x, mut y) = (Vec::new(), Vec::new());
        for (pi, &xv) in s.scaling_x.iter().enumerate() {
            let v = if burn_in {
                l.burn_in.get(pi).copied().flatten().map(|b| b as f64)
            } else {
                l.regret_mean.get(pi).copied()
            };
            if let Some(v) = v.filter(|v| *v > 0.0 && v.is_finite()) {
                x.push(xv);
                y.push(v);
            }
        }
        if x.is_empty() {
            continue;
        }
        let (x0, x1) = (x[0], *x.last().expect("a point"));
        let fit = exponent(&x, &y);
        series.push(Series::curve(l.label.clone(), colour, x.clone(), y.clone()));
        // The least-squares line itself, through the mean of the logs.
        if let Some(b) = fit {
            let n = x.len() as f64;
            let mx = x.iter().map(|v| libm::log(*v)).sum::<f64>() / n;
            let my = y.iter().map(|v| libm::log(*v)).sum::<f64>() / n;
            let at = |xv: f64| libm::exp(my + b * (libm::log(xv) - mx));
            series.push(Series {
                width: 1.0,
                ..Series::curve(
                    format!("{}: fit {x_name}^{}", l.label, exponent_text(b)),
                    colour,
                    vec![x0, x1],
                    vec![at(x0), at(x1)],
                )
            });
        }
        let published = l.scaling.as_ref().and_then(|sc| {
            if burn_in {
                sc.published_burn_in_exponent
            } else if sc.published_regret_trivial {
                // The bound is H·K at every point: no order to draw.
                None
            } else {
                sc.published_regret_exponent
            }
        });
        if let Some(b) = published {
            let applies = l.scaling.as_ref().is_some_and(|sc| sc.published_applies);
            series.push(Series {
                dash: Some(if applies { (7.0, 4.0) } else { (2.0, 7.0) }),
                width: 1.2,
                ..Series::curve(
                    format!(
                        "{}: published {x_name}^{}{}",
                        l.label,
                        exponent_text(b),
                        if applies { "" } else { " (does not apply)" }
                    ),
                    colour,
                    vec![x0, x1],
                    vec![y[0], y[0] * libm::pow(x1 / x0, b)],
                )
            });
        }
    }
    let what = if burn_in { "Burn-in" } else { "Regret at K" };
    Figure {
        title: format!("{what} against {x_name}, log–log, with fitted and published orders"),
        x_label: x_name.clone(),
        x_name,
        y_label: if burn_in {
            "burn-in (episodes)".into()
        } else {
            "regret at K".into()
        },
        log: true,
        bars: false,
        series,
        caption: String::new(),
    }
}

impl Series {
    /// Cuts x, y and the band to their common length, so a damaged file
    /// draws what it has instead of failing.
    fn tidy(&mut self) {
        let mut n = self.x.len().min(self.y.len());
        if let Some((lo, hi)) = &self.band {
            n = n.min(lo.len()).min(hi.len());
        }
        self.x.truncate(n);
        self.y.truncate(n);
        if let Some((lo, hi)) = &mut self.band {
            lo.truncate(n);
            hi.truncate(n);
        }
    }
}

impl Figure {
    /// A chart with nothing drawn but `message` as its title (a view that
    /// cannot be drawn says why where the chart would be).
    pub fn message(message: &str) -> Figure {
        Figure {
            title: message.to_string(),
            x_label: String::new(),
            x_name: String::new(),
            y_label: String::new(),
            log: false,
            bars: false,
            series: Vec::new(),
            caption: String::new(),
        }
    }
}

/// What of a results file charts draw: the file with the per-seed curves,
/// visits and regret maps left empty (and, of a sweep, its first point
/// only), as JSON. The page's worker reads a results file and sends this to
/// the page's thread, which draws the charts; read back by [`read_chart_text`].
pub fn chart_text(out: &Output) -> String {
    fn strip(r: &mut Results) {
        for l in &mut r.learners {
            l.regret_by_seed.clear();
            l.final_regret.clear();
            l.run_seeds.clear();
            l.visits.clear();
            l.regret_by_cell.clear();
            l.regret_by_step_state.clear();
            l.regret_by_state.clear();
            l.episodes_to_eps.clear();
        }
        r.state_labels.clear();
        r.action_labels.clear();
    }
    let mut out = out.clone();
    match &mut out {
        Output::Single(r) => strip(r),
        Output::Sweep(s) => {
            s.points.truncate(1);
            s.points.iter_mut().for_each(strip);
        }
    }
    out.to_json()
}

/// Reads [`chart_text`] back (no shape checks: charts draw whatever
/// lengths they find).
pub fn read_chart_text(text: &str) -> Result<Output, String> {
    use crate::experiment::{RESULTS_FORMAT, SWEEP_FORMAT};
    let bad = |e: serde_json::Error| format!("these chart data are damaged ({e})");
    match crate::format::identify(text).as_deref() {
        Some(RESULTS_FORMAT) => serde_json::from_str(text).map(Output::Single).map_err(bad),
        Some(SWEEP_FORMAT) => serde_json::from_str(text).map(Output::Sweep).map_err(bad),
        _ => Err(format!(
            "expected {RESULTS_FORMAT:?} or {SWEEP_FORMAT:?} data"
        )),
    }
}

/// Cumulative or per-episode regret of every learner, with bounds and marks.
fn curves(r: &Results, opts: &Options, episode: bool, bands: bool) -> Figure {
    let log = opts.log;
    let mut series = Vec::new();
    for (i, l) in r.learners.iter().enumerate() {
        let colour = series_colour(i);
        let x: Vec<f64> = l.checkpoints.iter().map(|&k| k as f64).collect();
        let y = if episode {
            &l.episode_regret_mean
        } else {
            &l.regret_mean
        };
        series.push(Series {
            band: (bands && !episode).then(|| (l.regret_lo.clone(), l.regret_hi.clone())),
            ..Series::curve(l.label.clone(), colour, x.clone(), y.clone())
        });
        if episode {
            // A certificate (ORLC's) beside the exact per-episode regret it
            // claims to bound.
            if !l.certificate_mean.is_empty() {
                series.push(Series {
                    dash: Some((5.0, 3.0)),
                    width: 1.5,
                    ..Series::curve(
                        format!("{}: certificate", l.label),
                        colour,
                        x.clone(),
                        l.certificate_mean.clone(),
                    )
                });
            }
            continue;
        }
        if let (true, Some(b)) = (opts.bounds, &l.bound) {
            // A bound that does not apply (a scaled bonus, or a bound on the
            // Bayesian regret) is drawn sparser and says why in the legend.
            let label = if b.applies {
                format!("{}: published bound", l.label)
            } else {
                format!("{}: bound, does not apply ({})", l.label, b.why_not())
            };
            series.push(Series {
                dash: Some(if b.applies { (7.0, 4.0) } else { (2.0, 7.0) }),
                width: 1.2,
                legend: !b.applies,
                curve: true,
                ..Series::mark(label, colour, x.clone(), b.values.clone(), 1.2)
            });
        }
        // Burn-in: a short tick on the curve where its slope settles.
        if let Some(k) = l.burn_in {
            let k = k as f64;
            let j = (0..x.len())
                .min_by(|&a, &b| (x[a] - k).abs().total_cmp(&(x[b] - k).abs()))
                .unwrap_or(0);
            let at = l.regret_mean[j];
            let top = l.regret_mean.iter().copied().fold(0.0, f64::max);
            let (lo, hi) = if log {
                (at / 1.35, at * 1.35)
            } else {
                (at - 0.04 * top, at + 0.04 * top)
            };
            series.push(Series {
                legend: false,
                ..Series::mark(
                    format!("{}: burn-in", l.label),
                    colour,
                    vec![k, k],
                    vec![lo, hi],
                    3.0,
                )
            });
        }
        // Where MVP's bonus falls below H whatever the data (even visits).
        if let Some(mark) = l.bound.as_ref().and_then(|b| b.bonus_below_h)
            && x.last().is_some_and(|&last| mark <= last)
        {
            let top = l.regret_hi.iter().copied().fold(0.0, f64::max);
            let bottom = if log {
                l.regret_mean
                    .iter()
                    .copied()
                    .filter(|&y| y > 0.0)
                    .fold(f64::INFINITY, f64::min)
                    .max(1e-9)
            } else {
                0.0
            };
            series.push(Series {
                dash: Some((1.0, 3.0)),
                ..Series::mark(
                    format!("{}: bonus < H from K ≈ {}", l.label, grouped(mark)),
                    colour,
                    vec![mark, mark],
                    vec![bottom, top],
                    1.5,
                )
            });
        }
    }
    if !episode && r.learners.iter().any(|l| l.burn_in.is_some()) {
        series.push(Series::mark(
            "thick tick: burn-in (the slope settles)".into(),
            MUTED,
            vec![],
            vec![],
            3.0,
        ));
    }
    if !episode
        && opts.bounds
        && r.learners
            .iter()
            .any(|l| l.bound.as_ref().is_some_and(|b| b.applies))
    {
        // One legend entry says what every dashed line in a learner's colour is.
        series.push(Series {
            dash: Some((7.0, 4.0)),
            ..Series::mark(
                "dashed: published bound (learner’s colour)".into(),
                MUTED,
                vec![],
                vec![],
                1.2,
            )
        });
    }
    if !episode && opts.lower {
        let x = r.learners[0]
            .checkpoints
            .iter()
            .map(|&k| k as f64)
            .collect();
        series.push(Series {
            dash: Some((2.0, 3.0)),
            curve: true,
            ..Series::mark(
                "lower-bound shape √(SAH³K)".into(),
                MUTED,
                x,
                r.lower_bound.values.clone(),
                1.5,
            )
        });
    }
    Figure {
        title: format!(
            "{} — {} (S={}, A={}, H={}, {} seeds)",
            if episode {
                "Regret per episode"
            } else {
                "Cumulative regret"
            },
            r.model_name,
            r.states,
            r.actions,
            r.horizon,
            r.seeds
        ),
        x_label: "episode k".into(),
        x_name: "k".into(),
        y_label: if episode {
            "expected regret of episode k"
        } else {
            "cumulative expected regret"
        }
        .into(),
        log,
        bars: false,
        series,
        caption: String::new(),
    }
}

/// The paired difference A − B along the curve, for the learners `opts`
/// names (the first two by default).
fn difference(r: &Results, opts: &Options, bands: bool) -> Result<Figure, String> {
    let labels: Vec<&str> = r.learners.iter().map(|l| l.label.as_str()).collect();
    let (a, b) = match &opts.compare {
        Some((a, b)) => (a.as_str(), b.as_str()),
        None if labels.len() >= 2 => (labels[0], labels[1]),
        None => return Err("the difference view needs two learners".into()),
    };
    for name in [a, b] {
        if !labels.contains(&name) {
            return Err(format!(
                "no learner is labelled {name:?}; the labels are: {}",
                labels.join(", ")
            ));
        }
    }
    if a == b {
        return Err("choose two different learners to compare".into());
    }
    let found = r.comparisons.iter().find_map(|c| {
        if c.a == a && c.b == b {
            Some((c, 1.0))
        } else if c.a == b && c.b == a {
            Some((c, -1.0))
        } else {
            None
        }
    });
    let Some((c, sign)) = found else {
        // Labels quoted with their escapes (#35): a control character in
        // a file's label never reaches a terminal raw.
        let why = if r.learners.len() > crate::experiment::MAX_ALL_PAIRS {
            "with more than ten learners each is compared with the first only"
        } else {
            "the results file holds no comparison of the two"
        };
        return Err(format!("{a:?} and {b:?} were not compared: {why}"));
    };
    let flip = |xs: &[f64]| xs.iter().map(|x| sign * x).collect::<Vec<f64>>();
    let band = if sign > 0.0 {
        (c.difference_lo.clone(), c.difference_hi.clone())
    } else {
        (flip(&c.difference_hi), flip(&c.difference_lo))
    };
    let x: Vec<f64> = r.learners[0]
        .checkpoints
        .iter()
        .map(|&k| k as f64)
        .collect();
    let zero = vec![0.0; x.len()];
    let series = vec![
        Series {
            band: bands.then_some(band),
            ..Series::curve(
                format!("{a} − {b}"),
                series_colour(0),
                x.clone(),
                flip(&c.difference_mean),
            )
        },
        Series {
            dash: Some((2.0, 3.0)),
            curve: true,
            ..Series::mark("no difference".into(), MUTED, x, zero, 1.0)
        },
    ];
    Ok(Figure {
        title: format!(
            "Paired difference in cumulative regret — {a} minus {b} ({} seeds)",
            r.seeds
        ),
        x_label: "episode k".into(),
        x_name: "k".into(),
        y_label: "regret(A) − regret(B)".into(),
        log: false,
        bars: false,
        series,
        caption: String::new(),
    })
}

/// The words under a chart: what its bands, dashes and dots are.
pub fn caption(out: &Output, opts: &Options) -> String {
    let name = match out {
        Output::Single(r) => &r.name,
        Output::Sweep(s) => &s.name,
    };
    let name = if name.is_empty() { "Experiment" } else { name };
    let curves = !matches!(
        opts.view,
        Some(
            View::Episode
                | View::Difference
                | View::Sweep
                | View::SweepSlope
                | View::SweepBurnIn
                | View::SweepScaling
                | View::SweepRegretScaling
        )
    ) && matches!(out, Output::Single(_));
    let mut text = format!("{name}.");
    let scaling = matches!(
        opts.view,
        Some(View::SweepScaling | View::SweepRegretScaling)
    );
    if opts.bands && !scaling {
        text.push_str(if one_seed(out) {
            " One seed per learner: no interval can be shown."
        } else {
            " Shaded: 95% Student-t intervals across seeds."
        });
    }
    if opts.bounds && curves {
        text.push_str(" Dashed: each learner’s published bound as an order (constants and log factors dropped); sparsely dashed where it does not apply (the learner’s bonus is scaled, or the bound is on the Bayesian regret).");
    }
    if opts.lower && curves {
        text.push_str(" Dotted: the minimax lower-bound shape.");
    }
    match opts.view {
        Some(View::SweepBurnIn) => text.push_str(" Bars: 95% bootstrap intervals over seeds. A point is left out where the learner had not settled by K."),
        Some(View::SweepScaling | View::SweepRegretScaling) => text.push_str(" Log–log axes. Solid: the measured values (a point is left out where the learner had not settled by K); thin: the least-squares power law; dashed: the published order, a line of its exponent through the first measured point (its constant is not published). Toy instances: the fit is evidence about these instances, not a proof of an order."),
        Some(View::SweepSlope) => text.push_str(" Bars: 95% bootstrap intervals over seeds. Slope: least squares of ln regret on ln k over the last decade (1 linear, ½ the √K regime)."),
        _ => {}
    }
    text
}

/// A whole number with thousands separators ("12,345"), as the page prints them.
pub fn grouped(x: f64) -> String {
    let n = x.round();
    let digits = format!("{}", n.abs());
    let mut out = String::new();
    for (i, c) in digits.chars().enumerate() {
        if i > 0 && (digits.len() - i) % 3 == 0 {
            out.push(',');
        }
        out.push(c);
    }
    if n < 0.0 { format!("−{out}") } else { out }
}

/// A value for a read-out: fewer decimals as it grows, a true minus sign
/// (as the page's tables print values).
pub fn short(x: f64) -> String {
    if !x.is_finite() {
        return x.to_string();
    }
    let a = x.abs();
    let s = if a >= 1e6 {
        format!("{x:.3e}")
    } else if a >= 100.0 {
        format!("{x:.1}")
    } else if a >= 1.0 {
        format!("{x:.3}")
    } else if x == 0.0 {
        "0".into()
    } else {
        // Three significant digits.
        let digits = (2 - libm::floor(libm::log10(a)) as i32).max(0) as usize;
        format!("{x:.digits$}")
    };
    s.replace('-', "−")
}

/// The SVG of `out`'s chart in a w×h box with type enlarged by `scale`
/// (the page's SVG export and `burnin plot` call this).
pub fn svg(out: &Output, opts: &Options, w: u32, h: u32, scale: f64) -> Result<String, String> {
    Ok(draw::svg(&figure(out, opts)?, w, h, scale))
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Common practice: thousands separators every three digits.
    #[test]
    fn numbers_read_as_the_page_prints_them() {
        assert_eq!(grouped(0.0), "0");
        assert_eq!(grouped(999.0), "999");
        assert_eq!(grouped(1000.0), "1,000");
        assert_eq!(grouped(1234567.4), "1,234,567");
        assert_eq!(grouped(-12345.0), "−12,345");
        assert_eq!(short(4240.06), "4240.1");
        assert_eq!(short(-2.5), "−2.500");
        assert_eq!(short(0.01234), "0.0123");
        assert_eq!(short(2.5e7), "2.500e7");
        assert_eq!(short(0.0), "0");
    }
}
