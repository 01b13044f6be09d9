//! numpy arrays in and out: flat vectors with a shape, C order.

use numpy::{
    Element, PyArray1, PyArrayDyn, PyArrayMethods, PyReadonlyArrayDyn, PyUntypedArrayMethods,
};
use pyo3::prelude::*;

/// A numpy array of `shape` holding `data` (C order).
pub fn array<'py, T: Element>(
    py: Python<'py>,
    data: Vec<T>,
    shape: &[usize],
) -> PyResult<Bound<'py, PyArrayDyn<T>>> {
    PyArray1::from_vec(py, data).reshape(shape.to_vec())
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
