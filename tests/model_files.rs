//! Reading model files: every problem reported with its JSON path, and files
//! written back without loss.

use burnin::{parse_model, write_model};
use serde_json::{Value, json};

/// A small valid model (the example of docs/formats.md).
fn base() -> Value {
    json!({
        "format": "burnin-model",
        "version": 1,
        "name": "Tide-pool forager",
        "notes": "optional free text",
        "horizon": 6,
        "discount": 1.0,
        "states": ["low pool", "mid pool", "high pool"],
        "actions": ["stay", "climb"],
        "start": [1.0, 0.0, 0.0],
        "stationary": true,
        "steps": [{
            "transitions": [
                [ [[0, 0.9], [1, 0.1]], [[1, 1.0]] ],
                [ [[0, 0.2], [1, 0.8]], [[2, 0.7], [1, 0.3]] ],
                [ [[2, 1.0]],           [[2, 1.0]] ]
            ],
            "rewards": [
                [ 0.1, {"bernoulli": 0.3} ],
                [ 0.2, {"uniform": [0.0, 0.6]} ],
                [ {"beta": [2.0, 1.0]}, 0.9 ]
            ]
        }],
        "layout": { "positions": [[0, 0], [1, 0], [2, 0]] }
    })
}

/// The problem lines for `base()` changed by `edit`.
fn problems_after(edit: impl FnOnce(&mut Value)) -> Vec<String> {
    let mut v = base();
    edit(&mut v);
    problems_of(&v.to_string())
}

fn problems_of(text: &str) -> Vec<String> {
    match parse_model(text) {
        Ok(_) => vec![],
        Err(p) => p.lines(),
    }
}

fn check(edit: impl FnOnce(&mut Value), expected: &[&str]) {
    assert_eq!(problems_after(edit), expected);
}

#[test]
fn the_example_model_is_valid() {
    let m = parse_model(&base().to_string()).unwrap();
    assert_eq!((m.n_states(), m.n_actions(), m.horizon()), (3, 2, 6));
    assert_eq!(m.entries(), 9);
    // Mean rewards: Beta(2,1) has mean 2/3; Uniform[0, 0.6] mean 0.3.
    let means = m.step(0).mean_rewards();
    assert_eq!(means[3], 0.3);
    assert_eq!(means[4], 2.0 / 3.0);
}

#[test]
fn a_sum_off_by_more_than_the_tolerance_names_the_row_and_the_sum() {
    check(
        |v| v["steps"][0]["transitions"][1][0][1][1] = json!(0.77),
        &["steps[0].transitions[1][0]: probabilities sum to 0.9700, expected 1"],
    );
}

/// "Within 10⁻⁶" is inclusive (docs/formats.md): three entries of 0.333333,
/// what a person types for thirds, sum to 1 − 10⁻⁶ and are renormalised to
/// exact thirds; one more digit off is refused.
#[test]
fn thirds_typed_to_six_decimals_are_accepted_and_renormalised() {
    let mut v = base();
    v["steps"][0]["transitions"][1][1] = json!([[0, 0.333333], [1, 0.333333], [2, 0.333333]]);
    let m = parse_model(&v.to_string()).unwrap();
    let (_, p) = m.step(0).row(3);
    assert!(p.iter().all(|x| (x - 1.0 / 3.0).abs() < 1e-15), "{p:?}");
    check(
        |v| {
            v["steps"][0]["transitions"][1][1] = json!([[0, 0.333333], [1, 0.333333], [2, 0.33333]])
        },
        &["steps[0].transitions[1][1]: probabilities sum to 0.999996, expected 1"],
    );
}

#[test]
fn a_sum_within_the_tolerance_is_renormalised() {
    let mut v = base();
    v["steps"][0]["transitions"][0][0] = json!([[0, 0.9], [1, 0.1000005]]);
    let m = parse_model(&v.to_string()).unwrap();
    let (_, p) = m.step(0).row(0);
    assert!((p[0] + p[1] - 1.0).abs() < 1e-15);
    assert!((p[0] - 0.9 / 1.0000005).abs() < 1e-15);
}

#[test]
fn every_problem_is_reported_not_just_the_first() {
    check(
        |v| {
            v["states"][2] = json!("low pool");
            v["start"] = json!([0.5, 0.2, 0.2]);
            v["discount"] = json!(1.5);
        },
        &[
            "states[2]: duplicate state label \"low pool\"",
            "discount: expected 0 < discount ≤ 1, found 1.5",
            "start: probabilities sum to 0.9000, expected 1",
        ],
    );
    check(
        |v| {
            v["start"] = json!([0.5, 0.2, 0.2]);
            v["discount"] = json!(1.5);
            v["steps"][0]["transitions"][0][1] = json!([[3, 1.0]]);
            v["steps"][0]["rewards"][2][1] = json!({"bernoulli": 1.5});
        },
        &[
            "discount: expected 0 < discount ≤ 1, found 1.5",
            "start: probabilities sum to 0.9000, expected 1",
            "steps[0].transitions[0][1][0][0]: state index 3 is out of range (S = 3, indices 0..2)",
            "steps[0].rewards[2][1].bernoulli: expected a probability in [0, 1], found 1.5",
        ],
    );
}

#[test]
fn wrong_types_are_all_reported_with_their_paths() {
    check(
        |v| {
            v["horizon"] = json!("six");
            v["states"][1] = json!(7);
            v["steps"][0]["transitions"][2][0][0][1] = json!("1.0");
            v["steps"][0]["rewards"][0][0] = json!([0.1]);
        },
        &[
            "horizon: expected a whole number ≥ 1, found a string",
            "states[1]: expected a string, found a number",
        ],
    );
    check(
        |v| {
            v["steps"][0]["transitions"][2][0][0][1] = json!("1.0");
            v["steps"][0]["transitions"][1][1] = json!([[2, 0.7, 0.1]]);
            v["steps"][0]["rewards"][0][0] = json!([0.1]);
            v["steps"][0]["rewards"][1][1] = json!({"gauss": [0, 1]});
        },
        &[
            "steps[0].transitions[1][1][0]: expected a [next_state, probability] pair, found 3 elements",
            "steps[0].transitions[2][0][0][1]: expected a probability, found a string",
            "steps[0].rewards[0][0]: expected a number or an object {\"bernoulli\": p}, {\"uniform\": [lo, hi]} or {\"beta\": [α, β]}, found an array",
            "steps[0].rewards[1][1].gauss: unknown reward distribution; known ones are bernoulli, uniform, beta",
        ],
    );
}

#[test]
fn header_problems_stop_the_read() {
    check(
        |v| v["version"] = json!(2),
        &["version: version 2 is not supported; this build reads version 1"],
    );
    check(
        |v| v["format"] = json!("burnin-experiment"),
        &[
            "format: expected \"burnin-model\", found \"burnin-experiment\" (this is an experiment file)",
        ],
    );
    check(
        |v| {
            v.as_object_mut().unwrap().remove("format");
        },
        &["format: missing; expected the string \"burnin-model\""],
    );
    assert_eq!(
        problems_of("[1, 2]"),
        ["expected a JSON object (a burnin-model file), found an array"]
    );
}

#[test]
fn syntax_errors_give_line_and_column() {
    assert_eq!(
        problems_of("{\n  \"format\": \"burnin-model\",\n  \"version\": 1,,\n}"),
        ["not valid JSON: line 3, column 16: key must be a string"]
    );
}

#[test]
fn missing_and_unknown_fields() {
    check(
        |v| {
            let o = v.as_object_mut().unwrap();
            o.remove("start");
            o.insert("horizn".into(), json!(6));
        },
        &[
            "horizn: unknown field; known fields here are format, version, name, notes, horizon, discount, states, actions, start, stationary, steps, layout",
            "start: missing; expected an array of probabilities",
        ],
    );
}

#[test]
fn shapes_of_tables_and_step_counts() {
    check(
        |v| v["stationary"] = json!(false),
        &["steps: \"stationary\": false needs one step table per step (H = 6), found 1"],
    );
    check(
        |v| v["steps"][0]["rewards"][1] = json!([0.2]),
        &["steps[0].rewards[1]: expected 2 entries (one per action), found 1"],
    );
    check(
        |v| v["steps"][0]["transitions"][0][0] = json!([[0, 0.5], [0, 0.5]]),
        &["steps[0].transitions[0][0][1][0]: state index 0 appears twice in this row"],
    );
    check(
        |v| v["steps"][0]["transitions"][0][0] = json!([[0.5, 1.0]]),
        &[
            "steps[0].transitions[0][0][0][0]: expected a state index (a whole number ≥ 0), found 0.5",
        ],
    );
    check(
        |v| v["steps"][0]["transitions"][0][0] = json!([[0, -0.1], [1, 1.1]]),
        &["steps[0].transitions[0][0][0][1]: probability -0.1 is not a number ≥ 0"],
    );
}

#[test]
fn sizes_over_the_limits_are_refused_before_the_tables_are_read() {
    check(
        |v| v["horizon"] = json!(1_000_000),
        &["horizon: 1000000 is over the limit of 10000 steps"],
    );
    let states: Vec<String> = (0..100_000).map(|i| format!("s{i}")).collect();
    check(
        |v| {
            v["horizon"] = json!(10_000);
            v["states"] = json!(states);
        },
        &[
            "H·S·A = 10000·100000·2 = 2000000000 is over the limit of 16777216 (step, state, action) cells",
        ],
    );
}

#[test]
fn labels_must_be_unique_and_non_empty() {
    check(
        |v| v["actions"] = json!(["stay", " "]),
        &["actions[1]: action label is empty"],
    );
    check(
        |v| v["states"] = json!([]),
        &["states: expected at least one state"],
    );
}

#[test]
fn writing_back_keeps_everything_and_is_canonical() {
    let m = parse_model(&base().to_string()).unwrap();
    let text = write_model(&m);
    let again = parse_model(&text).unwrap();
    assert_eq!(again, m);
    assert_eq!(write_model(&again), text);
    // The written text is the same JSON value as the input (integers in the
    // input's layout come back as the same numbers).
    let written: Value = serde_json::from_str(&text).unwrap();
    let mut want = base();
    want["layout"] = json!({"positions": [[0.0, 0.0], [1.0, 0.0], [2.0, 0.0]]});
    assert_eq!(written, want);
}

#[test]
fn markup_in_labels_is_kept_as_plain_text() {
    let mut v = base();
    v["name"] = json!("<img src=x onerror=alert(1)>");
    let m = parse_model(&v.to_string()).unwrap();
    assert_eq!(m.name(), "<img src=x onerror=alert(1)>");
    assert!(write_model(&m).contains("\"<img src=x onerror=alert(1)>\""));
}

/// Regression: on wasm32 (32-bit usize) the H·S·A product saturated at
/// 2³² − 1 and the message differed from the CLI's.
#[test]
fn size_products_are_exact_on_any_pointer_width() {
    let mut c = burnin::model::check::Checker::default();
    assert!(!c.check_cells(20_000, 1_000, 1_000));
    assert_eq!(
        c.into_problems().lines(),
        [
            "H·S·A = 1000·20000·1000 = 20000000000 is over the limit of 16777216 (step, state, action) cells"
        ]
    );
}
