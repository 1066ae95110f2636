//! hone: discretisation-error estimation for linear-static finite-element results.
//!
//! Data flows one way: [`io`] reads a results file, [`mesh`] holds the cells in per-kind blocks
//! with the nodal fields, [`material`] gives the elasticity of each zone, [`recovery`] samples FE
//! stresses and recovers a smooth field (Zienkiewicz-Zhu SPR), [`estimate`] turns the difference
//! into energy-norm error indicators, and [`report`] presents them.

pub mod element;
pub mod io;
