//! numpy arrays in and out: flat vectors with a shape, C order.

use ndarray::{ArrayD, IxDyn};
use numpy::{Element, IntoPyArray, PyArrayDyn, PyReadonlyArrayDyn, PyUntypedArrayMethods};
use pyo3::exceptions::PyValueError;
use pyo3::prelude::*;

/// A numpy array of `shape` holding `data` (C order), made in one step
/// (no reshape call: a learner's batch makes four of these per call).
pub fn array<'py, T: Element>(
    py: Python<'py>,
    data: Vec<T>,
    shape: &[usize],
) -> PyResult<Bound<'py, PyArrayDyn<T>>> {
    let a = ArrayD::from_shape_vec(IxDyn(shape), data)
        .map_err(|e| PyValueError::new_err(e.to_string()))?;
    Ok(a.into_pyarray(py))
}

/// An input array's shape and its entries in C order (the Python side
/// passes contiguous arrays of the right dtype).
pub fn read<T: Element + Copy>(a: &PyReadonlyArrayDyn<'_, T>) -> PyResult<(Vec<usize>, Vec<T>)> {
    let shape = a.shape().to_vec();
    let data = match a.as_slice() {
        Ok(s) => s.to_vec(),
        Err(_) => a.as_array().iter().copied().collect(),
    };
    Ok((shape, data))
}

/// A shape as Python writes it: `(2, 3)`, `(4,)`.
pub fn shape_text(shape: &[usize]) -> String {
    match shape {
        [one] => format!("({one},)"),
        _ => format!(
            "({})",
            shape
                .iter()
                .map(usize::to_string)
                .collect::<Vec<_>>()
                .join(", ")
        ),
    }
}
