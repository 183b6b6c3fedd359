//! End-to-end tests of the `mzsift` binary.
