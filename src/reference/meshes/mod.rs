//! 2D and 3D mesh generators and a size-driven 2D mesher (being written).
