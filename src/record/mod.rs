//! The audit record of a run.
