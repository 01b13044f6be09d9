//! Draws a laid-out chart on any plotters backend: the page's canvas
//! (plotters-canvas), SVG (plotters' SVG backend) and, natively, a bitmap
//! for PNG ([`super::raster`]).

use plotters::coord::Shift;
use plotters::element::DashedPathElement;
use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, Pos, VPos};

use super::Figure;
use super::colours::{BACKGROUND, FRAME, GRID, INK, MUTED, Rgb};
use super::layout::{Align, FONT, FONT_FAMILY, Label, Layout};

fn colour(c: Rgb) -> RGBColor {
    RGBColor(c.0, c.1, c.2)
}

/// Backend units to the pixel. Plotters draws at whole units of its
/// backend, so every backend here is given `FINE` units to the pixel: the
/// SVG through its `viewBox`, the page's canvas through its transform, the
/// bitmap by being drawn `FINE` times the size and averaged down. Curves
/// keep half-pixel precision (whole pixels put visible kinks in slow
/// slopes, #34), and the page's PNG and `burnin plot`'s PNG draw the same
/// points.
pub const FINE: u32 = 2;

/// A pixel position in backend units.
fn at(x: f64, y: f64) -> (i32, i32) {
    let f = f64::from(FINE);
    ((x * f).round() as i32, (y * f).round() as i32)
}

/// The middle of the pixel `v` falls in: a hairline one pixel wide drawn
/// there covers that pixel only, sharp on every backend.
fn crisp(v: f64) -> f64 {
    v.floor() + 0.5
}

/// How a backend sizes type: plotters' SVG backend writes `font-size` as
/// the size given ÷ 1.24 (its convention for a font's pixel height), the
/// canvas and our bitmap text take it as pixels to the em.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct TypeSizes(pub f64);

impl TypeSizes {
    pub const EM: TypeSizes = TypeSizes(1.0);
    pub const SVG: TypeSizes = TypeSizes(1.24);
}

/// Draws `fig` in the whole of `area` (w×h pixels, `area` being
/// [`FINE`]·w × [`FINE`]·h units) with type enlarged by `scale`; returns
/// the layout, in pixels (for the hover read-out).
pub fn draw<DB: DrawingBackend>(
    area: &DrawingArea<DB, Shift>,
    fig: &Figure,
    scale: f64,
    sizes: TypeSizes,
) -> Result<Layout, String> {
    let (w, h) = area.dim_in_pixel();
    let f = f64::from(FINE);
    let layout = Layout::new(fig, f64::from(w) / f, f64::from(h) / f, scale);
    paint(area, fig, &layout, sizes).map_err(|e| format!("the chart could not be drawn: {e}"))?;
    Ok(layout)
}

fn paint<DB: DrawingBackend>(
    area: &DrawingArea<DB, Shift>,
    fig: &Figure,
    l: &Layout,
    sizes: TypeSizes,
) -> Result<(), DrawingAreaErrorKind<DB::ErrorType>> {
    let f = l.frame;
    let s = l.scale;
    let width = |w: f64| ((w * s * f64::from(FINE)).round() as u32).max(1);
    area.fill(&colour(BACKGROUND))?;
    // Grid and frame: hairlines a pixel wide, each on a row or column of pixels.
    let grid = colour(GRID).stroke_width(FINE);
    for &v in &l.x_ticks {
        area.draw(&PathElement::new(
            vec![at(crisp(f.px(v)), f.y0), at(crisp(f.px(v)), f.y1)],
            grid,
        ))?;
    }
    for &v in &l.y_ticks {
        area.draw(&PathElement::new(
            vec![at(f.x0, crisp(f.py(v))), at(f.x1, crisp(f.py(v)))],
            grid,
        ))?;
    }
    let (x0, x1, y0, y1) = (crisp(f.x0), crisp(f.x1), crisp(f.y0), crisp(f.y1));
    area.draw(&PathElement::new(
        vec![at(x0, y0), at(x1, y0), at(x1, y1), at(x0, y1), at(x0, y0)],
        colour(FRAME).stroke_width(FINE),
    ))?;
    // Series: bands first, then lines, in order.
    for series in &fig.series {
        let idx: Vec<usize> = (0..series.x.len())
            .filter(|&i| f.shows(series.x[i], series.y[i]))
            .collect();
        let c = colour(series.colour);
        if let (Some((lo, hi)), false) = (&series.band, fig.bars) {
            let ok: Vec<usize> = idx
                .iter()
                .copied()
                .filter(|&i| f.shows(series.x[i], lo[i]) && f.shows(series.x[i], hi[i]))
                .collect();
            if ok.len() >= 2 {
                let mut pts: Vec<(i32, i32)> = ok
                    .iter()
                    .map(|&i| at(f.px(series.x[i]), f.py(hi[i])))
                    .collect();
                pts.extend(ok.iter().rev().map(|&i| at(f.px(series.x[i]), f.py(lo[i]))));
                area.draw(&Polygon::new(pts, c.mix(0.16).filled()))?;
            }
        }
        let pts: Vec<(i32, i32)> = idx
            .iter()
            .map(|&i| at(f.px(series.x[i]), f.py(series.y[i])))
            .collect();
        line(area, pts, c, width(series.width), series.dash, s)?;
        if fig.bars {
            for &i in &idx {
                let x = f.px(series.x[i]);
                if let Some((lo, hi)) = &series.band {
                    // On log axes a lower end at or below zero runs to the frame.
                    let bottom = if f.shows(1.0, lo[i]) {
                        f.py(lo[i]).min(f.y1)
                    } else {
                        f.y1
                    };
                    area.draw(&PathElement::new(
                        vec![at(x, bottom), at(x, f.py(hi[i]))],
                        c.stroke_width(width(1.5)),
                    ))?;
                }
                let y = f.py(series.y[i]);
                let r = 3.0 * s;
                area.draw(&Rectangle::new(
                    [at(x - r, y - r), at(x + r, y + r)],
                    c.filled(),
                ))?;
            }
        }
    }
    // Legend samples.
    for &(i, x, y) in &l.legend {
        let series = &fig.series[i];
        let pts = vec![at(x, y), at(x + 20.0 * s, y)];
        line(
            area,
            pts,
            colour(series.colour),
            width(series.width),
            series.dash,
            s,
        )?;
    }
    for label in &l.labels {
        text(area, label, sizes)?;
    }
    Ok(())
}

/// A polyline, solid or dashed (dash and gap at scale 1).
fn line<DB: DrawingBackend>(
    area: &DrawingArea<DB, Shift>,
    pts: Vec<(i32, i32)>,
    c: RGBColor,
    width: u32,
    dash: Option<(f64, f64)>,
    scale: f64,
) -> Result<(), DrawingAreaErrorKind<DB::ErrorType>> {
    if pts.len() < 2 {
        return Ok(());
    }
    let style = c.stroke_width(width);
    match dash {
        None => area.draw(&PathElement::new(pts, style)),
        Some((on, off)) => {
            let len = |v: f64| ((v * scale * f64::from(FINE)).round() as u32).max(1);
            area.draw(&DashedPathElement::new(pts, len(on), len(off), style))
        }
    }
}

fn text<DB: DrawingBackend>(
    area: &DrawingArea<DB, Shift>,
    label: &Label,
    sizes: TypeSizes,
) -> Result<(), DrawingAreaErrorKind<DB::ErrorType>> {
    let h = match label.align {
        Align::Left => HPos::Left,
        Align::Centre => HPos::Center,
        Align::Right => HPos::Right,
    };
    let ink = colour(if label.muted { MUTED } else { INK });
    let size = label.size * sizes.0 * f64::from(FINE);
    let mut style = TextStyle::from((FONT_FAMILY, size).into_font())
        .color(&ink)
        .pos(Pos::new(h, VPos::Center));
    if label.upright {
        style = style.transform(FontTransform::Rotate270);
    }
    area.draw(&Text::new(label.text.clone(), at(label.x, label.y), style))
}

/// The chart as an SVG document, w×h pixels, with the typeface embedded
/// (a viewer draws it with the glyphs it was laid out with).
pub fn svg(fig: &Figure, w: u32, h: u32, scale: f64) -> String {
    let mut out = String::new();
    {
        let area = SVGBackend::with_string(&mut out, (FINE * w, FINE * h)).into_drawing_area();
        draw(&area, fig, scale, TypeSizes::SVG).expect("drawing into a string cannot fail");
        area.present().expect("an SVG string is always complete");
    }
    // The picture is w×h pixels; its drawing, in FINE units to the pixel.
    let size = format!(r#"width="{}" height="{}""#, FINE * w, FINE * h);
    assert!(
        out.starts_with(&format!("<svg {size} ")),
        "the SVG backend writes its size first"
    );
    out.replace_range(5..5 + size.len(), &format!(r#"width="{w}" height="{h}""#));
    let end = out
        .find('>')
        .expect("the SVG backend writes its root element first")
        + 1;
    let face = format!(
        "\n<defs><style>@font-face{{font-family:BurninSans;src:url(data:font/ttf;base64,{})}}</style></defs>",
        base64(FONT)
    );
    out.insert_str(end, &face);
    xml_chars(out)
}

/// Whether XML 1.0 allows `c` in a document (its production `Char`):
/// tab, line feed, carriage return, and everything from U+0020 but the
/// surrogates and U+FFFE, U+FFFF.
fn xml_allows(c: char) -> bool {
    matches!(c, '\t' | '\n' | '\r' | '\u{20}'..='\u{D7FF}' | '\u{E000}'..='\u{FFFD}' | '\u{10000}'..)
}

/// The SVG with every character XML forbids (a label's control
/// characters, U+FFFF) shown as U+FFFD: no entity can stand for them, and a
/// parser refuses the whole document over one (#35).
fn xml_chars(svg: String) -> String {
    if svg.chars().all(xml_allows) {
        return svg;
    }
    svg.chars()
        .map(|c| if xml_allows(c) { c } else { '\u{FFFD}' })
        .collect()
}

/// Standard base64 (RFC 4648, section 4) with padding.
pub fn base64(bytes: &[u8]) -> String {
    const ABC: &[u8; 64] = b"ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789+/";
    let mut out = String::with_capacity(bytes.len().div_ceil(3) * 4);
    for chunk in bytes.chunks(3) {
        let b = [
            chunk[0],
            *chunk.get(1).unwrap_or(&0),
            *chunk.get(2).unwrap_or(&0),
        ];
        let n = (u32::from(b[0]) << 16) | (u32::from(b[1]) << 8) | u32::from(b[2]);
        for k in 0..4 {
            if k <= chunk.len() {
                out.push(ABC[((n >> (18 - 6 * k)) & 63) as usize] as char);
            } else {
                out.push('=');
            }
        }
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    /// #34: the SVG keeps curves to half a pixel (whole pixels put kinks
    /// in slow slopes): it is drawn at twice the size in a `viewBox`, and
    /// each point of a curve lies within a quarter pixel of where the
    /// layout's mapping puts it.
    #[test]
    fn svg_curves_keep_half_pixel_precision() {
        use crate::chart::{Series, colours::series_colour};
        let x: Vec<f64> = (0..200).map(f64::from).collect();
        let y: Vec<f64> = x.iter().map(|v| 3.0 + 0.037 * v).collect();
        let fig = Figure {
            title: "slope".into(),
            x_label: "x".into(),
            x_name: "x".into(),
            y_label: "y".into(),
            log: false,
            bars: false,
            series: vec![Series {
                label: "a slow slope".into(),
                colour: series_colour(0),
                x: x.clone(),
                y: y.clone(),
                band: None,
                dash: None,
                width: 2.0,
                legend: true,
                curve: true,
            }],
            caption: String::new(),
        };
        let text = svg(&fig, 640, 400, 1.0);
        assert!(
            text.starts_with(r#"<svg width="640" height="400" viewBox="0 0 1280 800""#),
            "{}",
            &text[..80]
        );
        let layout = Layout::new(&fig, 640.0, 400.0, 1.0);
        let colour = series_colour(0).hex();
        let line = text
            .lines()
            .find(|l| {
                l.starts_with("<polyline")
                    && l.to_ascii_lowercase().contains(&colour)
                    && l.matches(',').count() > 100
            })
            .expect("the curve is a polyline");
        let points = line
            .split("points=\"")
            .nth(1)
            .unwrap()
            .split('"')
            .next()
            .unwrap();
        let pts: Vec<(f64, f64)> = points
            .split_whitespace()
            .map(|p| {
                let (a, b) = p.split_once(',').unwrap();
                (
                    a.parse::<f64>().unwrap() / 2.0,
                    b.parse::<f64>().unwrap() / 2.0,
                )
            })
            .collect();
        assert_eq!(pts.len(), x.len());
        let mut halves = 0;
        for (i, &(px, py)) in pts.iter().enumerate() {
            let (wx, wy) = (layout.frame.px(x[i]), layout.frame.py(y[i]));
            assert!(
                (px - wx).abs() <= 0.25 + 1e-9 && (py - wy).abs() <= 0.25 + 1e-9,
                "point {i}: {px},{py} for {wx},{wy}"
            );
            halves += usize::from(py.fract() != 0.0);
        }
        assert!(halves > 20, "half pixels are used ({halves})");
    }

    /// The test vectors of RFC 4648, section 10.
    #[test]
    fn base64_matches_the_rfc_vectors() {
        for (plain, coded) in [
            ("", ""),
            ("f", "Zg=="),
            ("fo", "Zm8="),
            ("foo", "Zm9v"),
            ("foob", "Zm9vYg=="),
            ("fooba", "Zm9vYmE="),
            ("foobar", "Zm9vYmFy"),
        ] {
            assert_eq!(base64(plain.as_bytes()), coded);
        }
    }
}
