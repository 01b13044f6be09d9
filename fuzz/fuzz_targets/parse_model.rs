//! Any bytes as a model file: reading never panics, and a model that reads
//! solves to finite values and writes back to a file that reads the same.
#![no_main]

use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    let Ok(text) = std::str::from_utf8(data) else { return };
    let Ok(m) = burnin::parse_model(text) else { return };
    let sol = burnin::solve::solve(&m);
    assert!(sol.v.iter().all(|x| x.is_finite()), "values are finite");
    let again = burnin::parse_model(&burnin::write_model(&m)).expect("a written model reads back");
    assert_eq!(again, m);
});
