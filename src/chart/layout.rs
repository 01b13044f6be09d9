//! Where everything of a chart goes in a w×h box: the plot's frame and its
//! data↔pixel mapping, ticks, legend, title and caption. Text is measured
//! with the advance widths of the embedded typeface (read from the font
//! file itself), so a chart is laid out to the same pixels natively and in
//! wasm, whatever fonts the machine has.

use serde::Serialize;

use super::{Figure, grouped, short};

/// The charts' typeface (a subset of DejaVu Sans: `font/LICENSE.txt`).
pub const FONT: &[u8] = include_bytes!("font/DejaVuSans-subset.ttf");
/// The name the page and SVG files give [`FONT`], with fallbacks.
pub const FONT_FAMILY: &str = "BurninSans, DejaVu Sans, sans-serif";

/// Advance widths of the typeface, in ems, by character.
pub struct Metrics {
    face: ttf_parser::Face<'static>,
    per_em: f64,
    /// Width of a character the font does not have (that of "n").
    fallback: f64,
    /// The height of "x" in ems (SVG's `ex` unit; text is centred on it).
    pub x_height: f64,
}

impl Metrics {
    fn new() -> Metrics {
        let face = ttf_parser::Face::parse(FONT, 0).expect("the embedded font parses");
        let per_em = f64::from(face.units_per_em());
        let advance = |c: char| {
            face.glyph_index(c)
                .and_then(|g| face.glyph_hor_advance(g))
                .map(|a| f64::from(a) / per_em)
        };
        let fallback = advance('n').expect("the font has n");
        let x_height = face
            .glyph_index('x')
            .and_then(|g| face.glyph_bounding_box(g))
            .map(|b| f64::from(b.y_max) / per_em)
            .expect("the font has x");
        Metrics {
            face,
            per_em,
            fallback,
            x_height,
        }
    }

    /// The metrics of [`FONT`] (parsed once).
    pub fn get() -> &'static Metrics {
        static M: std::sync::OnceLock<Metrics> = std::sync::OnceLock::new();
        M.get_or_init(Metrics::new)
    }

    /// Width of `text` in pixels at `size` pixels to the em.
    pub fn width(&self, text: &str, size: f64) -> f64 {
        text.chars().map(|c| self.advance(c)).sum::<f64>() * size
    }

    /// The advance of `c` in ems.
    fn advance(&self, c: char) -> f64 {
        self.face
            .glyph_index(c)
            .and_then(|g| self.face.glyph_hor_advance(g))
            .map_or(self.fallback, |a| f64::from(a) / self.per_em)
    }

    /// `text` cut with an ellipsis to fit `max` pixels at `size`: the
    /// longest prefix that fits with the ellipsis, found in one pass over
    /// the prefixes' widths (measuring each cut afresh took quadratic
    /// time, 19.5 s for a 30 000-character label; #35).
    pub fn fit(&self, text: &str, size: f64, max: f64) -> String {
        if self.width(text, size) <= max {
            return text.to_string();
        }
        let ellipsis = self.advance('…');
        let mut sum = 0.0;
        let mut keep = 0;
        for (end, c) in text.char_indices().map(|(i, c)| (i + c.len_utf8(), c)) {
            sum += self.advance(c);
            if (sum + ellipsis) * size > max {
                break;
            }
            keep = end;
        }
        format!("{}…", &text[..keep])
    }

    /// `text` broken into lines of at most `max` pixels at `size` (a word
    /// longer than a line keeps a line of its own).
    pub fn wrap(&self, text: &str, size: f64, max: f64) -> Vec<String> {
        let mut lines = Vec::new();
        let mut line = String::new();
        for word in text.split_whitespace() {
            let next = if line.is_empty() {
                word.to_string()
            } else {
                format!("{line} {word}")
            };
            if !line.is_empty() && self.width(&next, size) > max {
                lines.push(std::mem::replace(&mut line, word.to_string()));
            } else {
                line = next;
            }
        }
        if !line.is_empty() {
            lines.push(line);
        }
        lines
    }
}

/// The plot's frame in pixels and the data range it shows.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Frame {
    /// Left, right, top and bottom edges in pixels.
    pub x0: f64,
    pub x1: f64,
    pub y0: f64,
    pub y1: f64,
    /// The data range (of log10 of the data on log axes).
    pub lx0: f64,
    pub lx1: f64,
    pub ly0: f64,
    pub ly1: f64,
    pub log: bool,
}

impl Frame {
    fn axis(&self, v: f64) -> f64 {
        if self.log { libm::log10(v) } else { v }
    }

    /// Pixel column of data x.
    pub fn px(&self, x: f64) -> f64 {
        self.x0 + (self.axis(x) - self.lx0) / (self.lx1 - self.lx0) * (self.x1 - self.x0)
    }

    /// Pixel row of data y.
    pub fn py(&self, y: f64) -> f64 {
        self.y1 - (self.axis(y) - self.ly0) / (self.ly1 - self.ly0) * (self.y1 - self.y0)
    }

    /// Data x at pixel column `px` (the inverse of [`Frame::px`]).
    pub fn x_at(&self, px: f64) -> f64 {
        let a = self.lx0 + (px - self.x0) / (self.x1 - self.x0) * (self.lx1 - self.lx0);
        if self.log { libm::pow(10.0, a) } else { a }
    }

    /// Whether a data point can be drawn (log axes show positive values only).
    pub fn shows(&self, x: f64, y: f64) -> bool {
        x.is_finite() && y.is_finite() && (!self.log || (x > 0.0 && y > 0.0))
    }

    pub fn contains(&self, px: f64, py: f64) -> bool {
        px >= self.x0 && px <= self.x1 && py >= self.y0 && py <= self.y1
    }
}

/// A piece of text placed: `y` is the middle of its lowercase letters.
#[derive(Debug, Clone, PartialEq)]
pub struct Label {
    pub text: String,
    pub x: f64,
    pub y: f64,
    pub size: f64,
    pub align: Align,
    /// Rotated a quarter turn anticlockwise (the y axis's label).
    pub upright: bool,
    pub muted: bool,
}

#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Align {
    Left,
    Centre,
    Right,
}

/// Everything of a chart placed in its box, at pixel positions.
#[derive(Debug, Clone, PartialEq)]
pub struct Layout {
    pub width: f64,
    pub height: f64,
    pub scale: f64,
    pub frame: Frame,
    /// Tick positions in data units.
    pub x_ticks: Vec<f64>,
    pub y_ticks: Vec<f64>,
    /// Title, tick labels, axis labels, legend labels and caption lines.
    pub labels: Vec<Label>,
    /// Legend samples: (series index, left end x, y), 20·scale px long.
    pub legend: Vec<(usize, f64, f64)>,
}

/// The largest value an axis reaches, leaving room for its padding.
const AXIS_LIMIT: f64 = f64::MAX / 1.25;

/// An axis's range made finite and not empty, whatever the data: a span
/// that overflowed (from −10³⁰⁸ to 10³⁰⁸, say) is narrowed to a finite one.
fn finite_range(lo: f64, hi: f64, log: bool) -> (f64, f64) {
    let (lowest, highest) = if log {
        (f64::MIN_POSITIVE, AXIS_LIMIT)
    } else {
        (-AXIS_LIMIT, AXIS_LIMIT)
    };
    let (mut lo, mut hi) = (lo.clamp(lowest, highest), hi.clamp(lowest, highest));
    if !log && !(hi - lo).is_finite() {
        (lo, hi) = (lo.max(-AXIS_LIMIT / 2.5), hi.min(AXIS_LIMIT / 2.5));
    }
    if lo >= hi {
        (lo, hi) = if log {
            (hi / 10.0, hi)
        } else if hi > 0.0 {
            (hi / 2.0, hi)
        } else {
            (lo, lo / 2.0)
        };
    }
    (lo, hi)
}

/// Most powers of ten labelled on a log axis; a wider axis labels every
/// second, fifth… power.
const MAX_LOG_TICKS: i32 = 12;

/// A "nice" step (1, 2 or 5 × 10ⁿ) for about `target` ticks over `span`.
fn nice_step(span: f64, target: f64) -> f64 {
    let raw = span / target.max(1.0);
    let mag = libm::pow(10.0, libm::floor(libm::log10(raw)));
    let n = raw / mag;
    mag * if n < 1.5 {
        1.0
    } else if n < 3.0 {
        2.0
    } else if n < 7.0 {
        5.0
    } else {
        10.0
    }
}

/// Ticks at multiples of a nice step between `lo` and `hi`.
pub fn linear_ticks(lo: f64, hi: f64, target: f64) -> Vec<f64> {
    let span = if hi > lo { hi - lo } else { 1.0 };
    let step = nice_step(span, target);
    if !(step.is_finite() && step > 0.0 && lo.is_finite() && hi.is_finite()) {
        return Vec::new();
    }
    let first = libm::ceil(lo / step);
    // Rounded to the step's decimals: 3 × 0.2 is 0.6000000000000001.
    let unit = libm::pow(10.0, libm::ceil(-libm::log10(step)).max(0.0));
    let round = |v: f64| {
        if unit.is_finite() && (v * unit).is_finite() {
            libm::round(v * unit) / unit
        } else {
            v
        }
    };
    let mut out = Vec::new();
    let mut i = 0.0;
    loop {
        let v = round((first + i) * step);
        if v > hi + step * 1e-9 || out.len() > 100 {
            break;
        }
        out.push(if v.abs() < step * 1e-9 { 0.0 } else { v });
        i += 1.0;
    }
    out
}

/// Ticks at powers of ten between `lo` and `hi` (and 2 and 5 times them
/// when fewer than three powers fall inside).
///
/// Bounded for any input: the exponents are those of finite doubles, and
/// at most `MAX_LOG_TICKS` (or so) powers are kept.
pub fn log_ticks(lo: f64, hi: f64) -> Vec<f64> {
    let exponent = |v: f64| {
        if v.is_nan() {
            0
        } else {
            v.clamp(-330.0, 308.0) as i32
        }
    };
    let (e0, e1) = (
        exponent(libm::floor(libm::log10(lo))),
        exponent(libm::ceil(libm::log10(hi))),
    );
    let every = ((e1 - e0) / MAX_LOG_TICKS + 1).max(1) as usize;
    let mut out: Vec<f64> = (e0..=e1)
        .step_by(every)
        .map(|e| libm::pow(10.0, f64::from(e)))
        .filter(|&v| v >= lo * 0.999 && v <= hi * 1.001)
        .collect();
    if out.len() < 3 {
        for e in e0..=e1 {
            for m in [2.0, 5.0] {
                let v = m * libm::pow(10.0, f64::from(e));
                if v >= lo && v <= hi && v.is_finite() {
                    out.push(v);
                }
            }
        }
        out.sort_by(f64::total_cmp);
    }
    out
}

/// A tick label: short, with a true minus sign ("1.5k", "2e6", "0.25").
pub fn tick_label(v: f64) -> String {
    let a = v.abs();
    let s = if a == 0.0 {
        "0".to_string()
    } else if !(1e-3..1e6).contains(&a) {
        let e = libm::floor(libm::log10(a)) as i32;
        let m = v / libm::pow(10.0, f64::from(e));
        format!("{}e{e}", libm::round(m))
    } else if a >= 1000.0 {
        let k = v / 1000.0;
        let t = if a >= 1e4 {
            format!("{k:.0}")
        } else {
            format!("{k:.1}")
        };
        format!("{}k", t.strip_suffix(".0").unwrap_or(&t))
    } else {
        // Three significant digits, trailing zeros dropped.
        let digits = (2 - libm::floor(libm::log10(a)) as i32).max(0) as usize;
        let t = format!("{v:.digits$}");
        if t.contains('.') {
            t.trim_end_matches('0').trim_end_matches('.').to_string()
        } else {
            t
        }
    };
    s.replace('-', "−")
}

impl Layout {
    /// Places `fig` in a `w`×`h` pixel box with type and lines enlarged by
    /// `scale` (1 on screen at one pixel per CSS pixel).
    pub fn new(fig: &Figure, w: f64, h: f64, scale: f64) -> Layout {
        let m = Metrics::get();
        let fs = 12.0 * scale;
        let pad = 10.0 * scale;
        let log = fig.log;
        let shows =
            |x: f64, y: f64| x.is_finite() && y.is_finite() && (!log || (x > 0.0 && y > 0.0));
        let (mut xmin, mut xmax, mut ymin, mut ymax) = (
            f64::INFINITY,
            f64::NEG_INFINITY,
            f64::INFINITY,
            f64::NEG_INFINITY,
        );
        for s in &fig.series {
            for i in 0..s.x.len() {
                let mut ys = vec![s.y[i]];
                if let Some((lo, hi)) = &s.band {
                    ys.extend([lo[i], hi[i]]);
                }
                for y in ys {
                    if shows(s.x[i], y) {
                        xmin = xmin.min(s.x[i]);
                        xmax = xmax.max(s.x[i]);
                        ymin = ymin.min(y);
                        ymax = ymax.max(y);
                    }
                }
            }
        }
        if !xmin.is_finite() {
            (xmin, xmax, ymin, ymax) = (1.0, 10.0, 1.0, 10.0);
        }
        // Values near the largest double (9·10³⁰⁷, say) would overflow the
        // spans and paddings below to infinity: the axes stop at a bound
        // that leaves room for them (#35), a log axis at the smallest
        // normal double, and the range is made finite again after them.
        let bound = |v: f64| {
            if log {
                v.clamp(f64::MIN_POSITIVE, AXIS_LIMIT)
            } else {
                v.clamp(-AXIS_LIMIT, AXIS_LIMIT)
            }
        };
        (xmin, xmax, ymin, ymax) = (bound(xmin), bound(xmax), bound(ymin), bound(ymax));
        if !log {
            ymin = ymin.min(0.0);
        }
        if xmax == xmin {
            xmax = xmin + if log { xmin } else { 1.0 };
        }
        if ymax == ymin {
            ymax = ymin + if log { ymin } else { 1.0 };
        }
        if !log {
            ymax += (ymax - ymin) * 0.04;
        }
        if fig.bars {
            // Points with error bars keep clear of the frame's sides.
            if log {
                (xmin, xmax) = (xmin / 1.15, xmax * 1.15);
            } else {
                let pad = (xmax - xmin) * 0.04;
                (xmin, xmax) = (xmin - pad, xmax + pad);
            }
        }
        (xmin, xmax) = finite_range(xmin, xmax, log);
        (ymin, ymax) = finite_range(ymin, ymax, log);
        let legend_items: Vec<usize> = (0..fig.series.len())
            .filter(|&i| fig.series[i].legend)
            .collect();
        let widest = legend_items
            .iter()
            .map(|&i| m.width(&fig.series[i].label, fs))
            .fold(0.0, f64::max);
        let legend_w = if legend_items.is_empty() {
            0.0
        } else {
            (w * 0.38).min(widest + 34.0 * scale)
        };
        let title_h = if fig.title.is_empty() { pad } else { fs * 1.9 };
        let caption_size = fs * 0.95;
        let caption = if fig.caption.is_empty() {
            vec![]
        } else {
            m.wrap(&fig.caption, caption_size, w - 2.0 * pad)
        };
        let caption_h = caption.len() as f64 * fs * 1.3;
        let axis = |v: f64| if log { libm::log10(v) } else { v };
        let frame = Frame {
            x0: pad + fs * 4.6,
            x1: w - legend_w - pad,
            y0: title_h + pad * 0.5,
            y1: h - fs * 3.2 - caption_h,
            lx0: axis(xmin),
            lx1: axis(xmax),
            ly0: axis(ymin),
            ly1: axis(ymax),
            log,
        };
        let mut labels = Vec::new();
        let label = |text: String, x: f64, y: f64, size: f64, align: Align, muted: bool| Label {
            text,
            x,
            y,
            size,
            align,
            upright: false,
            muted,
        };
        if !fig.title.is_empty() {
            // A long title shrinks a little, then is cut, rather than run off the chart.
            let mut size = fs * 1.25;
            while size > fs && m.width(&fig.title, size) > w - 2.0 * pad {
                size *= 0.95;
            }
            labels.push(label(
                m.fit(&fig.title, size, w - 2.0 * pad),
                pad,
                pad + fs * 0.55,
                size,
                Align::Left,
                false,
            ));
        }
        let (x_ticks, y_ticks) = if log {
            (log_ticks(xmin, xmax), log_ticks(ymin, ymax))
        } else {
            (
                linear_ticks(
                    xmin,
                    xmax,
                    ((frame.x1 - frame.x0) / (70.0 * scale)).max(2.0),
                ),
                linear_ticks(
                    ymin,
                    ymax,
                    ((frame.y1 - frame.y0) / (45.0 * scale)).max(2.0),
                ),
            )
        };
        for &v in &x_ticks {
            labels.push(label(
                tick_label(v),
                frame.px(v),
                frame.y1 + fs * 1.0,
                fs,
                Align::Centre,
                true,
            ));
        }
        for &v in &y_ticks {
            labels.push(label(
                tick_label(v),
                frame.x0 - fs * 0.5,
                frame.py(v),
                fs,
                Align::Right,
                true,
            ));
        }
        labels.push(label(
            fig.x_label.clone(),
            (frame.x0 + frame.x1) / 2.0,
            frame.y1 + fs * 2.3,
            fs,
            Align::Centre,
            false,
        ));
        labels.push(Label {
            upright: true,
            ..label(
                fig.y_label.clone(),
                pad + fs * 0.5,
                (frame.y0 + frame.y1) / 2.0,
                fs,
                Align::Centre,
                false,
            )
        });
        let mut legend = Vec::new();
        let mut ly = frame.y0 + fs * 0.5;
        for &i in &legend_items {
            let lx = frame.x1 + pad;
            legend.push((i, lx, ly));
            let text = m.fit(&fig.series[i].label, fs, legend_w - 30.0 * scale);
            labels.push(label(text, lx + 26.0 * scale, ly, fs, Align::Left, false));
            ly += fs * 1.5;
        }
        for (i, line) in caption.into_iter().enumerate() {
            let y = frame.y1 + fs * 3.2 + fs * (0.55 + 1.3 * i as f64);
            labels.push(label(line, pad, y, caption_size, Align::Left, true));
        }
        Layout {
            width: w,
            height: h,
            scale,
            frame,
            x_ticks,
            y_ticks,
            labels,
            legend,
        }
    }

    /// The index of the chart's x value nearest to pixel (`px`, `py`), or
    /// None outside the plot.
    pub fn nearest(&self, fig: &Figure, px: f64, py: f64) -> Option<usize> {
        if !self.frame.contains(px, py) {
            return None;
        }
        let xs = &fig.series.first()?.x;
        (0..xs.len())
            .filter(|&i| !self.frame.log || xs[i] > 0.0)
            .min_by(|&a, &b| {
                (self.frame.px(xs[a]) - px)
                    .abs()
                    .total_cmp(&(self.frame.px(xs[b]) - px).abs())
            })
    }

    /// The hover read-out at pixel (`px`, `py`): the x value, each curve's
    /// value there (with its band), and the pixel column of the x value.
    pub fn readout(&self, fig: &Figure, px: f64, py: f64) -> Option<Readout> {
        let i = self.nearest(fig, px, py)?;
        let xs = &fig.series[0].x;
        let x = xs[i];
        let shown = if fig.bars {
            crate::format::readable(x)
        } else {
            grouped(x)
        };
        let mut lines = vec![format!("{} = {shown}", fig.x_name)];
        // Curves only: marks (burn-in ticks, bonus marks, legend-only entries) have no value at x.
        for s in fig
            .series
            .iter()
            .filter(|s| s.curve && s.x.len() == xs.len())
        {
            let band = s.band.as_ref().map_or(String::new(), |(lo, hi)| {
                format!(" [{}, {}]", short(lo[i]), short(hi[i]))
            });
            lines.push(format!("{}: {}{band}", s.label, short(s.y[i])));
        }
        Some(Readout {
            index: i,
            x,
            px: self.frame.px(x),
            lines,
        })
    }
}

/// What the page's hover shows.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Readout {
    pub index: usize,
    pub x: f64,
    /// Pixel column of `x`.
    pub px: f64,
    pub lines: Vec<String>,
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Advance widths against the font file read by a second parser (ab_glyph,
    /// whose h_advance at a scale of units_per_em gives font units).
    #[test]
    fn widths_are_the_fonts_advances() {
        use ab_glyph::{Font, FontRef};
        let font = FontRef::try_from_slice(FONT).unwrap();
        let upm = font.units_per_em().unwrap();
        let m = Metrics::get();
        for text in ["Cumulative regret", "√(SAH³K) − ε ≈ 0.25", "k = 1,500"] {
            let want: f32 = text
                .chars()
                .map(|c| font.h_advance_unscaled(font.glyph_id(c)))
                .sum::<f32>()
                / upm;
            let got = m.width(text, 1.0);
            assert!(
                (got - f64::from(want)).abs() < 1e-6,
                "{text}: {got} against {want}"
            );
        }
        // DejaVu Sans: 2048 units per em, "n" 1298 units wide (the font's hmtx).
        assert_eq!(upm, 2048.0);
        assert!((m.width("n", 2048.0) - 1298.0).abs() < 1e-9);
        // A character the subset lacks falls back to the width of "n".
        assert_eq!(m.width("漢", 10.0), m.width("n", 10.0));
    }

    #[test]
    fn fitting_and_wrapping_respect_the_width() {
        let m = Metrics::get();
        let long = "a learner with a label much longer than the legend has room for";
        let cut = m.fit(long, 12.0, 120.0);
        assert!(cut.ends_with('…') && m.width(&cut, 12.0) <= 120.0, "{cut}");
        assert_eq!(m.fit("short", 12.0, 120.0), "short");
        let lines = m.wrap(long, 12.0, 150.0);
        assert!(lines.len() > 1);
        assert!(lines.iter().all(|l| m.width(l, 12.0) <= 150.0));
        assert_eq!(lines.join(" "), long);
    }

    /// #35: fitting measured every shorter cut afresh (quadratic: 19.5 s
    /// for a 30 000-character legend label). The one-pass fit gives what
    /// the cut-by-cut search gives, and a label of a million characters
    /// is fitted in one pass.
    #[test]
    fn fitting_is_the_longest_cut_that_fits() {
        let m = Metrics::get();
        let slow = |text: &str, size: f64, max: f64| -> String {
            if m.width(text, size) <= max {
                return text.to_string();
            }
            let chars: Vec<char> = text.chars().collect();
            (0..chars.len())
                .rev()
                .map(|k| chars[..k].iter().collect::<String>() + "…")
                .find(|cut| m.width(cut, size) <= max)
                .unwrap_or_else(|| "…".into())
        };
        for text in [
            "",
            "x",
            "WWWWWWWWWWWWWWWWWWWW",
            "ünïcödé 学习者 label — long one",
            "a b c d e f g h",
        ] {
            for max in [0.0, 5.0, 30.0, 60.0, 500.0] {
                assert_eq!(
                    m.fit(text, 12.0, max),
                    slow(text, 12.0, max),
                    "{text} {max}"
                );
            }
        }
        let huge = "W".repeat(1_000_000);
        let cut = m.fit(&huge, 12.0, 200.0);
        assert!(cut.ends_with('…') && cut.chars().count() < 30, "{cut}");
    }

    /// Common practice (nice tick steps of 1, 2 and 5 × 10ⁿ).
    #[test]
    fn ticks_are_round_numbers_inside_the_range() {
        assert_eq!(
            linear_ticks(0.0, 1500.0, 5.0),
            vec![0.0, 500.0, 1000.0, 1500.0]
        );
        assert_eq!(
            linear_ticks(-0.3, 0.9, 6.0),
            vec![-0.2, 0.0, 0.2, 0.4, 0.6, 0.8]
        );
        assert_eq!(log_ticks(1.0, 1500.0), vec![1.0, 10.0, 100.0, 1000.0]);
        assert_eq!(log_ticks(3.0, 40.0), vec![5.0, 10.0, 20.0]);
        assert_eq!(tick_label(1500.0), "1.5k");
        assert_eq!(tick_label(20000.0), "20k");
        assert_eq!(tick_label(-0.2), "−0.2");
        assert_eq!(tick_label(2e6), "2e6");
        assert_eq!(tick_label(0.25), "0.25");
        assert_eq!(tick_label(100.0), "100");
    }

    /// #35: a log axis up to infinity (9·10³⁰⁷ doubled) asked for 2³¹
    /// powers of ten; the ticks are bounded for any range, and a whole
    /// double range gets at most a dozen or so.
    #[test]
    fn ticks_are_bounded_for_any_range() {
        assert!(log_ticks(9e307, f64::INFINITY).len() <= 2);
        let all = log_ticks(f64::MIN_POSITIVE, f64::MAX);
        assert!((10..=16).contains(&all.len()), "{all:?}");
        assert!(all.iter().all(|v| v.is_finite() && *v > 0.0));
        assert!(log_ticks(f64::NAN, f64::NAN).len() <= 3);
        assert!(linear_ticks(-f64::MAX, f64::MAX, 10.0).is_empty());
        assert!(linear_ticks(0.0, f64::INFINITY, 10.0).is_empty());
        let big = linear_ticks(0.0, 9.36e307, 13.0);
        assert!(!big.is_empty() && big.len() <= 101 && big.iter().all(|v| v.is_finite()));
    }

    /// A frame of 400×280 pixels showing 10⁰…10³ by 10⁰…10² (or 0…3 by 0…2).
    fn frame(log: bool) -> Frame {
        Frame {
            x0: 50.0,
            x1: 450.0,
            y0: 20.0,
            y1: 300.0,
            lx0: 0.0,
            lx1: 3.0,
            ly0: 0.0,
            ly1: 2.0,
            log,
        }
    }

    #[test]
    fn pixels_and_data_map_back_and_forth() {
        for log in [false, true] {
            let f = frame(log);
            for x in [1.0, 2.5, 30.0, 999.0] {
                let back = f.x_at(f.px(x));
                assert!((back - x).abs() < 1e-9 * x, "{log} {x} {back}");
            }
        }
        let f = frame(true);
        assert_eq!(f.px(1.0), 50.0);
        assert_eq!(f.px(1000.0), 450.0);
        assert_eq!(f.py(100.0), 20.0);
        assert!(!f.shows(0.0, 1.0) && !f.shows(1.0, -1.0) && f.shows(1.0, 1.0));
    }
}
