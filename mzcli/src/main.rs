//! `mzsift`: command-line batch screening of mzML acquisitions.

fn main() {}
