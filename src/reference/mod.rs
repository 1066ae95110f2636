//! Reference tools for verification, examples and the demo: a small linear-elastic solver, mesh
//! generators and a 2D mesher, and benchmark problems with published exact solutions. Not a
//! user-facing solver; problems are defined in code.

pub mod adaptive;
pub mod demo;
pub mod effectivity;
pub mod meshes;
pub mod problems;
pub mod solver;
