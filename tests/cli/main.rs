//! End-to-end tests of the `mzsift` binary.

mod util;

mod chem;
mod demo;
mod info;
mod list;
mod peaks;
mod run;
