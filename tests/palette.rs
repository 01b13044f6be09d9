//! The series palette (`burnin::chart::colours::SERIES`, used by the charts,
//! the graph and every export) is our own, legible on the page's card colour and
//! distinguishable for colour-blind readers.
//!
//! Checks:
//! - contrast of every colour against the card (#fffdf8) at least 3:1, the
//!   WCAG 2.1 success criterion 1.4.11 for graphical objects, with WCAG's
//!   relative-luminance formula;
//! - every pair at least ΔE*ab = 20 apart (CIE 1976 L*a*b*, D65) for normal
//!   vision and for simulated protanopia, deuteranopia and tritanopia
//!   (the severity-1.0 matrices of Machado, Oliveira & Fernandes, "A
//!   Physiologically-based Model for Simulation of Color Vision Deficiency",
//!   IEEE TVCG 15(6), 2009; the matrix entries are from memory). The
//!   threshold 20 is ours: about ten times the just-noticeable difference;
//! - no colour within ΔE*ab = 8 of a stock colour of widely used plotting
//!   defaults (matplotlib's and d3's category-10, ColorBrewer Set1 and
//!   Dark2, the Okabe–Ito set, Tableau 10, Plotly's default and Dark24,
//!   seaborn's deep, muted, bright, dark and colorblind, Paul Tol's bright,
//!   vibrant and muted, MATLAB's default lines, Observable 10; hex values
//!   from memory).

const CARD: [u8; 3] = [0xff, 0xfd, 0xf8];

#[test]
fn the_card_is_the_charts_background() {
    let b = burnin::chart::colours::BACKGROUND;
    assert_eq!([b.0, b.1, b.2], CARD);
}

fn palette() -> Vec<[u8; 3]> {
    burnin::chart::colours::SERIES
        .iter()
        .map(|c| [c.0, c.1, c.2])
        .collect()
}

fn hex(h: &str) -> [u8; 3] {
    let h = h.trim_start_matches('#');
    let b = |i: usize| u8::from_str_radix(&h[i..i + 2], 16).unwrap();
    [b(0), b(2), b(4)]
}

fn to_linear(c: f64) -> f64 {
    let c = c / 255.0;
    if c <= 0.04045 {
        c / 12.92
    } else {
        ((c + 0.055) / 1.055).powf(2.4)
    }
}

fn to_srgb(c: f64) -> f64 {
    let c = c.clamp(0.0, 1.0);
    255.0
        * if c <= 0.003_130_8 {
            12.92 * c
        } else {
            1.055 * c.powf(1.0 / 2.4) - 0.055
        }
}

/// WCAG 2.1 relative luminance.
fn luminance(c: [u8; 3]) -> f64 {
    let [r, g, b] = c.map(|x| to_linear(x as f64));
    0.2126 * r + 0.7152 * g + 0.0722 * b
}

fn contrast(a: [u8; 3], b: [u8; 3]) -> f64 {
    let (la, lb) = (luminance(a), luminance(b));
    (la.max(lb) + 0.05) / (la.min(lb) + 0.05)
}

type Matrix = [[f64; 3]; 3];

const PROTANOPIA: Matrix = [
    [0.152286, 1.052583, -0.204868],
    [0.114503, 0.786281, 0.099216],
    [-0.003882, -0.048116, 1.051998],
];
const DEUTERANOPIA: Matrix = [
    [0.367322, 0.860646, -0.227968],
    [0.280085, 0.672501, 0.047413],
    [-0.011820, 0.042940, 0.968881],
];
const TRITANOPIA: Matrix = [
    [1.255528, -0.076749, -0.178779],
    [-0.078411, 0.930809, 0.147602],
    [0.004733, 0.691367, 0.303900],
];

/// The colour as seen with the deficiency `m` (None: normal vision), in sRGB.
fn simulate(c: [u8; 3], m: Option<&Matrix>) -> [f64; 3] {
    let lin = c.map(|x| to_linear(x as f64));
    match m {
        None => c.map(|x| x as f64),
        Some(m) => [0, 1, 2].map(|i| to_srgb((0..3).map(|j| m[i][j] * lin[j]).sum())),
    }
}

/// CIE L*a*b* (D65) of an sRGB colour.
fn lab(c: [f64; 3]) -> [f64; 3] {
    let [r, g, b] = c.map(to_linear);
    let x = (0.4124 * r + 0.3576 * g + 0.1805 * b) / 0.95047;
    let y = 0.2126 * r + 0.7152 * g + 0.0722 * b;
    let z = (0.0193 * r + 0.1192 * g + 0.9505 * b) / 1.08883;
    let f = |t: f64| {
        if t > 0.008856 {
            t.cbrt()
        } else {
            7.787 * t + 16.0 / 116.0
        }
    };
    [
        116.0 * f(y) - 16.0,
        500.0 * (f(x) - f(y)),
        200.0 * (f(y) - f(z)),
    ]
}

fn delta_e(a: [f64; 3], b: [f64; 3]) -> f64 {
    let (a, b) = (lab(a), lab(b));
    ((a[0] - b[0]).powi(2) + (a[1] - b[1]).powi(2) + (a[2] - b[2]).powi(2)).sqrt()
}

#[test]
fn every_colour_stands_out_from_the_card() {
    let p = palette();
    assert!(p.len() >= 8, "{p:?}");
    for c in p {
        assert!(contrast(c, CARD) >= 3.0, "{c:?}: {:.2}", contrast(c, CARD));
    }
}

#[test]
fn every_pair_stays_apart_for_colour_blind_readers() {
    let p = palette();
    for m in [
        None,
        Some(&PROTANOPIA),
        Some(&DEUTERANOPIA),
        Some(&TRITANOPIA),
    ] {
        for (i, &a) in p.iter().enumerate() {
            for &b in &p[i + 1..] {
                let d = delta_e(simulate(a, m), simulate(b, m));
                assert!(d >= 20.0, "{a:?} and {b:?} under {m:?}: ΔE {d:.1}");
            }
        }
    }
}

#[test]
fn no_colour_is_a_stock_plotting_colour() {
    let stock = [
        // matplotlib / d3 category-10
        "#1f77b4", "#ff7f0e", "#2ca02c", "#d62728", "#9467bd", "#8c564b", "#e377c2", "#7f7f7f",
        "#bcbd22", "#17becf", // ColorBrewer Set1
        "#e41a1c", "#377eb8", "#4daf4a", "#984ea3", "#ff7f00", "#ffff33", "#a65628", "#f781bf",
        "#999999", // Okabe–Ito
        "#e69f00", "#56b4e9", "#009e73", "#f0e442", "#0072b2", "#d55e00", "#cc79a7",
        // ColorBrewer YlGnBu's blue, used by many defaults
        "#2c7fb8", // ColorBrewer Dark2
        "#1b9e77", "#d95f02", "#7570b3", "#e7298a", "#66a61e", "#e6ab02", "#a6761d", "#666666",
        // Tableau 10
        "#4e79a7", "#f28e2b", "#e15759", "#76b7b2", "#59a14f", "#edc948", "#b07aa1", "#ff9da7",
        "#9c755f", "#bab0ac", // Plotly's default
        "#636efa", "#ef553b", "#00cc96", "#ab63fa", "#ffa15a", "#19d3f3", "#ff6692", "#b6e880",
        "#ff97ff", "#fecb52", // Plotly Dark24
        "#2e91e5", "#e15f99", "#1ca71c", "#fb0d0d", "#da16ff", "#222a2a", "#b68100", "#750d86",
        "#eb663b", "#511cb9", "#00a08b", "#fb00d1", "#fc0080", "#b2828d", "#6c7c32", "#778aae",
        "#862a16", "#a777f1", "#620042", "#1616a7", "#da60ca", "#6c4516", "#0d2a63", "#af0038",
        // seaborn deep
        "#4c72b0", "#dd8452", "#55a868", "#c44e52", "#8172b3", "#937860", "#da8bc3", "#8c8c8c",
        "#ccb974", "#64b5cd", // seaborn muted
        "#4878d0", "#ee854a", "#6acc64", "#d65f5f", "#956cb4", "#8c613c", "#dc7ec0", "#797979",
        "#d5bb67", "#82c6e2", // seaborn bright
        "#023eff", "#ff7c00", "#1ac938", "#e8000b", "#8b2be2", "#9f4800", "#f14cc1", "#a3a3a3",
        "#ffc400", "#00d7ff", // seaborn dark
        "#001c7f", "#b1400d", "#12711c", "#8c0800", "#591e71", "#592f0d", "#a23582", "#3c3c3c",
        "#b8850a", "#006374", // seaborn colorblind
        "#0173b2", "#de8f05", "#029e73", "#d55e00", "#cc78bc", "#ca9161", "#fbafe4", "#949494",
        "#ece133", "#56b4e9", // Paul Tol bright
        "#4477aa", "#ee6677", "#228833", "#ccbb44", "#66ccee", "#aa3377", "#bbbbbb",
        // Paul Tol vibrant
        "#ee7733", "#0077bb", "#33bbee", "#ee3377", "#cc3311", "#009988", // Paul Tol muted
        "#332288", "#88ccee", "#44aa99", "#117733", "#999933", "#ddcc77", "#cc6677", "#882255",
        "#aa4499", // MATLAB's default lines
        "#0072bd", "#d95319", "#edb120", "#7e2f8e", "#77ac30", "#4dbeee", "#a2142f",
        // Observable 10
        "#4269d0", "#efb118", "#ff725c", "#6cc5b0", "#3ca951", "#ff8ab7", "#a463f2", "#97bbf5",
        "#9c6b4e", "#9498a0",
    ];
    for c in palette() {
        for s in stock {
            let d = delta_e(simulate(c, None), simulate(hex(s), None));
            assert!(d >= 8.0, "{c:?} is {d:.1} from the stock colour {s}");
        }
    }
}
