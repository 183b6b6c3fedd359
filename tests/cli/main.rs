//! End-to-end tests of the `mzsift` binary.

mod util;

mod info;
mod list;
