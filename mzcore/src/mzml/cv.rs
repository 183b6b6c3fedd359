//! PSI-MS controlled-vocabulary accessions that the reader and writer use, with their names.
//!
//! Every `(accession, name)` pair here is checked against the PSI-MS CV (psi-ms.obo,
//! data-version 4.1.257; the subset in `shared/standards/psi-ms-subset.obo`) by `.ci/run`.
//! Units come from the Unit Ontology (UO).

/// A CV term: accession and name as in the ontology.
pub type Term = (&'static str, &'static str);

/// MS:1000511 ms level.
pub const MS_LEVEL: Term = ("MS:1000511", "ms level");
/// MS:1000127 centroid spectrum.
pub const CENTROID_SPECTRUM: Term = ("MS:1000127", "centroid spectrum");
/// MS:1000128 profile spectrum.
pub const PROFILE_SPECTRUM: Term = ("MS:1000128", "profile spectrum");
/// MS:1000130 positive scan.
pub const POSITIVE_SCAN: Term = ("MS:1000130", "positive scan");
/// MS:1000129 negative scan.
pub const NEGATIVE_SCAN: Term = ("MS:1000129", "negative scan");
/// MS:1000016 scan start time.
pub const SCAN_START_TIME: Term = ("MS:1000016", "scan start time");
/// MS:1000285 total ion current.
pub const TOTAL_ION_CURRENT: Term = ("MS:1000285", "total ion current");
/// MS:1000504 base peak m/z.
pub const BASE_PEAK_MZ: Term = ("MS:1000504", "base peak m/z");
/// MS:1000505 base peak intensity.
pub const BASE_PEAK_INTENSITY: Term = ("MS:1000505", "base peak intensity");
/// MS:1000744 selected ion m/z.
pub const SELECTED_ION_MZ: Term = ("MS:1000744", "selected ion m/z");
/// MS:1000041 charge state.
pub const CHARGE_STATE: Term = ("MS:1000041", "charge state");
/// MS:1000827 isolation window target m/z.
pub const ISOLATION_TARGET: Term = ("MS:1000827", "isolation window target m/z");
/// MS:1000828 isolation window lower offset.
pub const ISOLATION_LOWER: Term = ("MS:1000828", "isolation window lower offset");
/// MS:1000829 isolation window upper offset.
pub const ISOLATION_UPPER: Term = ("MS:1000829", "isolation window upper offset");
/// MS:1000514 m/z array.
pub const MZ_ARRAY: Term = ("MS:1000514", "m/z array");
/// MS:1000515 intensity array.
pub const INTENSITY_ARRAY: Term = ("MS:1000515", "intensity array");
/// MS:1000517 signal to noise array.
pub const SIGNAL_TO_NOISE_ARRAY: Term = ("MS:1000517", "signal to noise array");
/// MS:1002529 resolution array.
pub const RESOLUTION_ARRAY: Term = ("MS:1002529", "resolution array");
/// MS:1000595 time array.
pub const TIME_ARRAY: Term = ("MS:1000595", "time array");
/// MS:1000786 non-standard data array.
pub const NON_STANDARD_ARRAY: Term = ("MS:1000786", "non-standard data array");
/// MS:1000235 total ion current chromatogram.
pub const TIC_CHROMATOGRAM: Term = ("MS:1000235", "total ion current chromatogram");
/// MS:1000579 MS1 spectrum.
pub const MS1_SPECTRUM: Term = ("MS:1000579", "MS1 spectrum");
/// MS:1000580 MSn spectrum.
pub const MSN_SPECTRUM: Term = ("MS:1000580", "MSn spectrum");
/// MS:1000544 Conversion to mzML.
pub const CONVERSION_TO_MZML: Term = ("MS:1000544", "Conversion to mzML");
/// MS:1000569 SHA-1.
pub const SHA1: Term = ("MS:1000569", "SHA-1");
/// MS:1000133 collision-induced dissociation.
pub const CID: Term = ("MS:1000133", "collision-induced dissociation");
/// MS:1000045 collision energy.
pub const COLLISION_ENERGY: Term = ("MS:1000045", "collision energy");
/// MS:1000501 scan window lower limit.
pub const SCAN_WINDOW_LOWER: Term = ("MS:1000501", "scan window lower limit");
/// MS:1000500 scan window upper limit.
pub const SCAN_WINDOW_UPPER: Term = ("MS:1000500", "scan window upper limit");

/// MS:1000389 electron ionization.
pub const ELECTRON_IONIZATION: Term = ("MS:1000389", "electron ionization");
/// MS:1000073 electrospray ionization.
pub const ELECTROSPRAY_IONIZATION: Term = ("MS:1000073", "electrospray ionization");
/// MS:1000398 nanoelectrospray.
pub const NANOELECTROSPRAY: Term = ("MS:1000398", "nanoelectrospray");
/// MS:1000071 chemical ionization.
pub const CHEMICAL_IONIZATION: Term = ("MS:1000071", "chemical ionization");
/// MS:1000070 atmospheric pressure chemical ionization.
pub const APCI: Term = ("MS:1000070", "atmospheric pressure chemical ionization");
/// MS:1000382 atmospheric pressure photoionization.
pub const APPI: Term = ("MS:1000382", "atmospheric pressure photoionization");
/// MS:1000075 matrix-assisted laser desorption ionization.
pub const MALDI: Term = ("MS:1000075", "matrix-assisted laser desorption ionization");

/// Further direct children of MS:1000008 ionization type (read as "other ionization").
pub const OTHER_IONIZATION_TYPES: &[&str] = &[
    "MS:1000074",
    "MS:1000227",
    "MS:1000240",
    "MS:1000247",
    "MS:1000255",
    "MS:1000258",
    "MS:1000259",
    "MS:1000271",
    "MS:1000272",
    "MS:1000273",
    "MS:1000274",
    "MS:1000276",
    "MS:1000380",
    "MS:1000381",
    "MS:1000383",
    "MS:1000384",
    "MS:1000385",
    "MS:1000386",
    "MS:1000388",
    "MS:1000395",
    "MS:1000399",
    "MS:1000400",
    "MS:1000402",
    "MS:1000403",
    "MS:1000404",
    "MS:1000406",
    "MS:1000407",
    "MS:1000408",
    "MS:1000446",
    "MS:1003235",
    "MS:1003248",
    "MS:1003249",
];

/// UO:0000010 second.
pub const UO_SECOND: Term = ("UO:0000010", "second");
/// UO:0000031 minute.
pub const UO_MINUTE: Term = ("UO:0000031", "minute");
/// UO:0000032 hour.
pub const UO_HOUR: Term = ("UO:0000032", "hour");

/// Every MS term above with its name, for the cross-check against the ontology.
pub fn ms_terms() -> Vec<Term> {
    use crate::mzml::binary::{Compression, NumericType};
    let mut v = vec![
        MS_LEVEL,
        CENTROID_SPECTRUM,
        PROFILE_SPECTRUM,
        POSITIVE_SCAN,
        NEGATIVE_SCAN,
        SCAN_START_TIME,
        TOTAL_ION_CURRENT,
        BASE_PEAK_MZ,
        BASE_PEAK_INTENSITY,
        SELECTED_ION_MZ,
        CHARGE_STATE,
        ISOLATION_TARGET,
        ISOLATION_LOWER,
        ISOLATION_UPPER,
        MZ_ARRAY,
        INTENSITY_ARRAY,
        TIME_ARRAY,
        NON_STANDARD_ARRAY,
        TIC_CHROMATOGRAM,
        MS1_SPECTRUM,
        MSN_SPECTRUM,
        CONVERSION_TO_MZML,
        SHA1,
        CID,
        COLLISION_ENERGY,
        SCAN_WINDOW_LOWER,
        SCAN_WINDOW_UPPER,
        ELECTRON_IONIZATION,
        ELECTROSPRAY_IONIZATION,
        NANOELECTROSPRAY,
        CHEMICAL_IONIZATION,
        APCI,
        APPI,
        MALDI,
    ];
    v.extend(Compression::ALL.iter().map(|c| c.cv()));
    v.extend(
        [NumericType::F32, NumericType::F64, NumericType::I32, NumericType::I64].map(|t| t.cv()),
    );
    v
}
