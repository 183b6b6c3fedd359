//! The spectrum data model: metadata, still-encoded binary arrays, and decoded peaks.
//!
//! [`Spectrum`] is what the reader hands out: metadata plus [`EncodedArray`]s whose bytes are
//! still base64 text, so that decoding (base64, inflate, MS-Numpress) can run on worker
//! threads. [`Spectrum::decode`] turns it into [`Peaks`].

use serde::Serialize;

use crate::error::{Error, ErrorKind, Result};
use crate::mzml::binary::{self, BinaryEncoding};

/// Scan polarity (PSI-MS MS:1000130 positive scan, MS:1000129 negative scan).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Default, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum Polarity {
    /// Positive ions.
    Positive,
    /// Negative ions.
    Negative,
    /// Not stated in the file.
    #[default]
    Unknown,
}

impl Polarity {
    /// `+`, `-` or an empty string.
    pub fn symbol(self) -> &'static str {
        match self {
            Polarity::Positive => "+",
            Polarity::Negative => "-",
            Polarity::Unknown => "",
        }
    }
}

/// Spectrum representation (MS:1000127 centroid spectrum, MS:1000128 profile spectrum).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Default, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum Representation {
    /// Continuous (profile) data.
    Profile,
    /// Already centroided peaks.
    Centroid,
    /// Not stated in the file.
    #[default]
    Unknown,
}

impl Representation {
    /// `profile`, `centroid` or an empty string.
    pub fn name(self) -> &'static str {
        match self {
            Representation::Profile => "profile",
            Representation::Centroid => "centroid",
            Representation::Unknown => "",
        }
    }
}

/// Ionization type of the instrument configuration's source (children of MS:1000008).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Default, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum Ionization {
    /// MS:1000389 electron ionization.
    Electron,
    /// MS:1000071 chemical ionization.
    Chemical,
    /// MS:1000073 electrospray ionization.
    Electrospray,
    /// MS:1000070 atmospheric pressure chemical ionization.
    AtmosphericPressureChemical,
    /// MS:1000382 atmospheric pressure photoionization.
    AtmosphericPressurePhoto,
    /// MS:1000075 matrix-assisted laser desorption ionization.
    Maldi,
    /// Some other ionization type the file names.
    Other,
    /// Not stated in the file.
    #[default]
    Unknown,
}

impl Ionization {
    /// A short lower-case name for reports (`ei`, `esi`, ...; empty when unknown).
    pub fn name(self) -> &'static str {
        match self {
            Ionization::Electron => "ei",
            Ionization::Chemical => "ci",
            Ionization::Electrospray => "esi",
            Ionization::AtmosphericPressureChemical => "apci",
            Ionization::AtmosphericPressurePhoto => "appi",
            Ionization::Maldi => "maldi",
            Ionization::Other => "other",
            Ionization::Unknown => "",
        }
    }
}

/// One precursor of an MSn spectrum.
#[derive(Debug, Clone, Default, PartialEq, Serialize)]
pub struct Precursor {
    /// MS:1000744 selected ion m/z.
    pub selected_mz: Option<f64>,
    /// MS:1000041 charge state.
    pub charge: Option<i32>,
    /// MS:1000827 isolation window target m/z.
    pub isolation_target: Option<f64>,
    /// MS:1000828 isolation window lower offset.
    pub isolation_lower_offset: Option<f64>,
    /// MS:1000829 isolation window upper offset.
    pub isolation_upper_offset: Option<f64>,
}

/// What a binary data array holds.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize)]
pub enum ArrayKind {
    /// MS:1000514 m/z array.
    Mz,
    /// MS:1000515 intensity array.
    Intensity,
    /// MS:1000595 time array.
    Time,
    /// MS:1000517 signal to noise array (per peak of a centroid list).
    SignalToNoise,
    /// MS:1002529 resolution array (m/z over FWHM, per peak of a centroid list).
    Resolution,
}

/// One binary data array as stored in the file: base64 text not yet decoded.
#[derive(Debug, Clone, PartialEq)]
pub struct EncodedArray {
    /// What the array holds.
    pub kind: ArrayKind,
    /// Numeric type and compression.
    pub encoding: BinaryEncoding,
    /// Number of values (the array's `arrayLength`, else the spectrum's `defaultArrayLength`).
    pub length: usize,
    /// The base64 text with whitespace removed.
    pub base64: Vec<u8>,
    /// Byte offset of the `<binary>` element in the document.
    pub offset: u64,
}

impl EncodedArray {
    /// Decodes the array into `out` (cleared first), checking its declared length.
    pub fn decode_into(&self, out: &mut Vec<f64>) -> Result<()> {
        binary::decode_into(&self.base64, self.encoding, self.length, out)
            .map_err(|e| e.at_byte(self.offset))
    }
}

/// Metadata of one spectrum, independent of its arrays.
#[derive(Debug, Clone, Default, PartialEq, Serialize)]
pub struct SpectrumMeta {
    /// Zero-based position in the file (the `index` attribute).
    pub index: usize,
    /// Native id (the `id` attribute, as written).
    pub id: String,
    /// Byte offset of the `<spectrum` start tag in the (decompressed) document.
    pub offset: u64,
    /// MS:1000511 ms level.
    pub ms_level: u8,
    /// Scan polarity.
    pub polarity: Polarity,
    /// Profile or centroid.
    pub representation: Representation,
    /// MS:1000016 scan start time of the first scan, in minutes.
    pub rt_min: Option<f64>,
    /// MS:1000285 total ion current as stored in the file.
    pub stored_tic: Option<f64>,
    /// MS:1000504 base peak m/z as stored in the file.
    pub stored_base_peak_mz: Option<f64>,
    /// MS:1000505 base peak intensity as stored in the file.
    pub stored_base_peak_intensity: Option<f64>,
    /// Precursors (MSn spectra).
    pub precursors: Vec<Precursor>,
    /// Ionization type of the instrument configuration the scan used.
    pub ionization: Ionization,
    /// The spectrum's `defaultArrayLength`.
    pub default_array_length: usize,
    /// Names of binary arrays that were skipped (neither m/z nor intensity).
    pub skipped_arrays: Vec<String>,
}

/// A spectrum as read: metadata plus still-encoded arrays.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct Spectrum {
    /// Metadata.
    pub meta: SpectrumMeta,
    /// The m/z and intensity arrays as stored (possibly absent for empty spectra).
    pub arrays: Vec<EncodedArray>,
}

/// Decoded peaks (or profile points) of a spectrum: parallel m/z and intensity arrays.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct Peaks {
    /// m/z values.
    pub mz: Vec<f64>,
    /// Intensities, same length as `mz`.
    pub intensity: Vec<f64>,
}

impl Peaks {
    /// Number of points.
    pub fn len(&self) -> usize {
        self.mz.len()
    }

    /// True when there are no points.
    pub fn is_empty(&self) -> bool {
        self.mz.is_empty()
    }
}

impl Spectrum {
    /// The encoded array of the given kind, if present.
    pub fn array(&self, kind: ArrayKind) -> Option<&EncodedArray> {
        self.arrays.iter().find(|a| a.kind == kind)
    }

    /// Decodes the m/z and intensity arrays into `peaks`, reusing its capacity.
    ///
    /// A spectrum with `defaultArrayLength` 0 and no arrays decodes to empty peaks. An error
    /// names this spectrum and the byte offset of the bad array.
    pub fn decode_into(&self, peaks: &mut Peaks) -> Result<()> {
        let meta = &self.meta;
        let with_pos = |e: Error| e.in_spectrum(meta.index, &meta.id);
        match (self.array(ArrayKind::Mz), self.array(ArrayKind::Intensity)) {
            (Some(mz), Some(it)) => {
                mz.decode_into(&mut peaks.mz).map_err(|e| with_pos(e.in_field("m/z array")))?;
                it.decode_into(&mut peaks.intensity)
                    .map_err(|e| with_pos(e.in_field("intensity array")))?;
                if peaks.mz.len() != peaks.intensity.len() {
                    return Err(with_pos(Error::at(
                        ErrorKind::LengthMismatch {
                            what: "intensity array length vs m/z array length".into(),
                            declared: peaks.mz.len(),
                            found: peaks.intensity.len(),
                        },
                        crate::error::Position::at_byte(it.offset),
                    )));
                }
                Ok(())
            }
            (None, None) if meta.default_array_length == 0 => {
                peaks.mz.clear();
                peaks.intensity.clear();
                Ok(())
            }
            (mz, _) => {
                let missing = if mz.is_none() {
                    "m/z array (MS:1000514)"
                } else {
                    "intensity array (MS:1000515)"
                };
                Err(with_pos(Error::at(
                    ErrorKind::MissingCvParam(missing.into()),
                    crate::error::Position::at_byte(meta.offset),
                )))
            }
        }
    }

    /// Decodes the m/z and intensity arrays into new [`Peaks`].
    pub fn decode(&self) -> Result<Peaks> {
        let mut peaks = Peaks::default();
        self.decode_into(&mut peaks)?;
        Ok(peaks)
    }
}

/// A chromatogram's decoded points (used for the total-ion-current chromatogram).
#[derive(Debug, Clone, Default, PartialEq)]
pub struct Chromatogram {
    /// Native id.
    pub id: String,
    /// Time points in minutes.
    pub time_min: Vec<f64>,
    /// Intensities.
    pub intensity: Vec<f64>,
}
