//! End-to-end tests of the `mzsift` binary.

mod util;

mod chem;
mod demo;
mod faults;
mod info;
mod list;
mod nothing_lost;
mod peaks;
mod run;
