//! Mesh generators for the reference problems and the demo, and a size-driven 2D mesher.
//!
//! * Mapped and block meshes ([`quarter_annulus`], [`plate_with_hole`], [`l_shape`]): structured
//!   meshes of the unit square moved by exact maps, so quadratic mid nodes on circles lie on
//!   the circles; blocks joined by [`merge_coincident`].
//! * [`extrude`]: a triangle mesh through a thickness into wedges or conforming tetrahedra.
//! * [`triangulate`]: a [`Domain`] of lines and circular arcs (an outer loop and holes) meshed
//!   with triangles whose edge lengths follow a size field `h(x, y)`: boundary points placed by
//!   integrating `1/h`, a constrained Delaunay triangulation (spade), then Delaunay refinement
//!   driven by size and shape (Ruppert 1995, "A Delaunay refinement algorithm for quality
//!   2-dimensional mesh generation", J. Algorithms 18:548-585), with boundary edges on arcs split
//!   on the arc.
//!
//! Every element produced has a positive Jacobian in VTK node order
//! ([`check_geometry`](crate::mesh::check_geometry) finds nothing).

mod boundary_cdt;
mod domain;
mod error;
mod extrude;
mod mapped;
mod merge;
mod refine;
mod triangulate;

pub use domain::{Domain, Loop, Segment, MAX_ARC_STEP};
pub use error::{LoopId, MeshError};
pub use extrude::extrude;
pub use mapped::{l_shape, l_shape_graded, plate_with_hole, quarter_annulus};
pub use merge::{measure, merge_coincident};
pub use triangulate::{triangulate, MesherOptions};
