//! Small-strain linear-elastic solver (being written).
