//! Messages on stderr and exit codes.

use std::process::ExitCode;

/// Exit code: everything read and written.
pub const OK: u8 = 0;
/// Exit code: some files or spectra could not be read (reported on stderr).
pub const SOME_FAILED: u8 = 1;
/// Exit code: usage or configuration error.
pub const USAGE: u8 = 2;

/// Prints `mzsift: <file>: <message>` on stderr.
pub fn report(file: &std::path::Path, message: &dyn std::fmt::Display) {
    eprintln!("mzsift: {}: {message}", file.display());
}

/// True when an error chain ends in a broken pipe (the reader of stdout went away).
fn is_broken_pipe(e: &anyhow::Error) -> bool {
    e.chain().any(|c| {
        c.downcast_ref::<std::io::Error>().is_some_and(|io| io.kind() == std::io::ErrorKind::BrokenPipe)
            || c.downcast_ref::<csv::Error>().is_some_and(|ce| {
                matches!(ce.kind(), csv::ErrorKind::Io(io) if io.kind() == std::io::ErrorKind::BrokenPipe)
            })
    })
}

/// Maps a command's outcome to the process exit code; a broken pipe is a clean exit.
pub fn finish(result: anyhow::Result<u8>) -> ExitCode {
    match result {
        Ok(code) => ExitCode::from(code),
        Err(e) if is_broken_pipe(&e) => ExitCode::from(OK),
        Err(e) => {
            eprintln!("mzsift: {e:#}");
            ExitCode::from(SOME_FAILED)
        }
    }
}

/// For commands whose only input is their arguments (a formula, an ion type): an input error
/// is a usage error (exit code 2), printed here; other errors pass through.
pub fn input_error_is_usage(result: anyhow::Result<()>) -> anyhow::Result<u8> {
    match result {
        Ok(()) => Ok(OK),
        Err(e) if e.chain().any(|c| c.downcast_ref::<mzcore::Error>().is_some()) => {
            eprintln!("mzsift: {e:#}");
            Ok(USAGE)
        }
        Err(e) => Err(e),
    }
}
