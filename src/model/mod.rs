//! The model: unit systems, layered structures and material parameters. Profiles and
//! tables only, no numerics beyond exact integrals of piecewise-defined functions.

pub mod atoms;
pub mod materials;
pub mod stack;
pub mod units;
