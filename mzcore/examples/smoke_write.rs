//! Writes a tiny file to stdout (development aid).
use mzcore::mzml::{Writer, WriterOptions};
use mzcore::spectrum::{Peaks, Precursor, SpectrumMeta};
fn main() -> Result<(), mzcore::Error> {
    let indexed = std::env::args().nth(1).as_deref() != Some("plain");
    let mut w = Writer::new(
        std::io::stdout().lock(),
        WriterOptions { spectrum_count: 2, indexed, param_groups: true, ..Default::default() },
    )?;
    let m =
        SpectrumMeta { id: "scan=1".into(), ms_level: 1, rt_min: Some(1.5), ..Default::default() };
    w.write_spectrum(&m, &Peaks { mz: vec![100.0, 101.0], intensity: vec![5.0, 7.0] })?;
    let m = SpectrumMeta {
        id: "scan=2 tag=a&b<c>".into(),
        ms_level: 2,
        rt_min: Some(1.6),
        precursors: vec![Precursor {
            selected_mz: Some(100.0),
            charge: Some(1),
            isolation_target: Some(100.0),
            isolation_lower_offset: Some(0.5),
            isolation_upper_offset: Some(0.5),
        }],
        ..Default::default()
    };
    w.write_spectrum(&m, &Peaks { mz: vec![50.0], intensity: vec![3.0] })?;
    let _ = w.finish()?;
    Ok(())
}
