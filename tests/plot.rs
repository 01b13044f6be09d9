//! Figures from the CLI (`burnin plot`, `run --figure`, `merge --figure`)
//! and fresh seeds (`run --new-seed`). The SVG is read back by a general
//! XML parser (roxmltree) and the PNG by a general PNG decoder (the png
//! crate): what they find is what a viewer would show.

mod common;

use common::{Scratch, burnin, p};

const FERRY: &str = "tests/browser/fixtures/ferry-experiment.json";
const OLD: &str = "tests/browser/fixtures/results-from-an-earlier-build.json";

/// The ferry fixture's results (five learners, 3 seeds), run once per test binary.
fn ferry_results(dir: &Scratch) -> std::path::PathBuf {
    let r = burnin(&["run", "--json", FERRY]);
    assert_eq!(r.code, 0, "{}", r.stderr);
    dir.file("ferry.results.json", &r.stdout)
}

fn labels(results: &std::path::Path) -> Vec<String> {
    let v: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(results).unwrap()).unwrap();
    v["learners"]
        .as_array()
        .unwrap()
        .iter()
        .map(|l| l["label"].as_str().unwrap().to_string())
        .collect()
}

/// The texts and the stroke colours of an SVG document.
fn svg_parts(text: &str) -> (Vec<String>, Vec<String>, (String, String)) {
    let doc = roxmltree::Document::parse(text).expect("well-formed XML");
    let root = doc.root_element();
    assert_eq!(root.tag_name().name(), "svg");
    let size = (
        root.attribute("width").unwrap().to_string(),
        root.attribute("height").unwrap().to_string(),
    );
    let texts = doc
        .descendants()
        .filter(|n| n.has_tag_name("text"))
        .map(|n| n.text().unwrap_or("").trim().to_string())
        .collect();
    let strokes = doc
        .descendants()
        .filter_map(|n| n.attribute("stroke"))
        .map(|s| s.to_ascii_lowercase())
        .collect();
    (texts, strokes, size)
}

#[test]
fn an_svg_figure_names_and_colours_every_learner() {
    let dir = Scratch::new("plot-svg");
    let results = ferry_results(&dir);
    let svg = dir.0.join("chart.svg");
    let r = burnin(&[
        "plot",
        p(&results),
        "--output",
        p(&svg),
        "--width",
        "1000",
        "--height",
        "600",
    ]);
    assert_eq!(r.code, 0, "{}", r.stderr);
    let text = std::fs::read_to_string(&svg).unwrap();
    let (texts, strokes, size) = svg_parts(&text);
    assert_eq!(size, ("1000".to_string(), "600".to_string()));
    for (i, label) in labels(&results).iter().enumerate() {
        assert!(texts.contains(label), "legend names {label}: {texts:?}");
        let colour = burnin::chart::colours::SERIES[i].hex();
        assert!(strokes.contains(&colour), "{label} drawn in {colour}");
    }
    assert!(
        texts
            .iter()
            .any(|t| t.starts_with("Cumulative regret — Night ferry")),
        "title"
    );
    assert!(
        texts.contains(&"episode k".to_string())
            && texts.contains(&"cumulative expected regret".to_string())
    );
    // The caption is in the picture, and the typeface travels with it.
    assert!(
        texts
            .iter()
            .any(|t| t.contains("Shaded: 95% Student-t intervals"))
    );
    assert!(text.contains("@font-face{font-family:BurninSans;src:url(data:font/ttf;base64,"));
    // Linear axes: round ticks up to K = 1500 ("1.5k").
    assert!(texts.contains(&"1.5k".to_string()), "{texts:?}");
}

#[test]
fn options_change_the_figure_as_the_page_controls_do() {
    let dir = Scratch::new("plot-options");
    let results = ferry_results(&dir);
    let draw = |name: &str, args: &[&str]| {
        let out = dir.0.join(name);
        let mut all = vec!["plot", p(&results), "-o", p(&out)];
        all.extend_from_slice(args);
        let r = burnin(&all);
        assert_eq!(r.code, 0, "{args:?}: {}", r.stderr);
        svg_parts(&std::fs::read_to_string(out).unwrap()).0
    };
    let log = draw("log.svg", &["--log", "--lower", "--bounds"]);
    for t in ["1", "10", "100", "1k"] {
        assert!(log.contains(&t.to_string()), "log ticks have {t}: {log:?}");
    }
    assert!(log.contains(&"lower-bound shape √(SAH³K)".to_string()));
    assert!(
        log.iter()
            .any(|t| t.contains("bound, does not apply (bonus scaled)")),
        "scaled bonuses say their bound does not apply"
    );
    // PSRL's bound is on the Bayesian regret (Osband, Russo & Van Roy 2013,
    // Theorem 1), and the legend says that is why it does not apply.
    assert!(
        log.iter()
            .any(|t| t.contains("psrl: bound, does not apply (Bayesian regret)")),
        "{log:?}"
    );
    let episode = draw("episode.svg", &["--view", "episode", "--no-caption"]);
    assert!(episode.contains(&"expected regret of episode k".to_string()));
    assert!(!episode.iter().any(|t| t.contains("Shaded")), "no caption");
    let names = labels(&results);
    let diff = draw(
        "diff.svg",
        &["--view", "difference", "--compare", &names[2], &names[0]],
    );
    assert!(
        diff.contains(&format!("{} − {}", names[2], names[0])),
        "{diff:?}"
    );
    assert!(diff.iter().any(|t| t.starts_with(&format!(
        "Paired difference in cumulative regret — {} minus {}",
        names[2], names[0]
    ))));
}

/// Counts pixels within 24 of `c` on every channel.
fn pixels_near(data: &[u8], c: burnin::chart::colours::Rgb) -> usize {
    data.chunks(3)
        .filter(|p| {
            (i32::from(p[0]) - i32::from(c.0)).abs() <= 24
                && (i32::from(p[1]) - i32::from(c.1)).abs() <= 24
                && (i32::from(p[2]) - i32::from(c.2)).abs() <= 24
        })
        .count()
}

#[test]
fn a_png_figure_is_drawn_without_system_fonts_and_shows_every_series() {
    let dir = Scratch::new("plot-png");
    let results = ferry_results(&dir);
    let png_path = dir.0.join("chart.png");
    let r = burnin(&[
        "plot",
        p(&results),
        "-o",
        p(&png_path),
        "--width",
        "800",
        "--height",
        "450",
    ]);
    assert_eq!(r.code, 0, "{}", r.stderr);
    let decoder = png::Decoder::new(std::io::BufReader::new(
        std::fs::File::open(&png_path).unwrap(),
    ));
    let mut reader = decoder.read_info().unwrap();
    let mut data = vec![0; reader.output_buffer_size()];
    let info = reader.next_frame(&mut data).unwrap();
    assert_eq!((info.width, info.height), (800, 450));
    assert_eq!(info.color_type, png::ColorType::Rgb);
    let data = &data[..info.buffer_size()];
    let total = data.len() / 3;
    let bg = pixels_near(data, burnin::chart::colours::BACKGROUND);
    assert!(bg > total / 2, "mostly background: {bg} of {total}");
    for (i, label) in labels(&results).iter().enumerate() {
        let n = pixels_near(data, burnin::chart::colours::SERIES[i]);
        assert!(n >= 100, "{label}: {n} pixels of its colour");
    }
    // Text is drawn (ink-coloured pixels: title, labels, legend).
    let ink = pixels_near(data, burnin::chart::colours::INK);
    assert!(ink > 500, "text drawn: {ink} ink pixels");
}

#[test]
fn results_from_an_earlier_build_still_plot() {
    // Written by the build of commit 3931c95 (before comparisons, labels,
    // regret maps and the build field).
    let dir = Scratch::new("plot-old");
    let svg = dir.0.join("old.svg");
    let r = burnin(&["plot", OLD, "-o", p(&svg), "--log"]);
    assert_eq!(r.code, 0, "{}", r.stderr);
    let (texts, _, _) = svg_parts(&std::fs::read_to_string(&svg).unwrap());
    assert!(
        texts
            .iter()
            .any(|t| t.starts_with("Cumulative regret — Night ferry"))
    );
    let r = burnin(&["plot", OLD, "-o", p(&svg), "--view", "difference"]);
    assert_eq!(r.code, 2);
    assert!(
        r.stderr
            .contains("these results have no difference view; they have: cumulative, episode"),
        "{}",
        r.stderr
    );
}

#[test]
fn run_and_merge_write_the_figure_plot_would() {
    let dir = Scratch::new("plot-run");
    let results = ferry_results(&dir);
    let plotted = dir.0.join("plotted.svg");
    assert_eq!(
        burnin(&["plot", p(&results), "-o", p(&plotted), "--log"]).code,
        0
    );
    let from_run = dir.0.join("run.svg");
    let r = burnin(&["run", FERRY, "--figure", p(&from_run), "--log"]);
    assert_eq!(r.code, 0, "{}", r.stderr);
    assert_eq!(
        std::fs::read(&from_run).unwrap(),
        std::fs::read(&plotted).unwrap(),
        "run --figure = plot"
    );
    let mut shards = Vec::new();
    for i in 1..=2 {
        let r = burnin(&["run", FERRY, "--shard", &format!("{i}/2")]);
        assert_eq!(r.code, 0, "{}", r.stderr);
        shards.push(dir.file(&format!("s{i}.json"), &r.stdout));
    }
    let from_merge = dir.0.join("merge.svg");
    let r = burnin(&[
        "merge",
        p(&shards[0]),
        p(&shards[1]),
        "--figure",
        p(&from_merge),
        "--log",
    ]);
    assert_eq!(r.code, 0, "{}", r.stderr);
    assert_eq!(
        std::fs::read(&from_merge).unwrap(),
        std::fs::read(&plotted).unwrap(),
        "merge --figure = plot"
    );
}

#[test]
fn bad_figure_requests_are_refused_with_what_and_where() {
    let dir = Scratch::new("plot-bad");
    let results = ferry_results(&dir);
    let out = dir.0.join("x.svg");
    let cases: &[(&[&str], &str)] = &[
        (
            &["--view", "sideways"],
            "--view sideways: expected one of cumulative, episode, difference, sweep, sweep-slope, sweep-burn-in",
        ),
        (
            &["--view", "sweep"],
            "these results have no sweep view; they have: cumulative, episode, difference",
        ),
        (
            &["--view", "difference", "--compare", "nobody", "psrl"],
            "no learner is labelled \"nobody\"; the labels are:",
        ),
        (
            &["--compare", "psrl", "uniform"],
            "--compare chooses the learners of --view difference",
        ),
        (&["--width", "5"], "--width 5: expected 16 to 8192 pixels"),
        (
            &["--type-scale", "0"],
            "--type-scale 0: expected a number above 0.1",
        ),
    ];
    for (args, want) in cases {
        let mut all = vec!["plot", p(&results), "-o", p(&out)];
        all.extend_from_slice(args);
        let r = burnin(&all);
        assert_eq!(r.code, 2, "{args:?}");
        assert!(r.stderr.contains(want), "{args:?}: {}", r.stderr);
        assert!(!out.exists(), "{args:?}: nothing written");
    }
    let r = burnin(&["plot", p(&results), "-o", p(&dir.0.join("x.jpg"))]);
    assert!(
        r.stderr
            .contains("x.jpg: a figure is written as .svg or .png"),
        "{}",
        r.stderr
    );
    // The figure may not overwrite its results.
    let before = std::fs::read(&results).unwrap();
    let same = dir.0.join("same.svg");
    std::fs::copy(&results, &same).unwrap();
    let r = burnin(&["plot", p(&same), "-o", p(&same)]);
    assert!(
        r.stderr.contains("that is the results file"),
        "{}",
        r.stderr
    );
    assert_eq!(std::fs::read(&results).unwrap(), before);
    // Not a results file: the reader's message, with the file's name.
    let r = burnin(&["plot", FERRY, "-o", p(&out)]);
    assert_eq!(r.code, 1);
    assert!(
        r.stderr.contains(
            "ferry-experiment.json: format: expected \"burnin-results\" or \"burnin-sweep\""
        ),
        "{}",
        r.stderr
    );
    // A run refuses a bad figure before it runs (so no run is lost to it).
    let r = burnin(&["run", FERRY, "--figure", p(&dir.0.join("f.gif"))]);
    assert_eq!(r.code, 2);
    assert!(
        r.stderr.contains("--figure:")
            && r.stderr
                .contains("f.gif: a figure is written as .svg or .png"),
        "{}",
        r.stderr
    );
    assert!(r.stdout.is_empty(), "nothing ran");
}

#[test]
fn a_new_seed_is_fresh_and_written_into_the_results_so_it_can_be_run_again() {
    let dir = Scratch::new("new-seed");
    let seed_of = |stdout: &str| -> u64 {
        let v: serde_json::Value = serde_json::from_str(stdout).unwrap();
        v["seed"].as_u64().unwrap()
    };
    let a = burnin(&["run", "--json", FERRY, "--new-seed"]);
    let b = burnin(&["run", "--json", FERRY, "--new-seed"]);
    assert_eq!((a.code, b.code), (0, 0), "{}", a.stderr);
    let (sa, sb) = (seed_of(&a.stdout), seed_of(&b.stdout));
    // Two draws from 10⁹ seeds coincide with probability 10⁻⁹.
    assert_ne!(sa, sb);
    assert!((1..=burnin::experiment::FRESH_SEED_MAX).contains(&sa));
    assert!(
        a.stderr
            .contains(&format!("new seed {sa}: the results carry it")),
        "{}",
        a.stderr
    );
    // The file's own seed is 11; the results say which seed ran.
    let file: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(FERRY).unwrap()).unwrap();
    assert_ne!(file["seed"].as_u64(), Some(sa));
    // Putting the seed the results carry into the experiment (which holds
    // its model) gives the same numbers.
    let mut again = file.clone();
    again["seed"] = sa.into();
    let path = dir.file("again.json", &again.to_string());
    let c = burnin(&["run", "--json", p(&path)]);
    assert_eq!(c.code, 0, "{}", c.stderr);
    let curves = |s: &str| {
        let v: serde_json::Value = serde_json::from_str(s).unwrap();
        v["learners"]
            .as_array()
            .unwrap()
            .iter()
            .map(|l| l["regret_mean"].clone())
            .collect::<Vec<_>>()
    };
    assert_eq!(
        curves(&c.stdout),
        curves(&a.stdout),
        "the same seed, the same regret"
    );
    // Shards of one experiment must share one seed.
    let r = burnin(&["run", FERRY, "--new-seed", "--shard", "1/2"]);
    assert_eq!(r.code, 2);
    assert!(
        r.stderr.contains("--new-seed") && r.stderr.contains("--shard"),
        "{}",
        r.stderr
    );
}

#[test]
fn a_sweep_plots_regret_at_k_against_the_swept_value() {
    let dir = Scratch::new("plot-sweep");
    let mut exp: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(FERRY).unwrap()).unwrap();
    exp["episodes"] = 300.into();
    exp["sweep"] = serde_json::json!({"parameter": "delta", "values": [0.01, 0.1, 0.5]});
    let file = dir.file("sweep.json", &exp.to_string());
    let svg = dir.0.join("sweep.svg");
    let r = burnin(&["run", p(&file), "--figure", p(&svg), "--log"]);
    assert_eq!(r.code, 0, "{}", r.stderr);
    let (texts, strokes, _) = svg_parts(&std::fs::read_to_string(&svg).unwrap());
    assert!(
        texts.contains(&"Regret at K = 300 against delta".to_string()),
        "{texts:?}"
    );
    assert!(texts.contains(&"delta".to_string()) && texts.contains(&"regret at K".to_string()));
    let learners = exp["learners"].as_array().unwrap().len();
    for i in 0..learners {
        assert!(
            strokes.contains(&burnin::chart::colours::SERIES[i].hex()),
            "learner {i} drawn"
        );
    }
    // Every reading per point (#33): slope and burn-in against the swept
    // value, each learner's points and bars from the results file.
    let results = dir.0.join("sweep-results.json");
    let r = burnin(&["run", p(&file), "--json"]);
    assert_eq!(r.code, 0, "{}", r.stderr);
    std::fs::write(&results, &r.stdout).unwrap();
    for (view, title) in [
        ("sweep-slope", "Slope of regret against delta"),
        ("sweep-burn-in", "Burn-in against delta"),
    ] {
        let out = dir.0.join(format!("{view}.svg"));
        let r = burnin(&["plot", p(&results), "-o", p(&out), "--view", view]);
        assert_eq!(r.code, 0, "{view}: {}", r.stderr);
        let (texts, _, _) = svg_parts(&std::fs::read_to_string(&out).unwrap());
        assert!(texts.contains(&title.to_string()), "{view}: {texts:?}");
    }
    let v: serde_json::Value = serde_json::from_str(&r.stdout).unwrap();
    let out = burnin::experiment::parse_results(&r.stdout).unwrap();
    let opts = burnin::chart::Options {
        view: Some(burnin::chart::View::SweepSlope),
        ..Default::default()
    };
    let fig = burnin::chart::figure(&out, &opts).unwrap();
    for (li, series) in fig.series.iter().enumerate() {
        let slopes: Vec<f64> = v["points"]
            .as_array()
            .unwrap()
            .iter()
            .filter_map(|p| p["learners"][li]["slope"].as_f64())
            .collect();
        assert_eq!(
            series.y, slopes,
            "learner {li}: one point per value with a slope"
        );
    }
    // A sweep has only its own views: refused before anything runs.
    let r = burnin(&["run", p(&file), "--figure", p(&svg), "--view", "episode"]);
    assert_eq!(r.code, 2);
    assert!(
        r.stderr.contains(
            "--figure: this experiment's results will have no episode view; they will have: sweep, sweep-slope, sweep-burn-in"
        ),
        "{}",
        r.stderr
    );
    assert!(r.stdout.is_empty(), "nothing ran: {}", r.stdout);
    let r = burnin(&[
        "run",
        FERRY,
        "--figure",
        p(&svg),
        "--view",
        "difference",
        "--compare",
        "psrl",
        "nobody",
    ]);
    assert!(
        r.stderr
            .contains("--figure: no learner is labelled \"nobody\""),
        "{}",
        r.stderr
    );
    assert!(r.stdout.is_empty());
}

#[test]
fn a_figure_that_fails_after_a_run_loses_no_results() {
    // Merging shards of a sweep with an impossible view: the shards carry
    // no plan to check first, so the merge prints the results, then says
    // why the figure was not written.
    let dir = Scratch::new("plot-late");
    let mut exp: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(FERRY).unwrap()).unwrap();
    exp["episodes"] = 100.into();
    exp["sweep"] = serde_json::json!({"parameter": "delta", "values": [0.01, 0.1]});
    let file = dir.file("sweep.json", &exp.to_string());
    let r = burnin(&["run", p(&file), "--shard", "1/1"]);
    assert_eq!(r.code, 0, "{}", r.stderr);
    let shard = dir.file("s1.json", &r.stdout);
    let svg = dir.0.join("late.svg");
    let r = burnin(&[
        "merge",
        p(&shard),
        "--figure",
        p(&svg),
        "--view",
        "cumulative",
    ]);
    assert_eq!(r.code, 2);
    assert!(
        r.stdout.contains("regret at K against delta"),
        "the results were printed: {}",
        r.stdout
    );
    assert!(
        r.stderr
            .contains("--figure: these results have no cumulative view; they have: sweep"),
        "{}",
        r.stderr
    );
    assert!(!svg.exists());
}

/// Sets every number of `key` in `v` (at any depth) to `x`.
fn set_all(v: &mut serde_json::Value, key: &str, x: f64) {
    match v {
        serde_json::Value::Object(m) => {
            for (k, child) in m.iter_mut() {
                if k == key {
                    match child {
                        serde_json::Value::Array(a) => {
                            for e in a.iter_mut().filter(|e| e.is_number()) {
                                *e = x.into();
                            }
                        }
                        serde_json::Value::Number(_) => *child = x.into(),
                        _ => set_all(child, key, x),
                    }
                } else {
                    set_all(child, key, x);
                }
            }
        }
        serde_json::Value::Array(a) => a.iter_mut().for_each(|c| set_all(c, key, x)),
        _ => {}
    }
}

/// #35 §4: `plot --log` of results whose curves sit at 9·10³⁰⁷ (or whose
/// `regret_hi` is 1.797·10³⁰⁸), and such sweep files, aborted trying to
/// allocate 4 GB (a log axis of 2³¹ powers of ten). The axes are bounded:
/// every view draws, as well-formed SVG, in linear and log axes.
#[test]
fn curves_near_the_largest_double_draw_on_bounded_axes() {
    let dir = Scratch::new("plot-huge");
    let results = ferry_results(&dir);
    let base: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(&results).unwrap()).unwrap();
    let mut exp: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(FERRY).unwrap()).unwrap();
    exp["episodes"] = 100.into();
    exp["sweep"] = serde_json::json!({"parameter": "delta", "values": [0.01, 0.1, 0.5]});
    let r = burnin(&[
        "run",
        "--json",
        p(&dir.file("sweep.json", &exp.to_string())),
    ]);
    assert_eq!(r.code, 0, "{}", r.stderr);
    let sweep: serde_json::Value = serde_json::from_str(&r.stdout).unwrap();
    let mut cases = Vec::new();
    for (name, v) in [("results", &base), ("sweep", &sweep)] {
        let mut all = v.clone();
        for k in ["regret_mean", "regret_lo", "regret_hi"] {
            set_all(&mut all, k, 9e307);
        }
        cases.push((format!("{name}-at-9e307"), all));
        let mut hi = v.clone();
        set_all(&mut hi, "regret_hi", 1.797e308);
        cases.push((format!("{name}-hi-at-max"), hi));
        let mut wide = v.clone();
        set_all(&mut wide, "regret_lo", -1.797e308);
        set_all(&mut wide, "regret_hi", 1.797e308);
        cases.push((format!("{name}-from-min-to-max"), wide));
    }
    for (name, v) in cases {
        let file = dir.file(&format!("{name}.json"), &v.to_string());
        for log in [false, true] {
            let svg = dir.0.join(format!("{name}-{log}.svg"));
            let mut args = vec!["plot", p(&file), "-o", p(&svg)];
            if log {
                args.push("--log");
            }
            let r = burnin(&args);
            assert_eq!(r.code, 0, "{name} log={log}: {}", r.stderr);
            let text = std::fs::read_to_string(&svg).unwrap();
            assert!(!text.contains("NaN") && !text.contains("inf"), "{name}");
            let (texts, _, _) = svg_parts(&text);
            assert!(texts.len() < 200, "{name} log={log}: {} texts", texts.len());
        }
    }
}

/// #35 §4: labels with control characters or U+FFFF made `run --figure`
/// and `plot` write SVG that an XML parser rejects. What XML forbids is
/// shown as U+FFFD; what it allows (markup characters included) is kept.
#[test]
fn labels_xml_forbids_still_give_well_formed_svg() {
    let dir = Scratch::new("plot-xml-chars");
    let mut exp: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(FERRY).unwrap()).unwrap();
    exp["episodes"] = 50.into();
    exp["learners"] = serde_json::json!([
        {"algorithm": "uniform", "label": "bell\u{7} esc\u{1b}[31m <&> \"q\""},
        {"algorithm": "mvp", "label": "not a char \u{ffff} nor \u{fffe}"}
    ]);
    let file = dir.file("xml.json", &exp.to_string());
    let from_run = dir.0.join("run.svg");
    let r = burnin(&["run", "--json", p(&file), "--figure", p(&from_run)]);
    assert_eq!(r.code, 0, "{}", r.stderr);
    let results = dir.file("results.json", &r.stdout);
    let from_plot = dir.0.join("plot.svg");
    let r = burnin(&["plot", p(&results), "-o", p(&from_plot)]);
    assert_eq!(r.code, 0, "{}", r.stderr);
    for svg in [&from_run, &from_plot] {
        let (texts, _, _) = svg_parts(&std::fs::read_to_string(svg).unwrap());
        assert!(
            texts.contains(&"bell\u{fffd} esc\u{fffd}[31m <&> \"q\"".to_string()),
            "{texts:?}"
        );
        assert!(
            texts.contains(&"not a char \u{fffd} nor \u{fffd}".to_string()),
            "{texts:?}"
        );
    }
}

/// #35 §4: sweep results never checked label, name or parameter lengths
/// (a 30 000-character label took 19.5 s to fit into the legend). A sweep
/// file is held to the format's limits, as one point's results are.
#[test]
fn a_sweep_file_is_held_to_the_formats_limits() {
    let dir = Scratch::new("plot-sweep-limits");
    let mut exp: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(FERRY).unwrap()).unwrap();
    exp["episodes"] = 50.into();
    exp["sweep"] = serde_json::json!({"parameter": "delta", "values": [0.1, 0.5]});
    let r = burnin(&[
        "run",
        "--json",
        p(&dir.file("sweep.json", &exp.to_string())),
    ]);
    assert_eq!(r.code, 0, "{}", r.stderr);
    let mut v: serde_json::Value = serde_json::from_str(&r.stdout).unwrap();
    let long = "x".repeat(30_000);
    v["name"] = long.clone().into();
    v["parameter"] = long.clone().into();
    v["learners"][1]["label"] = long.into();
    let file = dir.file("long.json", &v.to_string());
    let r = burnin(&["plot", p(&file), "-o", p(&dir.0.join("x.svg"))]);
    assert_eq!(r.code, 1, "{}", r.stderr);
    for want in [
        "name: longer than 200 characters",
        "parameter: longer than 200 characters",
        "learners[1].label: longer than 200 characters",
    ] {
        assert!(
            r.stderr.contains(&format!("{}: {want}", file.display())),
            "{want}: {}",
            r.stderr
        );
    }
}
