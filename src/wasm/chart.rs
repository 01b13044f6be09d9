//! The page's charts, on its main thread where the canvases are: the
//! chart of one results file ([`ResultsChart`]), drawn by the core
//! (`crate::chart`) into a canvas through plotters-canvas
//! ([`PageCanvas`]), and the typeface the layout measures with.
//! Conversions around core calls, as in the rest of the bindings.

use js_sys::{Object, Reflect};
use wasm_bindgen::prelude::*;

use super::{set, to_js};

/// The chart of one results file, kept on the page's thread, where its
/// canvases are: drawn by the core (`chart`) through plotters-canvas.
/// Holds the chart data ([`crate::chart::chart_text`], from the worker) and
/// the last drawing's layout for the hover read-out.
#[wasm_bindgen]
pub struct ResultsChart {
    out: crate::experiment::Output,
    drawn: Option<(crate::chart::Figure, crate::chart::layout::Layout)>,
}

/// Chart options from the page's controls (see `chart::Options`).
fn chart_options(options: JsValue) -> Result<crate::chart::Options, JsValue> {
    serde_wasm_bindgen::from_value(options)
        .map_err(|e| JsValue::from_str(&format!("chart options: {e}")))
}

#[wasm_bindgen]
impl ResultsChart {
    /// Reads chart data (`chartText` of a results document or a merge).
    #[wasm_bindgen(constructor)]
    pub fn new(text: &str) -> Result<ResultsChart, JsValue> {
        let out = crate::chart::read_chart_text(text).map_err(|e| JsValue::from_str(&e))?;
        Ok(ResultsChart { out, drawn: None })
    }

    /// The views these results have: `[{key, label}]`, the default first.
    pub fn views(&self) -> JsValue {
        #[derive(serde::Serialize)]
        struct ViewItem {
            key: &'static str,
            label: String,
        }
        let list: Vec<ViewItem> = crate::chart::views(&self.out)
            .into_iter()
            .map(|(v, label)| ViewItem {
                key: v.key(),
                label,
            })
            .collect();
        to_js(&list)
    }

    /// Draws the chart into `canvas` at its pixel size, type and lines
    /// enlarged by `scale` (the device pixel ratio times any presentation
    /// scale). `{ok: true, series}` or `{ok: false, message}` when the view
    /// cannot be drawn (the canvas then says why), with the placed `texts`
    /// and the `plot` area's [left, top, right, bottom] in canvas pixels.
    pub fn draw(
        &mut self,
        canvas: web_sys::HtmlCanvasElement,
        options: JsValue,
        scale: f64,
    ) -> Result<JsValue, JsValue> {
        use crate::chart::{
            Figure,
            draw::{TypeSizes, draw},
        };
        use plotters::prelude::IntoDrawingArea;
        let opts = chart_options(options)?;
        let (fig, ok) = match crate::chart::figure(&self.out, &opts) {
            Ok(f) => (f, Ok(())),
            Err(m) => (Figure::message(&m), Err(m)),
        };
        let backend = PageCanvas::new(canvas)
            .ok_or_else(|| JsValue::from_str("the canvas has no 2D context"))?;
        let ctx = backend.ctx.clone();
        let area = backend.into_drawing_area();
        let drawn = draw(&area, &fig, scale, TypeSizes::EM);
        ctx.set_transform(1.0, 0.0, 0.0, 1.0, 0.0, 0.0)?;
        let layout = drawn.map_err(|e| JsValue::from_str(&e))?;
        area.present()
            .map_err(|e| JsValue::from_str(&e.to_string()))?;
        let obj = Object::new();
        set(&obj, "texts", to_js(&layout.texts()));
        let f = &layout.frame;
        set(&obj, "plot", to_js(&[f.x0, f.y0, f.x1, f.y1]));
        match ok {
            Ok(()) => {
                set(&obj, "ok", true);
                set(&obj, "series", fig.series.len() as u32);
            }
            Err(m) => {
                set(&obj, "ok", false);
                set(&obj, "message", m);
            }
        }
        self.drawn = Some((fig, layout));
        Ok(obj.into())
    }

    /// The hover read-out at canvas pixel (`x`, `y`) of the last drawing:
    /// `{index, x, px, lines}`; over a shortened text (a cut title, legend
    /// entry or axis label), `{px, lines, text: true}` with its whole
    /// text; null elsewhere outside the plot.
    pub fn readout(&self, x: f64, y: f64) -> JsValue {
        let Some((fig, layout)) = &self.drawn else {
            return JsValue::NULL;
        };
        if let Some((full, b)) = layout.full_text_at(x, y) {
            let obj = Object::new();
            set(&obj, "px", b.left.max(0.0));
            set(&obj, "lines", to_js(&[full]));
            set(&obj, "text", true);
            return obj.into();
        }
        layout
            .readout(fig, x, y)
            .map_or(JsValue::NULL, |r| to_js(&r))
    }

    /// The chart as SVG, `width`×`height` pixels (what `burnin plot` writes
    /// for the same results and options).
    pub fn svg(
        &self,
        options: JsValue,
        width: u32,
        height: u32,
        scale: f64,
    ) -> Result<String, JsValue> {
        let opts = chart_options(options)?;
        crate::chart::svg(&self.out, &opts, width, height, scale).map_err(|e| JsValue::from_str(&e))
    }

    /// The words under the chart.
    pub fn caption(&self, options: JsValue) -> Result<String, JsValue> {
        Ok(crate::chart::caption(&self.out, &chart_options(options)?))
    }
}

/// The page's canvas as the charts' backend: plotters-canvas drawing in
/// [`crate::chart::draw::FINE`] units to the pixel (the context scaled
/// down to match), so curves keep sub-pixel precision as in the SVG and
/// PNG; text is drawn here, its baseline half an x-height under the anchor
/// as the SVG (`dy="0.5ex"`) and the PNG place it, where the canvas's
/// "middle" baseline would put it a pixel higher.
struct PageCanvas {
    inner: plotters_canvas::CanvasBackend,
    ctx: web_sys::CanvasRenderingContext2d,
    size: (u32, u32),
}

type CanvasFailed = plotters_backend::DrawingErrorKind<
    <plotters_canvas::CanvasBackend as plotters_backend::DrawingBackend>::ErrorType,
>;

impl PageCanvas {
    fn new(canvas: web_sys::HtmlCanvasElement) -> Option<PageCanvas> {
        use crate::chart::draw::FINE;
        let ctx: web_sys::CanvasRenderingContext2d =
            canvas.get_context("2d").ok()??.dyn_into().ok()?;
        let size = (FINE * canvas.width(), FINE * canvas.height());
        let f = 1.0 / f64::from(FINE);
        ctx.set_transform(f, 0.0, 0.0, f, 0.0, 0.0).ok()?;
        let inner = plotters_canvas::CanvasBackend::with_canvas_object(canvas)?;
        Some(PageCanvas { inner, ctx, size })
    }
}

impl plotters_backend::DrawingBackend for PageCanvas {
    type ErrorType =
        <plotters_canvas::CanvasBackend as plotters_backend::DrawingBackend>::ErrorType;

    fn get_size(&self) -> (u32, u32) {
        self.size
    }
    fn ensure_prepared(&mut self) -> Result<(), CanvasFailed> {
        self.inner.ensure_prepared()
    }
    fn present(&mut self) -> Result<(), CanvasFailed> {
        self.inner.present()
    }
    fn draw_pixel(
        &mut self,
        p: plotters_backend::BackendCoord,
        c: plotters_backend::BackendColor,
    ) -> Result<(), CanvasFailed> {
        self.inner.draw_pixel(p, c)
    }
    fn draw_line<S: plotters_backend::BackendStyle>(
        &mut self,
        a: plotters_backend::BackendCoord,
        b: plotters_backend::BackendCoord,
        s: &S,
    ) -> Result<(), CanvasFailed> {
        // Not plotters-canvas's, which moves level lines half a unit.
        self.inner.draw_path([a, b], s)
    }
    fn draw_rect<S: plotters_backend::BackendStyle>(
        &mut self,
        a: plotters_backend::BackendCoord,
        b: plotters_backend::BackendCoord,
        s: &S,
        fill: bool,
    ) -> Result<(), CanvasFailed> {
        self.inner.draw_rect(a, b, s, fill)
    }
    fn draw_path<
        S: plotters_backend::BackendStyle,
        I: IntoIterator<Item = plotters_backend::BackendCoord>,
    >(
        &mut self,
        path: I,
        s: &S,
    ) -> Result<(), CanvasFailed> {
        self.inner.draw_path(path, s)
    }
    fn fill_polygon<
        S: plotters_backend::BackendStyle,
        I: IntoIterator<Item = plotters_backend::BackendCoord>,
    >(
        &mut self,
        vert: I,
        s: &S,
    ) -> Result<(), CanvasFailed> {
        self.inner.fill_polygon(vert, s)
    }

    fn draw_text<S: plotters_backend::BackendTextStyle>(
        &mut self,
        text: &str,
        style: &S,
        pos: plotters_backend::BackendCoord,
    ) -> Result<(), CanvasFailed> {
        use plotters_backend::text_anchor::{HPos, VPos};
        let c = style.color();
        if c.alpha == 0.0 {
            return Ok(());
        }
        let f = f64::from(crate::chart::draw::FINE);
        // In pixels: the type at its own size, not scaled down.
        let size = style.size() / f;
        let ex = crate::chart::layout::Metrics::get().x_height * size;
        let ctx = &self.ctx;
        let failed = |e: JsValue| {
            plotters_backend::DrawingErrorKind::FontError(Box::new(std::io::Error::other(format!(
                "{e:?}"
            ))))
        };
        ctx.save();
        let drawn = (|| {
            ctx.set_transform(
                1.0,
                0.0,
                0.0,
                1.0,
                f64::from(pos.0) / f,
                f64::from(pos.1) / f,
            )?;
            match style.transform() {
                plotters_backend::FontTransform::Rotate270 => {
                    ctx.rotate(-std::f64::consts::FRAC_PI_2)?
                }
                plotters_backend::FontTransform::Rotate90 => {
                    ctx.rotate(std::f64::consts::FRAC_PI_2)?
                }
                plotters_backend::FontTransform::Rotate180 => ctx.rotate(std::f64::consts::PI)?,
                plotters_backend::FontTransform::None => {}
            }
            ctx.set_font(&format!("{size}px {}", style.family().as_str()));
            ctx.set_text_align(match style.anchor().h_pos {
                HPos::Left => "left",
                HPos::Center => "center",
                HPos::Right => "right",
            });
            ctx.set_text_baseline("alphabetic");
            // Glyphs at their advance widths, as the layout measured them
            // and the PNG sets them (the font's kerning would narrow a
            // long title by a pixel or two).
            Reflect::set(
                ctx,
                &JsValue::from_str("fontKerning"),
                &JsValue::from_str("none"),
            )?;
            let (r, g, b) = c.rgb;
            ctx.set_fill_style_str(&format!("rgba({r},{g},{b},{})", c.alpha));
            let dy = match style.anchor().v_pos {
                VPos::Top => 0.76 * size,
                VPos::Center => 0.5 * ex,
                VPos::Bottom => -0.5 * ex,
            };
            ctx.fill_text(text, 0.0, dy)
        })();
        ctx.restore();
        drawn.map_err(failed)
    }
}

/// The charts' typeface (its bytes, for the page's FontFace), so the canvas
/// draws with the glyphs the layout measured.
#[wasm_bindgen(js_name = chartFont)]
pub fn chart_font() -> js_sys::Uint8Array {
    js_sys::Uint8Array::from(crate::chart::layout::FONT)
}
