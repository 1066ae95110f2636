//! Element library (placeholder until the element kinds land).
