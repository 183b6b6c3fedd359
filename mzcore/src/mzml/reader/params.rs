//! Header context (referenceable parameter groups, instrument configurations) and the
//! helpers that read cvParam attributes.

use std::borrow::Cow;
use std::collections::HashMap;

use quick_xml::events::BytesStart;

use crate::error::{Error, ErrorKind, Result};
use crate::mzml::cv;
use crate::spectrum::Ionization;

/// A cvParam kept from a `referenceableParamGroup` (mzML 1.1.0, section 5.3.3).
#[derive(Debug, Clone, Default, PartialEq)]
pub(crate) struct OwnedParam {
    pub accession: String,
    pub name: String,
    pub value: String,
    pub unit: String,
}

/// What the document says before its spectra, needed to interpret each spectrum.
#[derive(Debug, Clone, Default)]
pub(crate) struct Header {
    /// `referenceableParamGroup` id to its cvParams.
    pub param_groups: HashMap<String, Vec<OwnedParam>>,
    /// `instrumentConfiguration` id to the ionization type of its source.
    pub ionization_by_config: HashMap<String, Ionization>,
    /// The run's `defaultInstrumentConfigurationRef`.
    pub default_config: Option<String>,
    /// The XML declaration names ISO-8859-1 (Latin-1) rather than UTF-8.
    pub latin1: bool,
    /// The root element is `indexedmzML`.
    pub indexed: bool,
    /// `count` of the `spectrumList`.
    pub declared_spectra: Option<usize>,
    /// The run's `id`.
    pub run_id: Option<String>,
}

impl Header {
    /// Ionization for a scan's `instrumentConfigurationRef` (or the run's default).
    pub fn ionization(&self, config_ref: Option<&str>) -> Ionization {
        config_ref
            .or(self.default_config.as_deref())
            .and_then(|id| self.ionization_by_config.get(id).copied())
            .unwrap_or_default()
    }
}

/// The ionization type named by a CV accession, if it is one (children of MS:1000008).
pub(crate) fn ionization_from_accession(acc: &[u8]) -> Option<Ionization> {
    let acc = std::str::from_utf8(acc).ok()?;
    Some(match acc {
        a if a == cv::ELECTRON_IONIZATION.0 => Ionization::Electron,
        a if a == cv::ELECTROSPRAY_IONIZATION.0 || a == cv::NANOELECTROSPRAY.0 => {
            Ionization::Electrospray
        }
        a if a == cv::CHEMICAL_IONIZATION.0 => Ionization::Chemical,
        a if a == cv::APCI.0 => Ionization::AtmosphericPressureChemical,
        a if a == cv::APPI.0 => Ionization::AtmosphericPressurePhoto,
        a if a == cv::MALDI.0 => Ionization::Maldi,
        a if cv::OTHER_IONIZATION_TYPES.contains(&a) => Ionization::Other,
        _ => return None,
    })
}

/// Decodes raw attribute bytes (UTF-8 or Latin-1) and expands XML entity references.
pub(crate) fn text(raw: &[u8], latin1: bool) -> Result<Cow<'_, str>> {
    let decoded: Cow<'_, str> = if latin1 && !raw.is_ascii() {
        Cow::Owned(raw.iter().map(|&b| b as char).collect())
    } else {
        match std::str::from_utf8(raw) {
            Ok(s) => Cow::Borrowed(s),
            Err(e) => {
                return Err(Error::new(ErrorKind::Xml(format!("invalid UTF-8 in text: {e}"))));
            }
        }
    };
    if !decoded.contains('&') {
        return Ok(decoded);
    }
    quick_xml::escape::unescape(&decoded)
        .map(|c| Cow::Owned(c.into_owned()))
        .map_err(|e| Error::new(ErrorKind::Xml(format!("bad entity reference: {e}"))))
}

/// The raw bytes of an attribute, if present.
pub(crate) fn raw_attr<'a>(e: &'a BytesStart<'_>, name: &[u8]) -> Result<Option<Cow<'a, [u8]>>> {
    for a in e.attributes().with_checks(false) {
        let a = a.map_err(|err| Error::new(ErrorKind::Xml(format!("bad attribute: {err}"))))?;
        if a.key.local_name().as_ref() == name {
            return Ok(Some(a.value));
        }
    }
    Ok(None)
}

/// An attribute as text, if present.
pub(crate) fn attr(e: &BytesStart<'_>, name: &[u8], latin1: bool) -> Result<Option<String>> {
    match raw_attr(e, name)? {
        Some(v) => Ok(Some(text(&v, latin1)?.into_owned())),
        None => Ok(None),
    }
}

/// A required attribute parsed as a number.
pub(crate) fn num_attr<T: std::str::FromStr>(e: &BytesStart<'_>, name: &[u8]) -> Result<Option<T>> {
    match raw_attr(e, name)? {
        None => Ok(None),
        Some(v) => {
            let s = std::str::from_utf8(&v).unwrap_or("").trim();
            s.parse::<T>().map(Some).map_err(|_| {
                Error::new(ErrorKind::InvalidValue {
                    field: format!("attribute '{}'", String::from_utf8_lossy(name)),
                    value: shorten(&String::from_utf8_lossy(&v)),
                })
            })
        }
    }
}

/// Parses a cvParam `value` as a number, naming the accession on failure.
pub(crate) fn num_value<T: std::str::FromStr>(value: &[u8], accession: &[u8]) -> Result<T> {
    let s = std::str::from_utf8(value).unwrap_or("").trim();
    s.parse::<T>().map_err(|_| {
        Error::new(ErrorKind::InvalidValue {
            field: format!("value of {}", String::from_utf8_lossy(accession)),
            value: shorten(&String::from_utf8_lossy(value)),
        })
    })
}

/// The attributes of a cvParam, borrowed from the event.
pub(crate) struct CvParam<'a> {
    pub accession: Cow<'a, [u8]>,
    pub name: Cow<'a, [u8]>,
    pub value: Cow<'a, [u8]>,
    pub unit: Cow<'a, [u8]>,
}

impl<'a> CvParam<'a> {
    /// Reads the attributes of a `cvParam` element.
    pub(crate) fn from_element(e: &'a BytesStart<'_>) -> Result<Self> {
        let mut p = CvParam {
            accession: Cow::Borrowed(b""),
            name: Cow::Borrowed(b""),
            value: Cow::Borrowed(b""),
            unit: Cow::Borrowed(b""),
        };
        for a in e.attributes().with_checks(false) {
            let a = a.map_err(|err| Error::new(ErrorKind::Xml(format!("bad attribute: {err}"))))?;
            match a.key.local_name().as_ref() {
                b"accession" => p.accession = a.value,
                b"name" => p.name = a.value,
                b"value" => p.value = a.value,
                b"unitAccession" => p.unit = a.value,
                _ => {}
            }
        }
        if p.accession.is_empty() {
            return Err(Error::new(ErrorKind::MissingAttribute {
                element: "cvParam".into(),
                attribute: "accession".into(),
            }));
        }
        Ok(p)
    }

    /// Borrows an owned parameter from a parameter group.
    pub(crate) fn from_owned(p: &'a OwnedParam) -> Self {
        CvParam {
            accession: Cow::Borrowed(p.accession.as_bytes()),
            name: Cow::Borrowed(p.name.as_bytes()),
            value: Cow::Borrowed(p.value.as_bytes()),
            unit: Cow::Borrowed(p.unit.as_bytes()),
        }
    }

    /// An owned copy, for storing in a parameter group.
    pub(crate) fn to_owned_param(&self, latin1: bool) -> Result<OwnedParam> {
        Ok(OwnedParam {
            accession: text(&self.accession, latin1)?.into_owned(),
            name: text(&self.name, latin1)?.into_owned(),
            value: text(&self.value, latin1)?.into_owned(),
            unit: text(&self.unit, latin1)?.into_owned(),
        })
    }

    /// True when the accession is `term`'s.
    pub(crate) fn is(&self, term: cv::Term) -> bool {
        self.accession.as_ref() == term.0.as_bytes()
    }
}

/// Shortens a value for an error message.
pub(crate) fn shorten(s: &str) -> String {
    if s.chars().count() <= 40 {
        s.to_owned()
    } else {
        s.chars().take(40).collect::<String>() + "…"
    }
}
