//! End-to-end tests of the `mzsift` binary.

mod util;

mod check;
mod chem;
mod demo;
mod faults;
mod info;
mod list;
mod merge;
mod nothing_lost;
mod peaks;
mod run;
mod standards;
