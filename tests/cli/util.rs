//! Helpers to run the real `mzsift` binary in a fresh temporary directory.

use std::path::{Path, PathBuf};
use std::process::{Command, Output};

/// The repository root (fixtures live under it).
pub fn repo() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("..")
}

/// A fixture path.
pub fn fixture(name: &str) -> PathBuf {
    repo().join("fixtures").join(name)
}

/// A command for the binary under test, run inside `dir`.
pub fn mzsift(dir: &Path) -> Command {
    let mut c = Command::new(env!("CARGO_BIN_EXE_mzsift"));
    c.current_dir(dir);
    c
}

/// Runs `mzsift ARGS` in a fresh temp dir and returns the output and the dir.
pub fn run(args: &[&str]) -> (Output, tempfile::TempDir) {
    let dir = tempfile::tempdir().expect("temp dir");
    let out = mzsift(dir.path()).args(args).output().expect("run mzsift");
    (out, dir)
}

/// Stdout as text.
pub fn stdout(o: &Output) -> String {
    String::from_utf8(o.stdout.clone()).expect("UTF-8 stdout")
}

/// Stderr as text.
pub fn stderr(o: &Output) -> String {
    String::from_utf8_lossy(&o.stderr).into_owned()
}

/// Parses TSV text into a header and rows.
pub fn tsv(text: &str) -> (Vec<String>, Vec<Vec<String>>) {
    let mut lines = text.lines();
    let header = lines.next().unwrap_or("").split('\t').map(str::to_owned).collect();
    let rows = lines.map(|l| l.split('\t').map(str::to_owned).collect()).collect();
    (header, rows)
}

/// Asserts two TSV texts are equal, printing the first differing line.
#[macro_export]
macro_rules! assert_tsv_eq {
    ($left:expr, $right:expr) => {{
        let (l, r): (&str, &str) = (&$left, &$right);
        if l != r {
            for (i, (a, b)) in l.lines().zip(r.lines()).enumerate() {
                if a != b {
                    panic!("TSV differs at line {}:\n  left:  {a}\n  right: {b}", i + 1);
                }
            }
            panic!("TSV differs in length: {} vs {} lines", l.lines().count(), r.lines().count());
        }
    }};
}
