//! Progress of `mzsift run` on stderr: on a terminal a live bar (files done of total, bytes of
//! the current file, MB/s and ETA over all input bytes); otherwise a timestamped line every
//! `interval` and one per file. Nothing of it goes to stdout.

use std::path::Path;
use std::sync::atomic::{AtomicBool, AtomicU64, Ordering};
use std::sync::{Arc, Mutex};
use std::thread::JoinHandle;
use std::time::{Duration, Instant, SystemTime};

use indicatif::{ProgressBar, ProgressDrawTarget, ProgressStyle};

use crate::batch::{Outcome, utc};

/// What the ticker thread and the run share.
#[derive(Default)]
struct Shared {
    /// Bytes of the current file read so far (the screening adds to it).
    current: Arc<AtomicU64>,
    /// Bytes of the files done.
    done_bytes: AtomicU64,
    /// Files done.
    done_files: AtomicU64,
    /// Name and size of the current file.
    file: Mutex<(String, u64)>,
    stop: AtomicBool,
}

/// The progress display of one run.
pub struct Progress {
    quiet: bool,
    terminal: bool,
    total_files: usize,
    total_bytes: u64,
    shared: Arc<Shared>,
    bar: Option<ProgressBar>,
    ticker: Option<JoinHandle<()>>,
}

const MB: f64 = 1e6;

impl Progress {
    /// Starts the display for `inputs` (their sizes give the total bytes); `interval` is the
    /// time between lines when stderr is not a terminal (zero: per-file lines only).
    pub fn start(inputs: &[&Path], quiet: bool, terminal: bool, interval: Duration) -> Self {
        let total_bytes =
            inputs.iter().map(|p| std::fs::metadata(p).map_or(0, |m| m.len())).sum::<u64>();
        let shared = Arc::new(Shared::default());
        let started = Instant::now();
        let total_files = inputs.len();
        let bar = (!quiet && terminal).then(|| {
            // NO_COLOR (https://no-color.org): any non-empty value turns colour off.
            let colour = std::env::var_os("NO_COLOR").is_none_or(|v| v.is_empty());
            let bar = if colour { "{bar:16.cyan/blue}" } else { "{bar:16}" };
            let template = format!(
                "{{prefix}} files [{bar}] {{bytes}}/{{total_bytes}} {{bytes_per_sec}} ETA \
                 {{eta}} {{wide_msg}}"
            );
            let style = ProgressStyle::with_template(&template)
                .expect("the template is valid")
                .progress_chars("=> ");
            let b = ProgressBar::with_draw_target(Some(total_bytes), ProgressDrawTarget::stderr());
            b.set_style(style);
            b.set_prefix(format!("0/{total_files}"));
            b
        });
        let ticking = !quiet && (bar.is_some() || !interval.is_zero());
        let ticker = ticking.then(|| {
            let shared = Arc::clone(&shared);
            let bar = bar.clone();
            let every = if bar.is_some() { Duration::from_millis(100) } else { interval };
            std::thread::spawn(move || {
                tick(&shared, bar.as_ref(), every, total_files, total_bytes, started)
            })
        });
        Progress { quiet, terminal, total_files, total_bytes, shared, bar, ticker }
    }

    /// The counter the screening of the next file adds its bytes to.
    pub fn begin_file(&self, name: &str, path: &Path) -> Arc<AtomicU64> {
        let size = std::fs::metadata(path).map_or(0, |m| m.len());
        *self.shared.file.lock().expect("not poisoned") = (name.to_owned(), size);
        self.shared.current.store(0, Ordering::Relaxed);
        Arc::clone(&self.shared.current)
    }

    /// One file is done (`done` files in all).
    pub fn file_done(&self, done: usize, o: &Outcome, path: &Path) {
        let size = std::fs::metadata(path).map_or(0, |m| m.len());
        self.shared.done_bytes.fetch_add(size, Ordering::Relaxed);
        self.shared.current.store(0, Ordering::Relaxed);
        self.shared.done_files.store(done as u64, Ordering::Relaxed);
        if self.quiet {
            return;
        }
        if let Some(bar) = &self.bar {
            bar.set_prefix(format!("{done}/{}", self.total_files));
            bar.set_position(self.shared.done_bytes.load(Ordering::Relaxed));
            bar.set_message(format!("{}: {}", o.name, o.status.name()));
        } else if !self.terminal {
            eprintln!(
                "{} mzsift: {}: {} ({done}/{} files, {:.1} s)",
                utc(SystemTime::now()),
                o.path,
                o.status.name(),
                self.total_files,
                o.seconds
            );
        }
    }

    /// Stops the display (the bar stays on screen in its final state).
    pub fn finish(mut self) {
        self.shared.stop.store(true, Ordering::Relaxed);
        if let Some(h) = self.ticker.take() {
            h.thread().unpark();
            let _ = h.join();
        }
        if let Some(bar) = &self.bar {
            bar.set_position(self.total_bytes);
            bar.finish();
        }
    }
}

/// The ticker: updates the bar, or prints a line every `every`, until told to stop.
fn tick(
    shared: &Shared,
    bar: Option<&ProgressBar>,
    every: Duration,
    total_files: usize,
    total_bytes: u64,
    started: Instant,
) {
    let mut next = Instant::now() + every;
    while !shared.stop.load(Ordering::Relaxed) {
        std::thread::park_timeout(next.saturating_duration_since(Instant::now()));
        if shared.stop.load(Ordering::Relaxed) {
            return;
        }
        if Instant::now() < next {
            continue;
        }
        next += every;
        let current = shared.current.load(Ordering::Relaxed);
        let done = shared.done_bytes.load(Ordering::Relaxed) + current;
        let (name, size) = shared.file.lock().expect("not poisoned").clone();
        if let Some(bar) = bar {
            bar.set_position(done.min(total_bytes));
            bar.set_message(format!(
                "{name}: {:.1} of {:.1} MB",
                current as f64 / MB,
                size as f64 / MB
            ));
            continue;
        }
        let seconds = started.elapsed().as_secs_f64().max(1e-9);
        let rate = done as f64 / seconds;
        let eta = if rate > 0.0 { total_bytes.saturating_sub(done) as f64 / rate } else { 0.0 };
        eprintln!(
            "{} mzsift: {}/{total_files} files, {:.1} of {:.1} MB, {:.1} MB/s, ETA {eta:.0} s; {name}: {:.1} of {:.1} MB",
            utc(SystemTime::now()),
            shared.done_files.load(Ordering::Relaxed),
            done as f64 / MB,
            total_bytes as f64 / MB,
            rate / MB,
            current as f64 / MB,
            size as f64 / MB,
        );
    }
}
