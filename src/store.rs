//! SQLite schema and writer (to be written).
