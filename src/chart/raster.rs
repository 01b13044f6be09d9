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
        self.inner.draw_line(a, b, s)
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
    fn draw_path<S: BackendStyle, I: IntoIterator<Item = BackendCoord>>(
        &mut self,
        path: I,
        s: &S,
    ) -> Result<(), Failed> {
        self.inner.draw_path(path, s)
    }
    fn fill_polygon<S: BackendStyle, I: IntoIterator<Item = BackendCoord>>(
        &mut self,
        vert: I,
        s: &S,
    ) -> Result<(), Failed> {
        self.inner.fill_polygon(vert, s)
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
