//! Writes a large profile-like mzML file for memory and speed measurements.
//!
//! `cargo run --release -p mzcore --example bench_file -- OUT.mzML MEGABYTES`

// `cached` serves the benchmark only.
#[allow(dead_code)]
#[path = "../../benches/support/bigfile.rs"]
mod bigfile;

fn main() -> std::io::Result<()> {
    let mut args = std::env::args().skip(1);
    let out = args.next().unwrap_or_else(|| "bench.mzML".into());
    let mb: u64 = args.next().and_then(|s| s.parse().ok()).unwrap_or(200);
    let bytes = bigfile::write(std::path::Path::new(&out), mb)?;
    println!("{out}\t{bytes}");
    Ok(())
}
