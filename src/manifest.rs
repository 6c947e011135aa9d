//! Manifests, hashes and verification (to be written).
