//! Size limits of a model, checked before anything proportional to them is allocated.
//!
//! The limits keep a model that arrives from a file or a share link within what
//! one browser tab can hold: the dense solver arrays are `H·S·A` doubles and the
//! transition table is `entries × 12` bytes. They are documented in
//! `docs/formats.md`; change both together.

/// Largest number of states S.
pub const MAX_STATES: usize = 100_000;
/// Largest number of actions A.
pub const MAX_ACTIONS: usize = 1_000;
/// Largest horizon H.
pub const MAX_HORIZON: usize = 10_000;
/// Largest H·S·A (cells of the dense Q table the solver fills).
pub const MAX_CELLS: usize = 1 << 24;
/// Largest number of `[next_state, probability]` entries over all steps.
pub const MAX_ENTRIES: usize = 1 << 24;
/// Largest model file, in bytes, read before parsing.
pub const MAX_FILE_BYTES: usize = 256 << 20;
/// Longest state or action label, in characters.
pub const MAX_LABEL_CHARS: usize = 200;
/// Longest `name`, in characters.
pub const MAX_NAME_CHARS: usize = 200;
/// Longest `notes`, in characters.
pub const MAX_NOTES_CHARS: usize = 20_000;
/// Problems listed before the rest are only counted.
pub const MAX_REPORTED_PROBLEMS: usize = 200;
/// Largest magnitude of a reward, a reward's bounds or Beta parameters, and
/// a layout coordinate: H·1e300 and the difference of two such sums stay
/// far below the largest double (1.8e308), so values, gaps and regrets are
/// finite (and a Beta's α + β is).
pub const MAX_MAGNITUDE: f64 = 1e300;
