//! `burnin._burnin`: the Python package's native module, a front end over
//! Burnin's core like the CLI and the page. It converts and nothing more:
//! models from text or numpy arrays go through the core's checks
//! (`Mdp::from_parts`), solutions and curves come back as numpy arrays,
//! experiments run on the core's runner (`burnin::native`'s threads and
//! clock) with the GIL released, and a user's learner written as a Python
//! class is a guest (`burnin::learn::GuestHost`) like the CLI's processes,
//! made and called on the thread that called `burnin.run`.
//!
//! The Python side (`pysrc/burnin/`) holds the documented API, the
//! exception types and the generator functions built from the catalogue.

use pyo3::prelude::*;

mod arrays;
mod model;
mod run;

/// The core's problems (`path: message`) as `burnin.InvalidInput`, which
/// carries the list.
pub(crate) fn invalid(py: Python<'_>, problems: &burnin::Problems) -> PyErr {
    let pairs: Vec<(String, String)> = problems
        .list()
        .iter()
        .map(|p| (p.path.clone(), p.message.clone()))
        .collect();
    raise(py, "InvalidInput", (pairs, problems.unlisted()))
}

/// An exception of `burnin._errors` built with `args`.
pub(crate) fn raise<'py, A>(py: Python<'py>, name: &str, args: A) -> PyErr
where
    A: pyo3::call::PyCallArgs<'py>,
{
    match py
        .import("burnin._errors")
        .and_then(|m| m.getattr(name))
        .and_then(|cls| cls.call1(args))
    {
        Ok(e) => PyErr::from_value(e),
        Err(e) => e,
    }
}

/// The catalogue of generators as JSON (kinds, parameters with their
/// types, defaults, ranges and help, sources): the generator functions of
/// `burnin.generate` are built from it.
#[pyfunction]
fn generator_catalogue() -> String {
    serde_json::to_string(burnin::generate::GENERATORS).expect("the catalogue serialises")
}

/// The catalogue of algorithms as JSON (keys, names, parameters, sources).
#[pyfunction]
fn algorithm_catalogue() -> String {
    serde_json::to_string(&burnin::catalogue::catalogue()).expect("the catalogue serialises")
}

#[pymodule]
fn _burnin(m: &Bound<'_, PyModule>) -> PyResult<()> {
    m.add("BUILD", burnin::BUILD)?;
    m.add_function(wrap_pyfunction!(generator_catalogue, m)?)?;
    m.add_function(wrap_pyfunction!(algorithm_catalogue, m)?)?;
    model::register(m)?;
    run::register(m)?;
    Ok(())
}
