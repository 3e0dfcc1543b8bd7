//! Error types of the core. One enum per domain; the Python layer maps them
//! onto `ValueError`, `TypeError`, `MemoryError` and `specwell.ConvergenceError`.
//! No function reachable from user input panics: every invalid input returns
//! one of these.

use std::fmt;

/// Invalid user input: the argument name and a description of the accepted range.
#[derive(Debug, Clone, PartialEq)]
pub enum InputError {
    /// A value outside its allowed range, e.g. `size` must be >= 1.
    /// `argument` names the argument, `expected` the accepted range, `got` what was passed.
    OutOfRange { argument: String, expected: String, got: String },
    /// A NaN or infinity where finite numbers are required.
    NotFinite { argument: String, index: usize },
    /// Array length mismatch.
    Length { argument: String, expected: usize, got: usize },
    /// An option string that is not in the table of choices.
    UnknownOption { argument: String, got: String, choices: Vec<String> },
    /// A request whose memory would exceed what the machine has.
    TooLarge { argument: String, needed_bytes: u64, available_bytes: u64, hint: String },
}

impl InputError {
    pub fn range(argument: &str, expected: impl Into<String>, got: impl Shown) -> Self {
        InputError::OutOfRange { argument: argument.into(), expected: expected.into(), got: got.shown() }
    }
}

/// How a rejected value is printed in an error message: numbers compactly (Rust's `{}`
/// writes 1e308 with 309 digits, so magnitudes outside [1e-4, 1e15) use the exponent
/// form), everything else as its `Display`.
pub trait Shown {
    fn shown(&self) -> String;
}

impl Shown for f64 {
    fn shown(&self) -> String {
        let a = self.abs();
        if !self.is_finite() || a == 0.0 || (1e-4..1e15).contains(&a) {
            format!("{self}")
        } else {
            format!("{self:e}")
        }
    }
}

impl Shown for f32 {
    fn shown(&self) -> String {
        f64::from(*self).shown()
    }
}

macro_rules! shown_by_display {
    ($($t:ty),*) => {$(
        impl Shown for $t {
            fn shown(&self) -> String {
                self.to_string()
            }
        }
    )*};
}
shown_by_display!(usize, u64, u32, u8, isize, i64, i32, bool, char, str, String);

impl<T: Shown + ?Sized> Shown for &T {
    fn shown(&self) -> String {
        (**self).shown()
    }
}

impl fmt::Display for InputError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            InputError::OutOfRange { argument, expected, got } => {
                write!(f, "`{argument}` must be {expected}; got {got}")
            }
            InputError::NotFinite { argument, index } => {
                write!(f, "`{argument}` must contain only finite numbers; found NaN or inf at index {index}")
            }
            InputError::Length { argument, expected, got } => {
                write!(f, "`{argument}` must have length {expected}; got length {got}")
            }
            InputError::UnknownOption { argument, got, choices } => {
                write!(f, "`{argument}` must be one of {}; got {got:?}", choices.iter().map(|c| format!("{c:?}")).collect::<Vec<_>>().join(", "))
            }
            InputError::TooLarge { argument, needed_bytes, available_bytes, hint } => write!(
                f,
                "`{argument}` would need {:.2} GiB of memory but only {:.2} GiB is available; {hint}",
                *needed_bytes as f64 / 1073741824.0,
                *available_bytes as f64 / 1073741824.0
            ),
        }
    }
}

impl std::error::Error for InputError {}

/// Numerical failure of an algorithm on valid input.
#[derive(Debug, Clone, PartialEq)]
pub enum NumericalError {
    /// An iterative eigensolver stopped at `max_iter` with residuals above tolerance.
    /// Carries the best estimates so the caller can inspect them.
    NotConverged { iterations: usize, tol: f64, energies: Vec<f64>, residuals: Vec<f64> },
    /// Imaginary-time relaxation stopped at `steps` with energies still drifting:
    /// `rates` are |dE/dτ| (energy/time) of every state at the last check.
    NotSettled { steps: usize, tol: f64, energies: Vec<f64>, rates: Vec<f64> },
    /// A quantity that must stay finite blew up (e.g. the norm of a propagated state).
    Diverged(String),
    /// The dense eigensolver failed (should not happen for finite symmetric input).
    EigenFailed(String),
    /// An adaptive quadrature used `pieces` intervals without meeting its relative
    /// tolerance `tol`; `value` and `error` are its last estimates.
    QuadratureNotConverged { pieces: usize, tol: f64, value: f64, error: f64 },
}

impl fmt::Display for NumericalError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            NumericalError::NotConverged { iterations, tol, residuals, .. } => {
                let worst = residuals.iter().cloned().fold(0.0_f64, f64::max);
                write!(
                    f,
                    "iterative method did not reach tol={tol:e} within {iterations} iterations \
                     (largest residual {worst:e}); raise `max_iter`, loosen `tol`, or use method=\"dense\""
                )
            }
            NumericalError::NotSettled { steps, tol, rates, .. } => {
                let worst = rates.iter().cloned().fold(0.0_f64, f64::max);
                write!(
                    f,
                    "imaginary-time relaxation did not settle to |dE/dτ| < tol={tol:e} within {steps} steps \
                     (largest rate {worst:e}); raise `max_steps`, loosen `tol` or take a larger dt"
                )
            }
            NumericalError::Diverged(s) => write!(f, "{s}"),
            NumericalError::EigenFailed(s) => write!(f, "dense eigensolver failed: {s}"),
            NumericalError::QuadratureNotConverged { pieces, tol, value, error } => write!(
                f,
                "the energy integral did not reach the relative accuracy {tol:e} with {pieces} intervals \
                 (estimate {value:e}, error estimate {error:e}); loosen `accuracy`"
            ),
        }
    }
}

impl std::error::Error for NumericalError {}

/// Any error of the core.
#[derive(Debug, Clone, PartialEq)]
pub enum Error {
    Input(InputError),
    Numerical(NumericalError),
}

impl fmt::Display for Error {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Error::Input(e) => e.fmt(f),
            Error::Numerical(e) => e.fmt(f),
        }
    }
}

impl std::error::Error for Error {}

impl From<InputError> for Error {
    fn from(e: InputError) -> Self {
        Error::Input(e)
    }
}
impl From<NumericalError> for Error {
    fn from(e: NumericalError) -> Self {
        Error::Numerical(e)
    }
}

pub type Result<T> = std::result::Result<T, Error>;

/// Look an option string up in a table of (name, value) pairs; unknown strings give an
/// error naming `argument` and listing every choice.
pub fn parse_choice<T: Copy>(argument: &str, got: &str, table: &[(&str, T)]) -> std::result::Result<T, InputError> {
    table.iter().find(|(name, _)| *name == got).map(|(_, v)| *v).ok_or_else(|| InputError::UnknownOption {
        argument: argument.into(),
        got: got.into(),
        choices: table.iter().map(|(name, _)| name.to_string()).collect(),
    })
}

/// The option string of `value` in `table` (every enum value has exactly one entry).
pub fn choice_name<T: Copy + PartialEq>(table: &[(&'static str, T)], value: T) -> &'static str {
    table.iter().find(|(_, v)| *v == value).map_or("", |(name, _)| name)
}

/// The option strings of a table, in order (for listings such as `specwell.UNITS`).
pub fn choice_names<T>(table: &[(&'static str, T)]) -> Vec<&'static str> {
    table.iter().map(|(name, _)| *name).collect()
}

/// Check that every entry of `values` is finite.
pub fn check_finite(argument: &str, values: &[f64]) -> std::result::Result<(), InputError> {
    match values.iter().position(|v| !v.is_finite()) {
        Some(index) => Err(InputError::NotFinite { argument: argument.into(), index }),
        None => Ok(()),
    }
}

/// Check that a scalar is finite and strictly positive.
pub fn check_positive(argument: &str, value: f64) -> std::result::Result<(), InputError> {
    if value.is_finite() && value > 0.0 {
        Ok(())
    } else {
        Err(InputError::range(argument, "a finite number > 0", value))
    }
}

/// Bytes of physical memory available now (Linux `MemAvailable`), or `None` if unknown.
pub fn available_memory_bytes() -> Option<u64> {
    let text = std::fs::read_to_string("/proc/meminfo").ok()?;
    let line = text.lines().find(|l| l.starts_with("MemAvailable:"))?;
    let kib: u64 = line.split_whitespace().nth(1)?.parse().ok()?;
    Some(kib * 1024)
}

/// Refuse up front a request needing `needed_bytes` when more than 80 % of the available memory.
pub fn check_memory(argument: &str, needed_bytes: u64, hint: &str) -> std::result::Result<(), InputError> {
    if let Some(avail) = available_memory_bytes() {
        if needed_bytes as f64 > 0.8 * avail as f64 {
            return Err(InputError::TooLarge {
                argument: argument.into(),
                needed_bytes,
                available_bytes: avail,
                hint: hint.into(),
            });
        }
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn rejected_values_print_compactly() {
        let msg = |v: f64| InputError::range("x", "a finite number > 0", v).to_string();
        assert_eq!(msg(1e308), "`x` must be a finite number > 0; got 1e308");
        assert_eq!(msg(-2.5e-300), "`x` must be a finite number > 0; got -2.5e-300");
        assert_eq!(msg(-3.25), "`x` must be a finite number > 0; got -3.25");
        assert_eq!(msg(0.0), "`x` must be a finite number > 0; got 0");
        assert_eq!(msg(f64::NAN), "`x` must be a finite number > 0; got NaN");
        assert_eq!(msg(f64::NEG_INFINITY), "`x` must be a finite number > 0; got -inf");
        assert_eq!(InputError::range("n", "an integer >= 1", 0usize).to_string(), "`n` must be an integer >= 1; got 0");
        assert_eq!(InputError::range("layers", "a list", "an empty list").to_string(), "`layers` must be a list; got an empty list");
    }
}
