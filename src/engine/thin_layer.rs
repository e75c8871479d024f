//! Thin-layer drying models (in progress).
