//! Resource limits: hostile inputs of hundreds of megabytes (or endless), generated lazily so
//! that the test itself holds only a few kilobytes of them, each get a clear `LimitExceeded`
//! (or length) error naming the limit, the spectrum and the byte offset, within bounded memory.
//!
//! One test runs every case in turn, so that the peak resident memory it measures for each
//! case (Linux `/proc/self/status` VmHWM, reset through `/proc/self/clear_refs`) belongs to
//! that case alone: this file must keep a single `#[test]`.

use std::cell::Cell;
use std::io::{BufRead, BufReader, Read};
use std::rc::Rc;

use mzcore::mzml::{Reader, ReaderOptions, Writer, WriterOptions};
use mzcore::spectrum::{Peaks, Spectrum, SpectrumMeta};
use mzcore::{Error, ErrorKind};

const MIB: u64 = 1 << 20;

/// A byte stream made of parts, each a chunk repeated a number of times, produced on demand.
/// `pulled` counts the bytes handed out, to show how far the reader read before stopping.
struct Lazy {
    parts: Vec<(Vec<u8>, u64)>,
    part: usize,
    done_reps: u64,
    offset: usize,
    pulled: Rc<Cell<u64>>,
}

impl Lazy {
    fn new(parts: Vec<(Vec<u8>, u64)>) -> (Self, Rc<Cell<u64>>) {
        let pulled = Rc::new(Cell::new(0));
        (Lazy { parts, part: 0, done_reps: 0, offset: 0, pulled: pulled.clone() }, pulled)
    }
}

impl Read for Lazy {
    fn read(&mut self, buf: &mut [u8]) -> std::io::Result<usize> {
        let mut n = 0;
        while n < buf.len() {
            let Some((chunk, reps)) = self.parts.get(self.part) else { break };
            if self.done_reps >= *reps || chunk.is_empty() {
                self.part += 1;
                self.done_reps = 0;
                self.offset = 0;
                continue;
            }
            let take = (chunk.len() - self.offset).min(buf.len() - n);
            buf[n..n + take].copy_from_slice(&chunk[self.offset..self.offset + take]);
            n += take;
            self.offset += take;
            if self.offset == chunk.len() {
                self.offset = 0;
                self.done_reps += 1;
            }
        }
        self.pulled.set(self.pulled.get() + n as u64);
        Ok(n)
    }
}

/// A three-spectrum document (ids `scan=1..3`, four points each, the writer's default
/// encodings: zlib-compressed 64-bit m/z and 32-bit intensities) from the library's writer.
fn document() -> String {
    let options = WriterOptions { spectrum_count: 3, indexed: false, ..Default::default() };
    let mut w = Writer::new(Vec::new(), options).unwrap();
    for i in 0..3 {
        let meta = SpectrumMeta {
            id: format!("scan={}", i + 1),
            ms_level: 1,
            rt_min: Some(i as f64),
            ..Default::default()
        };
        let peaks = Peaks { mz: vec![100.0, 101.0, 102.0, 103.0], intensity: vec![1.0; 4] };
        w.write_spectrum(&meta, &peaks).unwrap();
    }
    String::from_utf8(w.finish().unwrap()).unwrap()
}

/// Byte offset of the first `needle` inside spectrum 1 (`scan=2`) of `doc`.
fn in_second(doc: &str, needle: &str) -> usize {
    let s = doc.match_indices("<spectrum ").nth(1).unwrap().0;
    s + doc[s..].find(needle).unwrap_or_else(|| panic!("test setup: {needle:?} not in {doc}"))
}

/// `doc[..a]`, `doc[b..]` as bytes.
fn around(doc: &str, a: usize, b: usize) -> (Vec<u8>, Vec<u8>) {
    (doc.as_bytes()[..a].to_vec(), doc.as_bytes()[b..].to_vec())
}

/// The document split inside the first `<binary>` of spectrum 1, its text left out.
fn split_binary(doc: &str) -> (Vec<u8>, Vec<u8>) {
    let a = in_second(doc, "<binary>") + "<binary>".len();
    around(doc, a, in_second(doc, "</binary>"))
}

/// What the reader handed out: the first 1,000 results and the last one (ids of spectra read
/// and decoded, or errors), and how many there were.
struct Outcomes {
    kept: Vec<Result<String, Error>>,
    count: usize,
}

fn read_all<R: BufRead>(input: R, options: ReaderOptions) -> Outcomes {
    let mut r = Reader::with_options(input, options).unwrap();
    let mut s = Spectrum::default();
    let mut out = Outcomes { kept: Vec::new(), count: 0 };
    loop {
        let one = match r.read_spectrum(&mut s) {
            Ok(false) => return out,
            Ok(true) => s.decode().map(|_| s.meta.id.clone()),
            Err(e) => Err(e),
        };
        out.count += 1;
        if out.kept.len() == 1_001 {
            out.kept.pop();
        }
        out.kept.push(one);
        assert!(out.count < 10_000_000, "reader does not stop");
    }
}

/// Peak resident memory in KiB since the last reset (`None` where Linux procfs is missing).
fn peak_kib() -> Option<u64> {
    let status = std::fs::read_to_string("/proc/self/status").ok()?;
    let line = status.lines().find(|l| l.starts_with("VmHWM:"))?;
    line.split_whitespace().nth(1)?.parse().ok()
}

fn current_kib() -> Option<u64> {
    let status = std::fs::read_to_string("/proc/self/status").ok()?;
    let line = status.lines().find(|l| l.starts_with("VmRSS:"))?;
    line.split_whitespace().nth(1)?.parse().ok()
}

/// Resets the peak to the current resident size (Linux 4.0+, `clear_refs` value 5).
fn reset_peak() -> bool {
    std::fs::write("/proc/self/clear_refs", "5").is_ok()
}

/// Checks the outcomes of a case, given the bytes of input the reader pulled.
type Check = Box<dyn Fn(&[Result<String, Error>], u64)>;

/// One hostile input and what must come of it.
struct Case {
    name: &'static str,
    parts: Vec<(Vec<u8>, u64)>,
    gzip: bool,
    options: ReaderOptions,
    check: Check,
}

fn limit_error<'a>(name: &str, o: &'a [Result<String, Error>], option: &str) -> &'a Error {
    let e = o
        .iter()
        .filter_map(|r| r.as_ref().err())
        .find(|e| matches!(e.kind(), ErrorKind::LimitExceeded { .. }))
        .unwrap_or_else(|| panic!("{name}: no LimitExceeded error in {o:?}"));
    let text = e.to_string();
    assert!(text.contains(option), "{name}: error does not name {option}: {text}");
    assert!(e.position().byte_offset.is_some(), "{name}: no byte offset: {text}");
    e
}

fn in_second_spectrum(name: &str, e: &Error) {
    let p = e.position();
    assert_eq!(p.spectrum_index, Some(1), "{name}: {e}");
    assert_eq!(p.spectrum_id.as_deref(), Some("scan=2"), "{name}: {e}");
}

/// Start of spectrum 1 (`scan=2`) in `doc`.
fn s1_at(doc: &str) -> usize {
    doc.match_indices("<spectrum ").nth(1).unwrap().0
}

/// Asserts the error names the spectrum at position 1 (the first deep one, id `deep`).
fn in_second_spectrum_or_deep(name: &str, e: &Error) {
    let p = e.position();
    assert_eq!(p.spectrum_id.as_deref(), Some("deep"), "{name}: {e}");
    assert!(p.byte_offset.is_some(), "{name}: {e}");
}

fn ids(o: &[Result<String, Error>]) -> Vec<&str> {
    o.iter().filter_map(|r| r.as_ref().ok().map(String::as_str)).collect()
}

const PARAM: &[u8] =
    b"<cvParam cvRef=\"MS\" accession=\"MS:1000130\" name=\"positive scan\" value=\"\"/>";

fn case(
    name: &'static str,
    parts: Vec<(Vec<u8>, u64)>,
    options: ReaderOptions,
    check: impl Fn(&str, &[Result<String, Error>], u64) + 'static,
) -> Case {
    Case { name, parts, gzip: false, options, check: Box::new(move |o, n| check(name, o, n)) }
}

fn cases() -> Vec<Case> {
    let doc = document();
    let small = ReaderOptions::default().max_event_bytes(4 * MIB).max_spectrum_bytes(4 * MIB);
    let mut cases = Vec::new();

    // A <binary> of 300 MB in one run of text: fatal (the tokenizer cannot step over it).
    let (pre, post) = split_binary(&doc);
    let chunks = 300 * MIB / (1 << 16);
    cases.push(case(
        "binary of 300 MB",
        vec![(pre, 1), (vec![b'A'; 1 << 16], chunks), (post, 1)],
        small,
        |name, o, pulled| {
            in_second_spectrum(name, limit_error(name, o, "max_event_bytes"));
            assert_eq!(ids(o), ["scan=1"], "{name}: fatal, nothing after it is trusted");
            assert!(pulled < 8 * MIB, "{name}: read {pulled} bytes before stopping");
        },
    ));

    // 64 MB of array text split into small runs by comments: every event is small, the array
    // is not. Costs that spectrum only.
    let (pre, post) = split_binary(&doc);
    cases.push(case(
        "binary split by comments",
        vec![(pre, 1), (b"AAAAAAAA<!-- -->".to_vec(), 64 * MIB / 16), (post, 1)],
        small,
        |name, o, _| {
            in_second_spectrum(name, limit_error(name, o, "max_spectrum_bytes"));
            assert_eq!(ids(o), ["scan=1", "scan=3"], "{name}: the other spectra are read");
        },
    ));

    // Declared lengths of billions: refused without allocating, one spectrum lost.
    let a = in_second(&doc, "defaultArrayLength=\"4\"");
    let (pre, post) = around(&doc, a, a + "defaultArrayLength=\"4\"".len());
    cases.push(case(
        "arrayLength of billions",
        vec![(pre, 1), (b"defaultArrayLength=\"4000000000\"".to_vec(), 1), (post, 1)],
        ReaderOptions::default(),
        |name, o, _| {
            in_second_spectrum(name, limit_error(name, o, "max_array_length"));
            assert_eq!(ids(o), ["scan=1", "scan=3"], "{name}");
        },
    ));
    let a = in_second(&doc, "encodedLength=\"");
    let value = a + "encodedLength=\"".len();
    let b = value + doc[value..].find('"').unwrap() + 1;
    let (pre, post) = around(&doc, a, b);
    cases.push(case(
        "encodedLength of billions",
        vec![(pre, 1), (b"encodedLength=\"4000000000\"".to_vec(), 1), (post, 1)],
        ReaderOptions::default(),
        |name, o, _| {
            let e = o.iter().find_map(|r| r.as_ref().err()).expect("an error");
            in_second_spectrum(name, e);
            let ok = matches!(e.kind(), ErrorKind::LengthMismatch { declared: 4_000_000_000, .. });
            assert!(ok, "{name}: {e}");
            assert_eq!(ids(o), ["scan=1", "scan=3"], "{name}");
        },
    ));

    // Nesting ten million deep inside a spectrum (30 MB of `<a>`), never closed: the
    // spectrum's ceiling, then the document's.
    let (pre, _) = split_binary(&doc);
    cases.push(case(
        "deep nesting in a spectrum",
        vec![(pre, 1), (b"<a>".to_vec(), 10_000_000)],
        ReaderOptions::default(),
        |name, o, pulled| {
            in_second_spectrum(name, limit_error(name, o, "max_depth"));
            let last = o.last().unwrap().as_ref().unwrap_err();
            assert!(matches!(last.kind(), ErrorKind::LimitExceeded { .. }), "{name}: {last}");
            assert_eq!(ids(o), ["scan=1"], "{name}");
            assert!(pulled < MIB, "{name}: read {pulled} bytes before stopping");
        },
    ));

    // Spectra that each nest just beyond the ceiling, repeated: stepping over each would
    // leave its open elements with the tokenizer, so the first one ends the document.
    let mut deep = b"<spectrum index=\"9\" id=\"deep\" defaultArrayLength=\"0\">".to_vec();
    deep.extend(b"<a>".repeat(70));
    cases.push(case(
        "repeated deep spectra",
        vec![(doc.as_bytes()[..s1_at(&doc)].to_vec(), 1), (deep, 300_000)],
        ReaderOptions::default(),
        |name, o, pulled| {
            in_second_spectrum_or_deep(name, limit_error(name, o, "max_depth"));
            assert_eq!(ids(o), ["scan=1"], "{name}");
            assert_eq!(o.len(), 2, "{name}: fatal");
            assert!(pulled < MIB, "{name}: read {pulled} bytes before stopping");
        },
    ));

    // Nesting in the header, before any spectrum.
    let run = doc.find("<run ").unwrap();
    cases.push(case(
        "deep nesting in the header",
        vec![(doc.as_bytes()[..run].to_vec(), 1), (b"<a>".to_vec(), 10_000_000)],
        ReaderOptions::default(),
        |name, o, pulled| {
            assert_eq!(o.len(), 1, "{name}: one fatal error");
            limit_error(name, o, "max_depth");
            assert!(pulled < MIB, "{name}: read {pulled} bytes before stopping");
        },
    ));

    // An element that never ends: endless empty elements inside a spectrum (a finite 44 MB
    // here, as the rest is stepped over at the document level).
    let (pre, _) = split_binary(&doc);
    cases.push(case(
        "endless elements in a spectrum",
        vec![(pre, 1), (b"<userParam name=\"x\"/>".to_vec(), 2_000_000)],
        ReaderOptions::default().max_elements(10_000),
        |name, o, _| in_second_spectrum(name, limit_error(name, o, "max_elements")),
    ));

    // An element that never ends: endless text.
    let (pre, _) = split_binary(&doc);
    cases.push(case(
        "endless text",
        vec![(pre, 1), (vec![b' '; 1 << 16], u64::MAX)],
        small,
        |name, o, pulled| {
            in_second_spectrum(name, limit_error(name, o, "max_event_bytes"));
            assert!(pulled < 8 * MIB, "{name}: read {pulled} bytes before stopping");
        },
    ));

    // A huge attribute value: one start tag of 300 MB.
    let a = in_second(&doc, "<binaryDataArray ") + "<binaryDataArray ".len();
    let (pre, post) = around(&doc, a, a);
    cases.push(case(
        "attribute of 300 MB",
        vec![(pre, 1), (b"note=\"".to_vec(), 1), (vec![b'x'; 1 << 16], chunks), (post, 1)],
        small,
        |name, o, pulled| {
            limit_error(name, o, "max_event_bytes");
            assert!(pulled < 8 * MIB, "{name}: read {pulled} bytes before stopping");
        },
    ));

    // A million cvParams in one spectrum.
    let a = in_second(&doc, "<binaryDataArrayList");
    let (pre, post) = around(&doc, a, a);
    cases.push(case(
        "a million cvParams in a spectrum",
        vec![(pre, 1), (PARAM.to_vec(), 1_000_000), (post, 1)],
        ReaderOptions::default(),
        |name, o, _| {
            in_second_spectrum(name, limit_error(name, o, "max_elements"));
            assert_eq!(ids(o), ["scan=1", "scan=3"], "{name}");
        },
    ));

    // A param group of 50,000 cvParams referenced 1,000 times by one spectrum: 50 million
    // applications from 40 kB of references.
    let open = b"<referenceableParamGroupList count=\"1\"><referenceableParamGroup id=\"big\">";
    let close = b"</referenceableParamGroup></referenceableParamGroupList>";
    let s1 = doc.match_indices("<spectrum ").nth(1).unwrap().0;
    let s1_body = s1 + doc[s1..].find('>').unwrap() + 1;
    let with = |group: u64, refs: u64| {
        vec![
            ([&doc.as_bytes()[..run], &open[..]].concat(), 1),
            (PARAM.to_vec(), group),
            ([&close[..], &doc.as_bytes()[run..s1_body]].concat(), 1),
            (b"<referenceableParamGroupRef ref=\"big\"/>".to_vec(), refs),
            (doc.as_bytes()[s1_body..].to_vec(), 1),
        ]
    };
    cases.push(case(
        "param group referenced a thousand times",
        with(50_000, 1_000),
        ReaderOptions::default(),
        |name, o, _| {
            in_second_spectrum(name, limit_error(name, o, "max_elements"));
            assert_eq!(ids(o), ["scan=1", "scan=3"], "{name}");
        },
    ));
    cases.push(case(
        "a million cvParams in a param group",
        with(1_000_000, 1),
        ReaderOptions::default(),
        |name, o, _| {
            assert_eq!(o.len(), 1, "{name}: one fatal error");
            let e = limit_error(name, o, "max_elements");
            assert!(e.to_string().contains("'big'"), "{name}: names the group: {e}");
        },
    ));

    // A zlib bomb in one array: 200 MB of zeros compressed to about 200 kB, declared as four
    // values. Decoding fails without inflating it.
    let (pre, post) = split_binary(&doc);
    let array = &pre[pre.len() - 400..];
    assert!(array.windows(10).any(|w| w == b"MS:1000574"), "test setup: a zlib array");
    let mut compressed = Vec::new();
    flate2::read::ZlibEncoder::new(std::io::repeat(0).take(200 * MIB), Default::default())
        .read_to_end(&mut compressed)
        .unwrap();
    use base64::Engine;
    let b64 = base64::engine::general_purpose::STANDARD.encode(&compressed);
    let pre = String::from_utf8(pre).unwrap();
    let (head, tail) = pre.rsplit_once("encodedLength=\"").unwrap();
    let tail = &tail[tail.find('"').unwrap()..];
    let pre = format!("{head}encodedLength=\"{}{tail}", b64.len()).into_bytes();
    cases.push(case(
        "zlib bomb in an array",
        vec![(pre, 1), (b64.into_bytes(), 1), (post, 1)],
        ReaderOptions::default(),
        |name, o, _| {
            let e = o.iter().find_map(|r| r.as_ref().err()).expect("an error");
            assert!(matches!(e.kind(), ErrorKind::Inflate(_)), "{name}: {e}");
            assert!(e.to_string().contains("declared array length"), "{name}: {e}");
            assert_eq!(ids(o), ["scan=1", "scan=3"], "{name}");
        },
    ));

    // A gzip bomb: the same spectrum repeated without end, gzip-compressed on the fly at the
    // default level (about 160 times smaller).
    let s0 = doc.find("<spectrum ").unwrap();
    let s0_end = s1;
    let mut bomb = case(
        "gzip bomb",
        vec![(doc.as_bytes()[..s0].to_vec(), 1), (doc.as_bytes()[s0..s0_end].to_vec(), u64::MAX)],
        ReaderOptions::default(),
        |name, o, pulled| {
            let e = limit_error(name, o, "max_gzip_ratio");
            assert!(matches!(o.last(), Some(Err(last)) if last.to_string() == e.to_string()));
            // 64 MiB decompressed before the ratio is checked, read in 256 KiB steps.
            assert!(pulled < 80 * MIB, "{name}: inflated {pulled} bytes before stopping");
        },
    );
    bomb.gzip = true;
    cases.push(bomb);
    cases
}

#[test]
fn every_hostile_input_gets_a_clear_error_in_bounded_memory() {
    let measure = reset_peak() && peak_kib().is_some();
    if !measure {
        println!("peak memory not measured: /proc/self/clear_refs is not writable here");
    }
    for case in cases() {
        let (lazy, pulled) = Lazy::new(case.parts);
        let before = current_kib().unwrap_or(0);
        if measure {
            assert!(reset_peak());
        }
        let t0 = std::time::Instant::now();
        let o = if case.gzip {
            let gz = flate2::read::GzEncoder::new(lazy, flate2::Compression::default());
            read_all(BufReader::new(gz), case.options)
        } else {
            read_all(BufReader::new(lazy), case.options)
        };
        (case.check)(&o.kept, pulled.get());
        let grew = if measure { peak_kib().unwrap().saturating_sub(before) / 1024 } else { 0 };
        println!(
            "{}: {} results, {} bytes read, peak memory +{grew} MiB, {:.2} s",
            case.name,
            o.count,
            pulled.get(),
            t0.elapsed().as_secs_f64()
        );
        assert!(grew < 64, "{}: peak memory grew by {grew} MiB", case.name);
    }
}
