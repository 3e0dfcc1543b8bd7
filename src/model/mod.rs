//! The model: unit systems and layered structures. Profiles only, no numerics
//! beyond exact integrals of piecewise-defined functions.

pub mod stack;
pub mod units;
