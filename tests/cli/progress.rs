//! Progress on stderr: a live bar in a pseudo-terminal (`script` of util-linux gives the
//! binary one), timestamped lines without one; stdout holds no progress either way.

use std::process::Command;

use crate::util::{fixture, mzsift, stderr};

/// Runs `mzsift run fixtures/demo` inside a pseudo-terminal; `None` when `script` is missing.
fn in_pty(dir: &std::path::Path, env: &[(&str, &str)]) -> Option<String> {
    if Command::new("script").arg("--version").output().is_err() {
        eprintln!("skipped: no `script` (util-linux) for a pseudo-terminal");
        return None;
    }
    let cmd = format!("{} run {} -o out", env!("CARGO_BIN_EXE_mzsift"), fixture("demo").display());
    let mut c = Command::new("script");
    c.args(["-qfec", &cmd, "/dev/null"])
        .current_dir(dir)
        .env("TERM", "xterm")
        .env_remove("NO_COLOR");
    for (k, v) in env {
        c.env(k, v);
    }
    let o = c.output().unwrap();
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    Some(String::from_utf8_lossy(&o.stdout).into_owned())
}

#[test]
fn a_terminal_gets_a_live_bar_with_files_bytes_rate_and_eta() {
    let dir = tempfile::tempdir().unwrap();
    let Some(screen) = in_pty(dir.path(), &[]) else { return };
    assert!(screen.contains("6/6 files ["), "{screen}");
    assert!(screen.contains("MiB/3.55 MiB") || screen.contains("/3.55 MiB"), "{screen}");
    assert!(screen.contains("/s ETA "), "{screen}");
    // Redrawn in place (cursor movements, line clears) and coloured.
    assert!(screen.contains("\r") && screen.contains("\x1b[2K"), "{screen}");
    assert!(screen.contains("\x1b[36m"), "{screen}");
    // No per-file timestamped lines on a terminal, and the summary at the end.
    assert!(!screen.contains("Z mzsift: "), "{screen}");
    assert!(screen.contains("mzsift: 6 files: 6 ok"), "{screen}");
}

#[test]
fn no_color_turns_the_colour_off() {
    let dir = tempfile::tempdir().unwrap();
    let Some(screen) = in_pty(dir.path(), &[("NO_COLOR", "1")]) else { return };
    assert!(screen.contains("6/6 files ["), "{screen}");
    assert!(!screen.contains("\x1b[36m") && !screen.contains("\x1b[34m"), "{screen}");
}

#[test]
fn without_a_terminal_timestamped_lines_per_file_and_per_interval() {
    let dir = tempfile::tempdir().unwrap();
    let o = mzsift(dir.path())
        .arg("run")
        .arg(fixture("demo"))
        .args(["-o", "out", "--progress-seconds", "0.02"])
        .output()
        .unwrap();
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    assert!(o.stdout.is_empty(), "stdout holds data only");
    let err = stderr(&o);
    let per_file = err.lines().filter(|l| l.contains("files, ") && l.contains(": ok (")).count();
    assert_eq!(per_file, 6, "{err}");
    // Timestamp first: YYYY-MM-DDTHH:MM:SSZ.
    for l in err.lines().filter(|l| l.contains(" mzsift: ") && l.contains(" files")) {
        let stamp = l.split(' ').next().unwrap();
        assert!(stamp.len() == 20 && stamp.ends_with('Z') && stamp.as_bytes()[10] == b'T', "{l}");
    }
    let periodic = err.lines().filter(|l| l.contains(" MB/s, ETA ")).count();
    assert!(periodic >= 1, "no periodic line at 0.02 s over the whole run: {err}");
    assert!(!err.contains('\r') && !err.contains('\x1b'), "{err}");
    // --progress-seconds 0: only the per-file lines.
    let o = mzsift(dir.path())
        .arg("run")
        .arg(fixture("demo"))
        .args(["-o", "out2", "--progress-seconds", "0"])
        .output()
        .unwrap();
    assert_eq!(stderr(&o).matches(" MB/s, ETA ").count(), 0);
}
