//! hone: discretisation-error estimation for linear-static finite-element results.
//!
//! Data flows one way: [`io`] reads a results file, [`mesh`] holds the cells in per-kind blocks
//! with the nodal fields, [`material`] gives the elasticity of each zone, [`recovery`] samples FE
//! stresses and recovers a smooth field (Zienkiewicz-Zhu SPR), [`estimate`] turns the difference
//! into energy-norm error indicators, and [`report`] and [`cli`] present them.

// Numeric kernels index several arrays (shape values, gradients, stress components) in step;
// index loops state that more plainly than zipped iterators.
#![allow(clippy::needless_range_loop)]

pub mod cli;
pub mod element;
pub mod estimate;
pub mod io;
pub mod material;
pub mod mesh;
pub mod plan;
pub mod recovery;
pub mod reference;
pub mod report;
pub mod singular;
pub mod study;
