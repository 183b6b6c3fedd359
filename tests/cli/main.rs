//! End-to-end tests of the `mzsift` binary.

mod util;

mod check;
mod chem;
mod demo;
mod info;
mod list;
mod merge;
mod peaks;
mod run;
