//! Models: read from a file's text, built from numpy arrays (through the
//! core's `Mdp::from_parts` and so its checks), generated from the
//! catalogue; solved and evaluated exactly, with numpy arrays back.

use burnin::generate::GeneratorSpec;
use burnin::solve::{Policy, evaluate, solve, start_value};
use burnin::{Mdp, MdpParts, Problems, Reward, StepParts};
use ndarray::{Array2, Array3};
use numpy::PyReadonlyArrayDyn;
use pyo3::exceptions::PyValueError;
use pyo3::prelude::*;
use pyo3::types::PyDict;

use crate::arrays::{array, read, shape_text};
use crate::invalid;

/// A checked model (the core's `Mdp`).
#[pyclass(module = "burnin._burnin", name = "Mdp", frozen)]
pub struct PyMdp {
    pub mdp: Mdp,
}

fn model_problems<T>(py: Python<'_>, r: Result<T, Problems>) -> PyResult<T> {
    r.map_err(|p| invalid(py, &p))
}

/// Reads a model file's text (burnin-model v1).
#[pyfunction]
fn model_from_json(py: Python<'_>, text: &str) -> PyResult<PyMdp> {
    let mdp = model_problems(py, py.detach(|| burnin::parse_model(text)))?;
    Ok(PyMdp { mdp })
}

/// A generator object's JSON text (`{"kind": …, params…, "seed": n}`) built
/// into a model; problems are reported at `kind.param`.
#[pyfunction]
fn model_from_generator(py: Python<'_>, text: &str) -> PyResult<PyMdp> {
    let v: serde_json::Value =
        serde_json::from_str(text).map_err(|e| PyValueError::new_err(e.to_string()))?;
    let kind = v
        .get("kind")
        .and_then(|k| k.as_str())
        .unwrap_or("generator")
        .to_owned();
    let spec = model_problems(py, GeneratorSpec::from_json(&v, &kind))?;
    let mdp = model_problems(py, py.detach(|| spec.generate(&kind)))?;
    Ok(PyMdp { mdp })
}

/// A model from dense arrays: `p` of shape (H, S, A, S) or (S, A, S), `r`
/// of shape (H, S, A) or (S, A), `start` of shape (S,). Every entry of `p`
/// is checked as the entry `[s', p]` of a file's row, so the problems are
/// the file's (`steps[h].transitions[s][a][s'][1]: …`); zeros are then
/// left out of the sparse rows.
#[pyfunction]
#[pyo3(signature = (p, r, start, reward, horizon, name, states, actions, discount))]
#[allow(clippy::too_many_arguments)]
fn model_from_arrays(
    py: Python<'_>,
    p: PyReadonlyArrayDyn<'_, f64>,
    r: PyReadonlyArrayDyn<'_, f64>,
    start: PyReadonlyArrayDyn<'_, f64>,
    reward: &str,
    horizon: Option<usize>,
    name: String,
    states: Option<Vec<String>>,
    actions: Option<Vec<String>>,
    discount: Option<f64>,
) -> PyResult<PyMdp> {
    let (p_shape, p) = read(&p)?;
    let (r_shape, r) = read(&r)?;
    let (start_shape, start) = read(&start)?;
    let mut shape_problems = Problems::default();
    let kind = match reward {
        "bernoulli" => Reward::Bernoulli as fn(f64) -> Reward,
        "fixed" => Reward::Fixed,
        other => {
            return Err(PyValueError::new_err(format!(
                "reward={other:?}: expected \"bernoulli\" (means of 0/1 rewards) or \"fixed\""
            )));
        }
    };
    // (H or None, S, A) from P's shape.
    let p_dims = match *p_shape.as_slice() {
        [h, s, a, s2] if s == s2 => Some((Some(h), s, a)),
        [s, a, s2] if s == s2 => Some((None, s, a)),
        _ => None,
    };
    let Some((p_h, s_n, a_n)) = p_dims else {
        shape_problems.push(
            "P",
            format!(
                "expected shape (H, S, A, S) or (S, A, S), found {}",
                shape_text(&p_shape)
            ),
        );
        return Err(invalid(py, &shape_problems));
    };
    let r_h = match *r_shape.as_slice() {
        [h, s, a] if (s, a) == (s_n, a_n) => Some(Some(h)),
        [s, a] if (s, a) == (s_n, a_n) => Some(None),
        _ => None,
    };
    let Some(r_h) = r_h else {
        shape_problems.push(
            "rewards",
            format!(
                "expected shape (H, S, A) = (H, {s_n}, {a_n}) or (S, A) = ({s_n}, {a_n}) to match P, found {}",
                shape_text(&r_shape)
            ),
        );
        return Err(invalid(py, &shape_problems));
    };
    if start_shape != [s_n] {
        shape_problems.push(
            "start",
            format!(
                "expected shape (S,) = ({s_n},), found {}",
                shape_text(&start_shape)
            ),
        );
    }
    let h_n = match (p_h, r_h, horizon) {
        (Some(a), Some(b), _) if a != b => {
            shape_problems.push(
                "rewards",
                format!("P has H = {a} steps but the rewards have {b}"),
            );
            a
        }
        (Some(a), _, Some(h)) | (_, Some(a), Some(h)) if a != h => {
            shape_problems.push("horizon", format!("{h} disagrees with the arrays' H = {a}"));
            a
        }
        (Some(a), _, _) | (_, Some(a), _) => a,
        (None, None, Some(h)) => h,
        (None, None, None) => {
            shape_problems.push(
                "horizon",
                "P and the rewards are both stationary; give horizon=H",
            );
            0
        }
    };
    model_problems(py, shape_problems.into_result())?;
    let stationary = p_h.is_none() && r_h.is_none();
    let tables = if stationary { 1 } else { h_n };
    let n = s_n * a_n;
    let label = |prefix: &str, k: usize| (0..k).map(|i| format!("{prefix}{i}")).collect();
    let step = |h: usize, dense: bool| StepParts {
        transitions: (0..n)
            .map(|row| {
                let base = if p_h.is_some() { h * n * s_n } else { 0 } + row * s_n;
                (0..s_n)
                    .filter(|&s2| dense || p[base + s2] != 0.0)
                    .map(|s2| (s2 as u32, p[base + s2]))
                    .collect()
            })
            .collect(),
        rewards: (0..n)
            .map(|row| kind(r[if r_h.is_some() { h * n } else { 0 } + row]))
            .collect(),
    };
    let parts = |dense: bool| MdpParts {
        name: name.clone(),
        notes: None,
        horizon: h_n,
        discount,
        states: states.clone().unwrap_or_else(|| label("s", s_n)),
        actions: actions.clone().unwrap_or_else(|| label("a", a_n)),
        start: start.clone(),
        stationary,
        steps: (0..tables).map(|h| step(h, dense)).collect(),
        layout: None,
    };
    // Checked with every entry, as a file listing every next state; built
    // without the zeros (the same model, the same numbers).
    let mdp = py.detach(|| {
        Mdp::from_parts(parts(true))?;
        Mdp::from_parts(parts(false))
    });
    Ok(PyMdp {
        mdp: model_problems(py, mdp)?,
    })
}

#[pymethods]
impl PyMdp {
    /// The model's canonical file text (what `burnin canon` writes).
    fn to_json(&self) -> String {
        burnin::write_model(&self.mdp)
    }

    #[getter]
    fn name(&self) -> &str {
        self.mdp.name()
    }
    #[getter]
    fn horizon(&self) -> usize {
        self.mdp.horizon()
    }
    #[getter]
    fn states(&self) -> Vec<String> {
        self.mdp.states().to_vec()
    }
    #[getter]
    fn actions(&self) -> Vec<String> {
        self.mdp.actions().to_vec()
    }
    #[getter]
    fn stationary(&self) -> bool {
        self.mdp.is_stationary()
    }
    #[getter]
    fn discount(&self) -> f64 {
        self.mdp.discount()
    }
    #[getter]
    fn start<'py>(&self, py: Python<'py>) -> PyResult<Bound<'py, PyAny>> {
        let s = self.mdp.start().to_vec();
        let n = s.len();
        Ok(array(py, s, &[n])?.into_any())
    }

    /// P as a dense array of shape (H, S, A, S) (every step, even when
    /// the model is stationary).
    fn transitions<'py>(&self, py: Python<'py>) -> PyResult<Bound<'py, PyAny>> {
        let m = &self.mdp;
        let (h_n, s_n, a_n) = (m.horizon(), m.n_states(), m.n_actions());
        let mut out = vec![0.0; h_n * s_n * a_n * s_n];
        for h in 0..h_n {
            let st = m.step(h);
            for row in 0..s_n * a_n {
                let (next, prob) = st.row(row);
                for (&n, &p) in next.iter().zip(prob) {
                    out[(h * s_n * a_n + row) * s_n + n as usize] = p;
                }
            }
        }
        Ok(array(py, out, &[h_n, s_n, a_n, s_n])?.into_any())
    }

    /// The mean rewards r̄_h(s, a), shape (H, S, A).
    fn mean_rewards<'py>(&self, py: Python<'py>) -> PyResult<Bound<'py, PyAny>> {
        let m = &self.mdp;
        let (h_n, s_n, a_n) = (m.horizon(), m.n_states(), m.n_actions());
        let mut out = Vec::with_capacity(h_n * s_n * a_n);
        for h in 0..h_n {
            out.extend_from_slice(m.step(h).mean_rewards());
        }
        Ok(array(py, out, &[h_n, s_n, a_n])?.into_any())
    }

    /// Raises `InvalidInput` when learners cannot run on the model
    /// (a discount, or rewards outside [0, 1]).
    fn check_learnable(&self, py: Python<'_>) -> PyResult<()> {
        model_problems(py, burnin::experiment::check_learnable(&self.mdp))
    }

    /// The exact solution: a dict of `optimal_value`, `v` (H+1, S), `q`
    /// (H, S, A), `policy` (H, S) and `gaps` (H, S, A).
    fn solve<'py>(&self, py: Python<'py>) -> PyResult<Bound<'py, PyDict>> {
        let m = &self.mdp;
        let sol = py.detach(|| solve(m));
        let gaps = sol.gaps();
        let d = PyDict::new(py);
        d.set_item("optimal_value", sol.optimal_value)?;
        let dims = |a: &[usize]| a.to_vec();
        d.set_item(
            "v",
            array(py, sol.v.iter().copied().collect(), &dims(sol.v.shape()))?,
        )?;
        d.set_item(
            "q",
            array(py, sol.q.iter().copied().collect(), &dims(sol.q.shape()))?,
        )?;
        d.set_item(
            "policy",
            array(
                py,
                sol.policy.iter().map(|&a| a as i64).collect(),
                &dims(sol.policy.shape()),
            )?,
        )?;
        d.set_item(
            "gaps",
            array(py, gaps.iter().copied().collect(), &dims(gaps.shape()))?,
        )?;
        Ok(d)
    }

    /// Exact values of a deterministic policy (int array of shape (H, S)):
    /// V^π of shape (H+1, S) and Σ_s ρ(s)·V^π_1(s).
    fn evaluate_actions<'py>(
        &self,
        py: Python<'py>,
        policy: PyReadonlyArrayDyn<'_, i64>,
    ) -> PyResult<(Bound<'py, PyAny>, f64)> {
        let (shape, data) = read(&policy)?;
        let (h_n, s_n) = (self.mdp.horizon(), self.mdp.n_states());
        if shape != [h_n, s_n] {
            return Err(PyValueError::new_err(format!(
                "policy has shape {}, expected (H, S) = ({h_n}, {s_n})",
                shape_text(&shape)
            )));
        }
        if let Some(i) = data.iter().position(|&a| a < 0 || a > u32::MAX as i64) {
            return Err(PyValueError::new_err(format!(
                "policy at step {} state {}: action index {} is out of range",
                i / s_n + 1,
                i % s_n,
                data[i]
            )));
        }
        let acts = Array2::from_shape_vec((h_n, s_n), data.iter().map(|&a| a as u32).collect())
            .expect("shape checked");
        self.evaluated(py, Policy::Deterministic(acts))
    }

    /// Exact values of a stochastic policy (float array of shape (H, S, A)).
    fn evaluate_probabilities<'py>(
        &self,
        py: Python<'py>,
        policy: PyReadonlyArrayDyn<'_, f64>,
    ) -> PyResult<(Bound<'py, PyAny>, f64)> {
        let (shape, data) = read(&policy)?;
        let m = &self.mdp;
        let (h_n, s_n, a_n) = (m.horizon(), m.n_states(), m.n_actions());
        if shape != [h_n, s_n, a_n] {
            return Err(PyValueError::new_err(format!(
                "policy has shape {}, expected (H, S, A) = ({h_n}, {s_n}, {a_n})",
                shape_text(&shape)
            )));
        }
        let probs = Array3::from_shape_vec((h_n, s_n, a_n), data).expect("shape checked");
        self.evaluated(py, Policy::Stochastic(probs))
    }

    fn __repr__(&self) -> String {
        let m = &self.mdp;
        format!(
            "<burnin.Model {:?}: S={}, A={}, H={}{}>",
            m.name(),
            m.n_states(),
            m.n_actions(),
            m.horizon(),
            if m.is_stationary() {
                ", stationary"
            } else {
                ""
            }
        )
    }
}

impl PyMdp {
    fn evaluated<'py>(&self, py: Python<'py>, p: Policy) -> PyResult<(Bound<'py, PyAny>, f64)> {
        let m = &self.mdp;
        let v = py
            .detach(|| evaluate(m, &p))
            .map_err(|e| PyValueError::new_err(e.to_string()))?;
        let value = start_value(m, v.row(0).as_slice().expect("standard layout"));
        let shape = v.shape().to_vec();
        Ok((
            array(py, v.into_iter().collect(), &shape)?.into_any(),
            value,
        ))
    }
}

pub fn register(m: &Bound<'_, PyModule>) -> PyResult<()> {
    m.add_class::<PyMdp>()?;
    m.add_function(wrap_pyfunction!(model_from_json, m)?)?;
    m.add_function(wrap_pyfunction!(model_from_generator, m)?)?;
    m.add_function(wrap_pyfunction!(model_from_arrays, m)?)?;
    Ok(())
}
