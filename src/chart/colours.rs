//! The project's colours: eight series colours and the chart's neutrals.
//!
//! The series colours are our own: each stands out from the chart's
//! background by at least 3:1 (WCAG 2.1, non-text contrast), every pair
//! stays apart for readers with protanopia, deuteranopia and tritanopia
//! (simulated with the matrices of Machado, Oliveira & Fernandes 2009), and
//! none is within ΔE 8 of a stock colour of common plotting palettes;
//! tests/palette.rs checks all three and lists those palettes. The page's transition graph colours actions with them
//! (through the catalogue).

/// An sRGB colour.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Rgb(pub u8, pub u8, pub u8);

impl Rgb {
    /// `#rrggbb`.
    pub fn hex(self) -> String {
        format!("#{:02x}{:02x}{:02x}", self.0, self.1, self.2)
    }
}

/// Series colours, in the order learners get them.
pub const SERIES: [Rgb; 8] = [
    Rgb(0x0d, 0x6b, 0x66), // deep teal
    Rgb(0xcb, 0x80, 0x19), // ochre
    Rgb(0x89, 0x61, 0xdc), // violet
    Rgb(0x57, 0x3e, 0x0c), // umber
    Rgb(0x53, 0x24, 0x9a), // indigo
    Rgb(0x80, 0x98, 0x6e), // sage
    Rgb(0xf8, 0x31, 0xae), // orchid
    Rgb(0x5e, 0x00, 0x28), // claret
];

/// The colour of series `i` (the palette repeats past eight).
pub fn series_colour(i: usize) -> Rgb {
    SERIES[i % SERIES.len()]
}

/// Background of a chart (the page's card colour).
pub const BACKGROUND: Rgb = Rgb(0xff, 0xfd, 0xf8);
/// Titles and labels.
pub const INK: Rgb = Rgb(0x1e, 0x28, 0x2d);
/// Tick labels, captions and reference lines (lower bound, zero).
pub const MUTED: Rgb = Rgb(0x5d, 0x67, 0x6b);
/// Grid lines: a hairline on one row of pixels (#34), lighter than it was
/// when half-pixel placement spread it over two, and clear of every
/// series' band tint (the umber's at 16% is #e4ded2).
pub const GRID: Rgb = Rgb(0xeb, 0xe5, 0xd7);
/// The plot's frame.
pub const FRAME: Rgb = Rgb(0xb9, 0xb0, 0x9c);
