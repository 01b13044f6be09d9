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
    /// The typeface's ascender and descender in ems (the ink guessed for a
    /// character it does not have, which a viewer draws from another font).
    ascender: f64,
    descender: f64,
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
            ascender: f64::from(face.ascender()) / per_em,
            descender: f64::from(face.descender()) / per_em,
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

    /// `text` in at most `most` lines of at most `max` pixels at `size`,
    /// and whether it had to be shortened: a word longer than a line, and
    /// the last line when more are needed, are cut with an ellipsis.
    pub fn block(&self, text: &str, size: f64, max: f64, most: usize) -> (Vec<String>, bool) {
        let mut lines = self.wrap(text, size, max);
        let mut cut = false;
        for line in &mut lines {
            if self.width(line, size) > max {
                *line = self.fit(line, size, max);
                cut = true;
            }
        }
        let most = most.max(1);
        if lines.len() > most {
            let rest = lines[most - 1..].join(" ");
            lines.truncate(most - 1);
            lines.push(self.fit(&rest, size, max));
            cut = true;
        }
        (lines, cut)
    }

    /// The ink of `text` set from pen position 0 on the baseline, in ems:
    /// left, right, lowest and highest (y up), from the glyphs' outlines'
    /// bounding boxes; None for text without ink (spaces).
    pub fn ink(&self, text: &str) -> Option<(f64, f64, f64, f64)> {
        let mut pen = 0.0;
        let mut ink: Option<(f64, f64, f64, f64)> = None;
        for c in text.chars() {
            let glyph = match self.face.glyph_index(c) {
                Some(g) => self.face.glyph_bounding_box(g).map(|r| {
                    (
                        f64::from(r.x_min) / self.per_em,
                        f64::from(r.x_max) / self.per_em,
                        f64::from(r.y_min) / self.per_em,
                        f64::from(r.y_max) / self.per_em,
                    )
                }),
                None => Some((0.0, self.fallback, self.descender, self.ascender)),
            };
            if let Some((x0, x1, y0, y1)) = glyph {
                let b = (pen + x0, pen + x1, y0, y1);
                ink = Some(match ink {
                    None => b,
                    Some(a) => (a.0.min(b.0), a.1.max(b.1), a.2.min(b.2), a.3.max(b.3)),
                });
            }
            pen += self.advance(c);
        }
        ink
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
    /// What is drawn.
    pub text: String,
    /// The whole text when `text` is shortened (the page shows it on hover).
    pub full: Option<String>,
    pub x: f64,
    pub y: f64,
    pub size: f64,
    pub align: Align,
    /// Rotated a quarter turn anticlockwise (the y axis's label).
    pub upright: bool,
    pub muted: bool,
}

impl Label {
    /// The box of the ink drawn: the text is anchored by its advance
    /// width (as canvas, SVG and our bitmap text anchor it), its baseline
    /// half an x-height below `y`; None for text without ink.
    pub fn bounds(&self) -> Option<TextBox> {
        let m = Metrics::get();
        let (x0, x1, y0, y1) = m.ink(&self.text)?;
        let width = m.width(&self.text, self.size);
        let start = match self.align {
            Align::Left => 0.0,
            Align::Centre => -width / 2.0,
            Align::Right => -width,
        };
        let base = 0.5 * m.x_height;
        // Along the text (u) and down across it (v), from the anchor.
        let (u0, u1) = (start + x0 * self.size, start + x1 * self.size);
        let (v0, v1) = ((base - y1) * self.size, (base - y0) * self.size);
        Some(if self.upright {
            // A quarter turn anticlockwise: along the text is up the page.
            TextBox {
                left: self.x + v0,
                right: self.x + v1,
                top: self.y - u1,
                bottom: self.y - u0,
            }
        } else {
            TextBox {
                left: self.x + u0,
                right: self.x + u1,
                top: self.y + v0,
                bottom: self.y + v1,
            }
        })
    }
}

/// A box in pixels (y down).
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct TextBox {
    pub left: f64,
    pub top: f64,
    pub right: f64,
    pub bottom: f64,
}

impl TextBox {
    pub fn overlaps(&self, o: &TextBox) -> bool {
        self.left < o.right && o.left < self.right && self.top < o.bottom && o.top < self.bottom
    }

    pub fn inside(&self, w: f64, h: f64) -> bool {
        self.left >= 0.0 && self.top >= 0.0 && self.right <= w && self.bottom <= h
    }
}

/// A text as drawn (see [`Layout::texts`]).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct PlacedText {
    pub text: String,
    /// The whole text when `text` is shortened.
    pub full: Option<String>,
    /// Pixels to the em, and whether it runs up the page.
    pub size: f64,
    pub upright: bool,
    #[serde(flatten)]
    pub bounds: TextBox,
}

/// A legend entry: which of the legend's items (None for the entry that
/// gathers those left out), its lines, and its whole text when shortened.
struct Entry {
    item: Option<usize>,
    lines: Vec<String>,
    full: Option<String>,
}

/// A legend label's lines in `max` pixels: wrapped onto at most `most`
/// lines, the last cut if they are not enough.
fn entry_lines(m: &Metrics, text: &str, size: f64, max: f64, most: usize) -> (Vec<String>, bool) {
    m.block(text, size, max, most)
}

/// The legend's entries for `texts`: wrapped if they then `fit`, else
/// wrapped onto two lines at most, else cut to a line each, else the first
/// that fit with one entry saying how many more there are (their labels
/// in its whole text).
fn fit_legend(
    texts: &[&str],
    fits: impl Fn(&[Entry]) -> bool,
    lines: impl Fn(&str, usize) -> (Vec<String>, bool),
) -> Vec<Entry> {
    let entry = |i: usize, most: usize| {
        let (l, cut) = lines(texts[i], most);
        Entry {
            item: Some(i),
            lines: l,
            full: cut.then(|| texts[i].to_string()),
        }
    };
    for most in [usize::MAX, 2, 1] {
        let e: Vec<Entry> = (0..texts.len()).map(|i| entry(i, most)).collect();
        if fits(&e) {
            return e;
        }
    }
    let mut k = texts.len();
    loop {
        k -= 1;
        let mut e: Vec<Entry> = (0..k).map(|i| entry(i, 1)).collect();
        let (l, _) = lines(&format!("… and {} more", texts.len() - k), 1);
        e.push(Entry {
            item: None,
            lines: l,
            full: Some(texts[k..].join("; ")),
        });
        if k == 0 || fits(&e) {
            return e;
        }
    }
}

/// Legend entries flowing along rows `width` pixels wide: each entry's
/// left x and first row, and the rows taken. An entry of one line goes on
/// the current row if it fits there; one of several lines takes rows of
/// its own.
fn flow(
    m: &Metrics,
    entries: &[Entry],
    size: f64,
    width: f64,
    sample: f64,
    gap: f64,
) -> (Vec<(f64, usize)>, usize) {
    let (mut x, mut r) = (0.0, 0);
    let mut spots = Vec::new();
    for e in entries {
        if let [line] = e.lines.as_slice() {
            let need = sample + m.width(line, size);
            if x > 0.0 && x + need > width {
                r += 1;
                x = 0.0;
            }
            spots.push((x, r));
            x += need + gap;
        } else {
            if x > 0.0 {
                r += 1;
            }
            spots.push((0.0, r));
            r += e.lines.len();
            x = 0.0;
        }
    }
    (spots, if x > 0.0 { r + 1 } else { r })
}

/// Every `k`th tick, for the smallest `k` that keeps the labels `gap`
/// apart; `at` gives a tick label's centre and half its extent along the axis.
fn thin(ticks: Vec<f64>, at: impl Fn(f64) -> (f64, f64), gap: f64) -> Vec<f64> {
    for k in 1..=ticks.len() {
        let kept: Vec<f64> = ticks.iter().copied().step_by(k).collect();
        let apart = kept.windows(2).all(|p| {
            let ((a, ha), (b, hb)) = (at(p[0]), at(p[1]));
            (a - b).abs() >= ha + hb + gap
        });
        if apart {
            return kept;
        }
    }
    ticks
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
        let legend_texts: Vec<&str> = legend_items
            .iter()
            .map(|&i| fig.series[i].label.as_str())
            .collect();
        let text_w = w - 2.0 * pad;
        let mut labels = Vec::new();
        let label = |text: String, x: f64, y: f64, size: f64, align: Align, muted: bool| Label {
            text,
            full: None,
            x,
            y,
            size,
            align,
            upright: false,
            muted,
        };
        // The title: a little smaller rather than wrapped, then on two lines
        // (more for a message in place of a chart), the last cut with an
        // ellipsis if even those are not enough (the whole title on hover).
        let mut title_h = pad;
        if !fig.title.is_empty() {
            let mut size = fs * 1.25;
            while size > fs && m.width(&fig.title, size) > text_w {
                size *= 0.95;
            }
            let most = if fig.series.is_empty() { 6 } else { 2 };
            let (lines, cut) = m.block(&fig.title, size, text_w, most);
            let step = size * 1.25;
            for (i, line) in lines.iter().enumerate() {
                labels.push(Label {
                    full: cut.then(|| fig.title.clone()),
                    ..label(
                        line.clone(),
                        pad,
                        pad + fs * 0.55 + step * i as f64,
                        size,
                        Align::Left,
                        false,
                    )
                });
            }
            // Room under it for the top y tick label, centred on the frame's top.
            title_h = fs * 2.2 + step * (lines.len().max(1) - 1) as f64;
        }
        // The caption (exports only) takes at most a third of the height.
        let caption_size = fs * 0.95;
        let caption_step = fs * 1.3;
        let (caption, caption_cut) = if fig.caption.is_empty() {
            (vec![], false)
        } else {
            let most = ((h / 3.0) / caption_step).floor().max(1.0) as usize;
            m.block(&fig.caption, caption_size, text_w, most)
        };
        let caption_h = caption.len() as f64 * caption_step;
        // The legend: right of the plot when the chart is wide enough,
        // else under it, its entries flowing along rows. Entries wrap; when
        // wrapped entries do not fit, each is cut to one line (the whole
        // label on hover), and when even those do not fit, the last are
        // gathered into one "and n more" entry.
        let right = !legend_items.is_empty() && w >= 560.0 * scale;
        let widest = legend_texts
            .iter()
            .map(|t| m.width(t, fs))
            .fold(0.0, f64::max);
        let legend_w = if right {
            (w * 0.38).min(widest + 34.0 * scale)
        } else {
            0.0
        };
        let sample_w = 26.0 * scale;
        let row = fs * 1.35;
        let axis_band = fs * 3.2;
        let plot_top = title_h + pad * 0.5;
        let entries = if legend_items.is_empty() {
            Vec::new()
        } else if right {
            let room = h - caption_h - pad - (plot_top + fs * 0.5);
            fit_legend(
                &legend_texts,
                |e| {
                    let lines: usize = e.iter().map(|e| e.lines.len()).sum();
                    lines as f64 * row <= room
                },
                |text, most| entry_lines(m, text, fs, legend_w - 30.0 * scale, most),
            )
        } else {
            let room = (h - caption_h - title_h - axis_band) * 0.5;
            fit_legend(
                &legend_texts,
                |e| {
                    flow(m, e, fs, text_w, sample_w, 16.0 * scale).1 as f64 * row + 0.3 * fs <= room
                },
                |text, most| entry_lines(m, text, fs, text_w - sample_w, most),
            )
        };
        let legend_h = if right || entries.is_empty() {
            0.0
        } else {
            flow(m, &entries, fs, text_w, sample_w, 16.0 * scale).1 as f64 * row + 0.3 * fs
        };
        let axis = |v: f64| if log { libm::log10(v) } else { v };
        let mut frame = Frame {
            x0: pad + fs * 4.6,
            x1: w - legend_w - pad,
            y0: plot_top,
            y1: h - axis_band - caption_h - legend_h,
            lx0: axis(xmin),
            lx1: axis(xmax),
            ly0: axis(ymin),
            ly1: axis(ymax),
            log,
        };
        // Ticks, thinned where their labels would touch.
        let y_ticks = if log {
            log_ticks(ymin, ymax)
        } else {
            linear_ticks(
                ymin,
                ymax,
                ((frame.y1 - frame.y0) / (45.0 * scale)).max(2.0),
            )
        };
        let y_ticks = thin(y_ticks, |v| (frame.py(v), fs * 0.6), fs * 0.3);
        // Room left of the plot for the widest y tick label and the y axis's label.
        let widest_tick = y_ticks
            .iter()
            .map(|&v| m.width(&tick_label(v), fs))
            .fold(0.0, f64::max);
        frame.x0 = frame.x0.max(pad + fs * 1.8 + widest_tick);
        let x_ticks = if log {
            log_ticks(xmin, xmax)
        } else {
            linear_ticks(
                xmin,
                xmax,
                ((frame.x1 - frame.x0) / (70.0 * scale)).max(2.0),
            )
        };
        // An x tick label is kept inside the chart, and the labels apart.
        let x_at = |v: f64| {
            let half = m.width(&tick_label(v), fs) / 2.0;
            (
                frame
                    .px(v)
                    .clamp(half + scale, (w - half - scale).max(half + scale)),
                half,
            )
        };
        let x_ticks = thin(x_ticks, x_at, fs * 0.5);
        for &v in &x_ticks {
            labels.push(label(
                tick_label(v),
                x_at(v).0,
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
        // Axis labels: cut to fit (the whole on hover).
        if !fig.x_label.is_empty() {
            // Under the plot, clear of a legend to its right.
            let end = if right { frame.x1 + pad * 0.5 } else { w - pad };
            let text = m.fit(&fig.x_label, fs, end - pad);
            let half = m.width(&text, fs) / 2.0;
            let centre =
                ((frame.x0 + frame.x1) / 2.0).clamp(pad + half, (end - half).max(pad + half));
            labels.push(Label {
                full: (text != fig.x_label).then(|| fig.x_label.clone()),
                ..label(text, centre, frame.y1 + fs * 2.3, fs, Align::Centre, false)
            });
        }
        if !fig.y_label.is_empty() {
            // Beside the plot, running past its ends when it must (left of
            // the tick labels, clear of the title and of a legend below).
            let (a, b) = (plot_top, frame.y1 + fs * 2.9);
            let text = m.fit(&fig.y_label, fs, (b - a).max(0.0));
            let half = m.width(&text, fs) / 2.0;
            let centre = ((frame.y0 + frame.y1) / 2.0).clamp(a + half, (b - half).max(a + half));
            labels.push(Label {
                upright: true,
                full: (text != fig.y_label).then(|| fig.y_label.clone()),
                ..label(text, pad + fs * 0.6, centre, fs, Align::Centre, false)
            });
        }
        let mut legend = Vec::new();
        let mut place = |e: &Entry, x: f64, y: f64| {
            if let Some(i) = e.item {
                legend.push((legend_items[i], x, y));
            }
            for (k, line) in e.lines.iter().enumerate() {
                labels.push(Label {
                    full: e.full.clone(),
                    ..label(
                        line.clone(),
                        x + sample_w,
                        y + row * k as f64,
                        fs,
                        Align::Left,
                        false,
                    )
                });
            }
        };
        if right {
            let mut ly = frame.y0 + fs * 0.5;
            for e in &entries {
                place(e, frame.x1 + pad, ly);
                ly += row * e.lines.len() as f64;
            }
        } else {
            let top = h - caption_h - legend_h + fs * 0.15 + row * 0.5;
            let (spots, _) = flow(m, &entries, fs, text_w, sample_w, 16.0 * scale);
            for (e, (x, r)) in entries.iter().zip(spots) {
                place(e, pad + x, top + row * r as f64);
            }
        }
        let caption_top = h - caption_h;
        for (i, line) in caption.into_iter().enumerate() {
            let y = caption_top + fs * 0.55 + caption_step * i as f64;
            labels.push(Label {
                full: caption_cut.then(|| fig.caption.clone()),
                ..label(line, pad, y, caption_size, Align::Left, true)
            });
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

    /// Where each text is drawn: its ink box, and its whole text when what
    /// is drawn is shortened.
    pub fn texts(&self) -> Vec<PlacedText> {
        self.labels
            .iter()
            .filter_map(|l| {
                Some(PlacedText {
                    text: l.text.clone(),
                    full: l.full.clone(),
                    size: l.size,
                    upright: l.upright,
                    bounds: l.bounds()?,
                })
            })
            .collect()
    }

    /// The whole text of a shortened text at pixel (`px`, `py`) (a few
    /// pixels around its ink count), with its box.
    pub fn full_text_at(&self, px: f64, py: f64) -> Option<(&str, TextBox)> {
        let near = 4.0 * self.scale;
        self.labels.iter().find_map(|l| {
            let full = l.full.as_deref()?;
            let b = l.bounds()?;
            (px >= b.left - near
                && px <= b.right + near
                && py >= b.top - near
                && py <= b.bottom + near)
                .then_some((full, b))
        })
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

    /// A chart like the (#34): five learners with long labels, a
    /// burn-in legend entry and a long title, on linear or log axes.
    fn crowded(log: bool, learners: usize, caption: &str) -> Figure {
        use crate::chart::{Series, colours::series_colour};
        let names = [
            "ucbvi-bernstein ×0.1 (bonus scaled)",
            "mvp ×0.01",
            "q-learning with UCB-Hoeffding bonuses",
            "psrl",
            "eps-greedy ε=0.2",
            "uniform",
            "orlc ×0.1: certificate",
        ];
        let x: Vec<f64> = (1..=60).map(|k| f64::from(k) * 25.0).collect();
        let mut series: Vec<Series> = (0..learners)
            .map(|i| Series {
                label: names[i % names.len()].to_string(),
                colour: series_colour(i),
                x: x.clone(),
                y: x.iter().map(|k| k.sqrt() * (i + 1) as f64 * 13.7).collect(),
                band: None,
                dash: None,
                width: 2.0,
                legend: true,
                curve: true,
            })
            .collect();
        series.push(Series {
            label: "thick tick: burn-in (the slope settles)".into(),
            x: vec![],
            y: vec![],
            curve: false,
            ..series[0].clone()
        });
        Figure {
            title: "Cumulative regret — Night ferry with a long name (S=4, A=3, H=7, 16 seeds)"
                .into(),
            x_label: "episode k".into(),
            x_name: "k".into(),
            y_label: "cumulative expected regret".into(),
            log,
            bars: false,
            series,
            caption: caption.into(),
        }
    }

    /// Every text's ink inside the chart and clear of every other text.
    fn clear(l: &Layout) -> Result<(), String> {
        let texts = l.texts();
        for (i, a) in texts.iter().enumerate() {
            if !a.bounds.inside(l.width, l.height) {
                return Err(format!("{:?} outside {}×{}", a, l.width, l.height));
            }
            if let Some(b) = texts[..i].iter().find(|b| b.bounds.overlaps(&a.bounds)) {
                return Err(format!("{a:?} overlaps {b:?}"));
            }
        }
        if !(l.frame.x1 - l.frame.x0 > 100.0 * l.scale && l.frame.y1 - l.frame.y0 > 60.0 * l.scale)
        {
            return Err(format!("a plot too small to read: {:?}", l.frame));
        }
        Ok(())
    }

    /// #34: at every width the page draws (its chart box is 278 CSS
    /// pixels wide on a 360-pixel phone; up to 1400, at the page's height
    /// for it, on screens of one and two pixels to the CSS pixel) and at
    /// export sizes, no text runs outside the chart or into
    /// another; a shortened text keeps its whole text for the hover, and
    /// each learner is named in the legend.
    #[test]
    fn texts_stay_inside_the_chart_and_apart_at_every_width() {
        let long_caption = "Ferry check. Shaded: 95% Student-t intervals across seeds. Dashed: each learner’s published bound as an order (constants and log factors dropped); sparsely dashed where it does not apply.";
        for log in [false, true] {
            for learners in [2, 5, 7] {
                let fig = crowded(log, learners, "");
                for css in (270..=1400).step_by(10) {
                    let w = f64::from(css);
                    // The page's chart height for its width (www/experiment.js).
                    let h = (w.max(320.0) * 0.5).clamp(300.0, 520.0).round();
                    for ratio in [1.0, 2.0] {
                        let l = Layout::new(&fig, w * ratio, h * ratio, ratio);
                        clear(&l).unwrap_or_else(|e| {
                            panic!("{css} px ×{ratio}, log {log}, {learners} learners: {e}")
                        });
                        let texts = l.texts();
                        for s in fig.series.iter().filter(|s| s.legend) {
                            let named = texts.iter().any(|t| {
                                t.text == s.label
                                    || t.full
                                        .as_deref()
                                        .is_some_and(|f| f.split("; ").any(|x| x == s.label))
                            }) || s.label.split(' ').all(|word| {
                                texts.iter().any(|t| t.text.split(' ').any(|w| w == word))
                            });
                            assert!(
                                named,
                                "{css} px: {} is in the legend, whole or on hover",
                                s.label
                            );
                        }
                        for t in texts.iter().filter(|t| t.text.contains('…')) {
                            assert!(
                                t.full.is_some(),
                                "{css} px: {:?} is cut and has its whole text",
                                t.text
                            );
                        }
                    }
                }
                // Exports: `burnin plot`'s default size and smaller ones, captioned.
                let fig = crowded(log, learners, long_caption);
                for (w, h, s) in [
                    (1280.0, 720.0, 1.25),
                    (640.0, 400.0, 1.0),
                    (400.0, 300.0, 1.0),
                ] {
                    clear(&Layout::new(&fig, w, h, s))
                        .unwrap_or_else(|e| panic!("export {w}×{h}: {e}"));
                }
            }
        }
    }

    /// Where there is room, legend entries and titles wrap rather than
    /// being cut (the "ucbvi-berns", "…(the slope settles").
    #[test]
    fn legends_and_titles_wrap_where_there_is_room() {
        let fig = crowded(false, 5, "");
        for (w, h) in [(390.0, 300.0), (700.0, 350.0), (1366.0, 520.0)] {
            let l = Layout::new(&fig, w, h, 1.0);
            assert!(
                l.labels.iter().all(|t| t.full.is_none()),
                "{w} px: nothing is cut: {:?}",
                l.labels
                    .iter()
                    .filter(|t| t.full.is_some())
                    .map(|t| &t.text)
                    .collect::<Vec<_>>()
            );
            let words: Vec<&str> = l.labels.iter().flat_map(|t| t.text.split(' ')).collect();
            for s in &fig.series {
                assert!(
                    s.label.split(' ').all(|word| words.contains(&word)),
                    "{w} px: {}",
                    s.label
                );
            }
        }
        // A chart too small for the legend cuts entries and keeps them whole for the hover.
        let l = Layout::new(&crowded(false, 7, ""), 360.0, 220.0, 1.0);
        clear(&l).unwrap();
        let cut: Vec<&Label> = l.labels.iter().filter(|t| t.full.is_some()).collect();
        assert!(!cut.is_empty());
        let b = cut[0].bounds().unwrap();
        let (full, _) = l
            .full_text_at((b.left + b.right) / 2.0, (b.top + b.bottom) / 2.0)
            .unwrap();
        assert_eq!(Some(full), cut[0].full.as_deref());
    }

    /// The ink boxes are the font's: "x" sits on the baseline with the
    /// font's x-height, half of it above the anchor; "g" descends below it.
    #[test]
    fn ink_boxes_are_the_glyphs() {
        let m = Metrics::get();
        let (x0, x1, lo, hi) = m.ink("x").unwrap();
        // DejaVu Sans's "x": 1120 units high, from 59 to 1190 of 2048 (its glyf table).
        assert!(
            (hi - 1120.0 / 2048.0).abs() < 1e-9 && lo.abs() < 1e-9,
            "{lo} {hi}"
        );
        assert!(x0 > 0.0 && x1 < m.width("x", 1.0));
        assert!(m.ink("g").unwrap().2 < -0.2);
        assert!(m.ink("   ").is_none());
        let l = Label {
            text: "x".into(),
            full: None,
            x: 100.0,
            y: 50.0,
            size: 20.0,
            align: Align::Left,
            upright: false,
            muted: false,
        };
        let b = l.bounds().unwrap();
        assert!(
            (b.top - (50.0 - 10.0 * m.x_height)).abs() < 1e-9
                && (b.bottom - (50.0 + 10.0 * m.x_height)).abs() < 1e-9,
            "{b:?}"
        );
        let up = Label { upright: true, ..l }.bounds().unwrap();
        assert!((up.right - up.left - (b.bottom - b.top)).abs() < 1e-9 && up.bottom <= 50.0 + 1e-9);
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
