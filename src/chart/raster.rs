//! PNG charts (native only): plotters' bitmap backend, with text drawn from
//! the embedded typeface by ab_glyph (no system fonts), sized and anchored
//! as the page's canvas and SVG draw it, and drawn at twice the size and
//! averaged down for smooth lines.

use ab_glyph::{Font, FontRef, PxScale, ScaleFont, point};
use plotters::prelude::*;
use plotters_backend::{
    BackendColor, BackendCoord, BackendStyle, BackendTextStyle, DrawingErrorKind, FontTransform,
    text_anchor::{HPos, VPos},
};

use super::Figure;
use super::draw::{FINE, TypeSizes, draw};
use super::layout::{FONT, Metrics};

/// Plotters' bitmap backend with our own text.
struct Raster<'a> {
    inner: BitMapBackend<'a>,
    font: FontRef<'static>,
}

type Error = <BitMapBackend<'static> as DrawingBackend>::ErrorType;
type Failed = DrawingErrorKind<Error>;

impl DrawingBackend for Raster<'_> {
    type ErrorType = Error;

    fn get_size(&self) -> (u32, u32) {
        self.inner.get_size()
    }
    fn ensure_prepared(&mut self) -> Result<(), Failed> {
        self.inner.ensure_prepared()
    }
    fn present(&mut self) -> Result<(), Failed> {
        self.inner.present()
    }
    fn draw_pixel(&mut self, p: BackendCoord, c: BackendColor) -> Result<(), Failed> {
        self.inner.draw_pixel(p, c)
    }
    fn draw_line<S: BackendStyle>(
        &mut self,
        a: BackendCoord,
        b: BackendCoord,
        s: &S,
    ) -> Result<(), Failed> {
        self.draw_path([a, b], s)
    }
    fn draw_rect<S: BackendStyle>(
        &mut self,
        a: BackendCoord,
        b: BackendCoord,
        s: &S,
        fill: bool,
    ) -> Result<(), Failed> {
        self.inner.draw_rect(a, b, s, fill)
    }
    /// A polyline stroked as the canvas and SVG stroke it (butt ends,
    /// mitred joins), with antialiasing.
    fn draw_path<S: BackendStyle, I: IntoIterator<Item = BackendCoord>>(
        &mut self,
        path: I,
        s: &S,
    ) -> Result<(), Failed> {
        let pts: Vec<(f64, f64)> = path
            .into_iter()
            .map(|(x, y)| (f64::from(x), f64::from(y)))
            .collect();
        let shapes = stroke(&pts, f64::from(s.stroke_width()) / 2.0);
        self.fill(&shapes, s.color())
    }
    fn fill_polygon<S: BackendStyle, I: IntoIterator<Item = BackendCoord>>(
        &mut self,
        vert: I,
        s: &S,
    ) -> Result<(), Failed> {
        let pts: Vec<(f64, f64)> = vert
            .into_iter()
            .map(|(x, y)| (f64::from(x), f64::from(y)))
            .collect();
        self.fill(&[pts], s.color())
    }

    /// Text at `pos` anchored as the canvas and SVG anchor it: the size is
    /// pixels to the em; vertically centred on half the x-height (SVG's
    /// `dy="0.5ex"`), top at 0.76 em above the baseline, bottom half an ex
    /// under it.
    fn draw_text<S: BackendTextStyle>(
        &mut self,
        text: &str,
        style: &S,
        pos: BackendCoord,
    ) -> Result<(), Failed> {
        let em = style.size() as f32;
        let upm = self.font.units_per_em().unwrap_or(1000.0);
        let height = self.font.height_unscaled();
        let font = self.font.as_scaled(PxScale::from(em * height / upm));
        let width: f32 = text.chars().map(|c| font.h_advance(font.glyph_id(c))).sum();
        let ex = Metrics::get().x_height as f32 * em;
        let dx = match style.anchor().h_pos {
            HPos::Left => 0.0,
            HPos::Center => -width / 2.0,
            HPos::Right => -width,
        };
        let baseline = match style.anchor().v_pos {
            VPos::Top => 0.76 * em,
            VPos::Center => 0.5 * ex,
            VPos::Bottom => -0.5 * ex,
        };
        let turn = style.transform();
        let colour = style.color();
        let mut x = dx;
        let mut pixels = Vec::new();
        for c in text.chars() {
            let glyph = font
                .glyph_id(c)
                .with_scale_and_position(font.scale(), point(x, baseline));
            x += font.h_advance(font.glyph_id(c));
            if let Some(outline) = font.outline_glyph(glyph) {
                let b = outline.px_bounds();
                outline.draw(|gx, gy, cover| {
                    pixels.push((
                        b.min.x as i32 + gx as i32,
                        b.min.y as i32 + gy as i32,
                        cover,
                    ));
                });
            }
        }
        for (u, v, cover) in pixels {
            let (du, dv) = match turn {
                FontTransform::Rotate270 => (v, -u),
                FontTransform::Rotate90 => (-v, u),
                FontTransform::Rotate180 => (-u, -v),
                FontTransform::None => (u, v),
            };
            let c = BackendColor {
                alpha: colour.alpha * f64::from(cover.min(1.0)),
                rgb: colour.rgb,
            };
            self.inner.draw_pixel((pos.0 + du, pos.1 + dv), c)?;
        }
        Ok(())
    }
}

/// Rows sampled in each pixel row by [`Raster::fill`] (along a row the
/// coverage is exact).
const SUB: usize = 4;

impl Raster<'_> {
    /// Fills the union of `shapes` (nonzero winding) in colour `c`, each
    /// pixel by the share of it covered, as a browser fills a path: a
    /// pixel (i, j) is the square from (i, j) to (i + 1, j + 1).
    fn fill(&mut self, shapes: &[Vec<(f64, f64)>], c: BackendColor) -> Result<(), Failed> {
        if c.alpha == 0.0 {
            return Ok(());
        }
        let (w, h) = self.inner.get_size();
        // Edges, top to bottom, with their direction.
        let mut edges = Vec::new();
        for shape in shapes.iter().filter(|s| s.len() >= 3) {
            for (i, &a) in shape.iter().enumerate() {
                let b = shape[(i + 1) % shape.len()];
                if a.1 != b.1 {
                    let (top, bottom, dir) = if a.1 < b.1 { (a, b, 1) } else { (b, a, -1) };
                    edges.push((top, bottom, dir));
                }
            }
        }
        if edges.is_empty() {
            return Ok(());
        }
        // The box the edges span, within the bitmap.
        let (mut x0, mut x1, mut top, mut bottom) = (
            f64::INFINITY,
            f64::NEG_INFINITY,
            f64::INFINITY,
            f64::NEG_INFINITY,
        );
        for (a, b, _) in &edges {
            (x0, x1) = (x0.min(a.0).min(b.0), x1.max(a.0).max(b.0));
            (top, bottom) = (top.min(a.1), bottom.max(b.1));
        }
        let (x0, x1) = (x0.floor().max(0.0), x1.ceil().min(f64::from(w)));
        let y0 = top.floor().max(0.0) as i64;
        let y1 = bottom.ceil().min(f64::from(h)) as i64;
        if x1 <= x0 {
            return Ok(());
        }
        let mut cover = vec![0.0f64; (x1 - x0) as usize + 1];
        let mut cross: Vec<(f64, i32)> = Vec::new();
        for py in y0..y1 {
            cover.iter_mut().for_each(|v| *v = 0.0);
            for k in 0..SUB {
                let sy = py as f64 + (k as f64 + 0.5) / SUB as f64;
                cross.clear();
                for &(a, b, dir) in &edges {
                    if a.1 <= sy && sy < b.1 {
                        cross.push((a.0 + (sy - a.1) / (b.1 - a.1) * (b.0 - a.0), dir));
                    }
                }
                cross.sort_by(|p, q| p.0.total_cmp(&q.0));
                let mut winding = 0;
                for pair in cross.windows(2) {
                    winding += pair[0].1;
                    if winding != 0 {
                        let (a, b) = (pair[0].0.clamp(x0, x1) - x0, pair[1].0.clamp(x0, x1) - x0);
                        span(&mut cover, a, b, 1.0 / SUB as f64);
                    }
                }
            }
            for (i, &v) in cover.iter().enumerate() {
                if v > 0.0 {
                    let px = (x0 as i64 + i as i64) as i32;
                    let colour = BackendColor {
                        alpha: c.alpha * v.min(1.0),
                        rgb: c.rgb,
                    };
                    self.inner.draw_pixel((px, py as i32), colour)?;
                }
            }
        }
        Ok(())
    }
}

/// Adds `weight` times the covered share of each cell of `cover` from x = `a` to `b`.
fn span(cover: &mut [f64], a: f64, b: f64, weight: f64) {
    if b <= a {
        return;
    }
    let (ia, ib) = (a.floor() as usize, b.floor() as usize);
    let last = cover.len() - 1;
    if ia == ib {
        cover[ia.min(last)] += (b - a) * weight;
        return;
    }
    cover[ia.min(last)] += (ia as f64 + 1.0 - a) * weight;
    for v in &mut cover[(ia + 1).min(last)..ib.min(last)] {
        *v += weight;
    }
    if ib <= last {
        cover[ib] += (b - ib as f64) * weight;
    }
}

/// The canvas's and SVG's longest mitre, in half line widths, before a
/// join is bevelled (the canvas's default `miterLimit`).
const MITRE_LIMIT: f64 = 10.0;

/// The outline of a polyline stroked `r` either side: a quadrilateral per
/// segment (butt ends) and a mitred (or, past the limit, bevelled) wedge
/// at each join, all wound the same way, to be filled together.
fn stroke(pts: &[(f64, f64)], r: f64) -> Vec<Vec<(f64, f64)>> {
    let mut pts = pts.to_vec();
    pts.dedup();
    let normal = |a: (f64, f64), b: (f64, f64)| {
        let (dx, dy) = (b.0 - a.0, b.1 - a.1);
        let len = dx.hypot(dy);
        (-dy / len * r, dx / len * r)
    };
    let mut shapes = Vec::new();
    for seg in pts.windows(2) {
        let (a, b) = (seg[0], seg[1]);
        let n = normal(a, b);
        shapes.push(vec![
            (a.0 + n.0, a.1 + n.1),
            (b.0 + n.0, b.1 + n.1),
            (b.0 - n.0, b.1 - n.1),
            (a.0 - n.0, a.1 - n.1),
        ]);
    }
    for tri in pts.windows(3) {
        let (a, b, c) = (tri[0], tri[1], tri[2]);
        let (n1, n2) = (normal(a, b), normal(b, c));
        let turn = (b.0 - a.0) * (c.1 - b.1) - (b.1 - a.1) * (c.0 - b.0);
        if turn == 0.0 {
            continue;
        }
        // The outer side is the one the path turns away from.
        let s = if turn > 0.0 { -1.0 } else { 1.0 };
        let (o1, o2) = ((n1.0 * s, n1.1 * s), (n2.0 * s, n2.1 * s));
        let mut wedge = vec![b, (b.0 + o1.0, b.1 + o1.1)];
        let mid = (o1.0 + o2.0, o1.1 + o2.1);
        let len = mid.0.hypot(mid.1);
        if len > 0.0 {
            // Half the angle between the two offsets, through its cosine.
            let cos = (o1.0 * mid.0 + o1.1 * mid.1) / (r * len);
            if cos > 0.0 && 1.0 / cos <= MITRE_LIMIT {
                let m = r / cos / len;
                wedge.push((b.0 + mid.0 * m, b.1 + mid.1 * m));
            }
        }
        wedge.push((b.0 + o2.0, b.1 + o2.1));
        shapes.push(wedge);
    }
    // Every shape wound as the first segment's quadrilateral is.
    let area = |s: &Vec<(f64, f64)>| {
        (0..s.len())
            .map(|i| {
                let (p, q) = (s[i], s[(i + 1) % s.len()]);
                p.0 * q.1 - q.0 * p.1
            })
            .sum::<f64>()
    };
    if let Some(first) = shapes.first().map(area) {
        for shape in &mut shapes {
            if area(shape) * first < 0.0 {
                shape.reverse();
            }
        }
    }
    shapes
}

/// The chart as a PNG image, w×h pixels, type enlarged by `scale`.
pub fn png(fig: &Figure, w: u32, h: u32, scale: f64) -> Vec<u8> {
    // Drawn at FINE (2) times the size, then each 2×2 block averaged.
    const _: () = assert!(FINE == 2, "the averaging below takes 2×2 blocks");
    let (bw, bh) = (2 * w, 2 * h);
    let mut big = vec![0u8; (bw * bh * 3) as usize];
    {
        let raster = Raster {
            inner: BitMapBackend::with_buffer(&mut big, (bw, bh)),
            font: FontRef::try_from_slice(FONT).expect("the embedded font parses"),
        };
        let area = raster.into_drawing_area();
        draw(&area, fig, scale, TypeSizes::EM).expect("drawing into memory cannot fail");
        area.present()
            .expect("a bitmap in memory is always complete");
    }
    let mut small = vec![0u8; (w * h * 3) as usize];
    for y in 0..h as usize {
        for x in 0..w as usize {
            for k in 0..3 {
                let p = |dx: usize, dy: usize| {
                    u32::from(big[((2 * y + dy) * bw as usize + 2 * x + dx) * 3 + k])
                };
                small[(y * w as usize + x) * 3 + k] =
                    ((p(0, 0) + p(1, 0) + p(0, 1) + p(1, 1) + 2) / 4) as u8;
            }
        }
    }
    let mut out = Vec::new();
    {
        let mut enc = png::Encoder::new(&mut out, w, h);
        enc.set_color(png::ColorType::Rgb);
        enc.set_depth(png::BitDepth::Eight);
        let mut writer = enc.write_header().expect("PNG header into memory");
        writer
            .write_image_data(&small)
            .expect("PNG data into memory");
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Black shapes drawn on a white 20×20 bitmap; each pixel's darkness (0 to 1).
    fn darkness(draw: impl FnOnce(&mut Raster<'_>)) -> Vec<Vec<f64>> {
        let mut buf = vec![255u8; 20 * 20 * 3];
        {
            let mut r = Raster {
                inner: BitMapBackend::with_buffer(&mut buf, (20, 20)),
                font: FontRef::try_from_slice(FONT).unwrap(),
            };
            draw(&mut r);
            r.present().unwrap();
        }
        (0..20)
            .map(|y| {
                (0..20)
                    .map(|x| 1.0 - f64::from(buf[(y * 20 + x) * 3]) / 255.0)
                    .collect()
            })
            .collect()
    }

    /// A stroke covers what the canvas's would: a line 2 wide along the
    /// border between rows 9 and 10 fills exactly those rows from x = 2 to
    /// 18 (butt ends); one 3 wide covers half of rows 8 and 11 as well.
    #[test]
    fn strokes_cover_what_a_browser_covers() {
        let black = Color::stroke_width(&BLACK, 2);
        let d = darkness(|r| r.draw_path([(2, 10), (18, 10)], &black).unwrap());
        for (y, row) in d.iter().enumerate() {
            for (x, &v) in row.iter().enumerate() {
                let want = if (9..=10).contains(&y) && (2..18).contains(&x) {
                    1.0
                } else {
                    0.0
                };
                assert!((v - want).abs() < 0.01, "({x}, {y}): {v}");
            }
        }
        let d = darkness(|r| {
            r.draw_path([(2, 10), (18, 10)], &Color::stroke_width(&BLACK, 3))
                .unwrap()
        });
        assert!(
            (d[8][5] - 0.5).abs() < 0.01 && (d[11][5] - 0.5).abs() < 0.01,
            "{} {}",
            d[8][5],
            d[11][5]
        );
        assert!(d[9][5] > 0.99 && d[7][5] < 0.01);
    }

    /// The darkness of a filled polygon sums to its area (the shoelace
    /// formula), however its edges cross the pixels; a join is filled
    /// once, not twice, where segments overlap.
    #[test]
    fn fills_cover_their_area() {
        let d = darkness(|r| r.fill_polygon([(1, 1), (17, 3), (6, 19)], &BLACK).unwrap());
        let sum: f64 = d.iter().flatten().sum();
        // Shoelace: ½|1·3 − 17·1 + 17·19 − 6·3 + 6·1 − 1·19| = 139.
        assert!((sum - 139.0).abs() < 1.0, "{sum}");
        let d = darkness(|r| {
            r.draw_path([(2, 4), (10, 4), (10, 16)], &Color::stroke_width(&BLACK, 2))
                .unwrap()
        });
        // Strokes of 8 and 12 by 2 overlapping on a 1×1 square (counted
        // once), and the mitred corner's 1×1 square.
        let sum: f64 = d.iter().flatten().sum();
        assert!((sum - (16.0 + 24.0 - 1.0 + 1.0)).abs() < 0.5, "{sum}");
        assert!(d.iter().flatten().all(|&v| v <= 1.0));
    }
}
