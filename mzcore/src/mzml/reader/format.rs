//! What an input is, when it is not mzML 1.1: told from its root element (name, namespace,
//! `version`) or its first bytes, so that a file of another format fails once, with one line
//! saying what it is and what to do, instead of once per spectrum.
//!
//! Namespaces and versions, from memory of the formats' published schemas:
//! - mzML 1.1 (HUPO-PSI): namespace `http://psi.hupo.org/ms/mzml`, `version="1.1.0"` (the
//!   1.1.0 XSDs in the shared standards confirm the namespace);
//! - mzML 1.0.0: namespace `http://psi.hupo.org/schema_revision/mzML_1.0.0`, `version="1.0.0"`;
//! - pre-release drafts 0.9x (0.91, 0.93, 0.99.0, 0.99.1 ...): namespace
//!   `http://psi.hupo.org/schema_revision/mzML_0.99.1` and the like, `version` `0.9x`;
//! - mzXML (Institute for Systems Biology): root `<mzXML>`, namespace
//!   `http://sashimi.sourceforge.net/schema_revision/mzXML_3.2` (2.x, 3.x);
//! - mzData (HUPO-PSI, before mzML): root `<mzData version="1.05">`.

use quick_xml::events::BytesStart;

use crate::error::ErrorKind;

const ADVICE: &str = "convert to mzML 1.1";

fn attr(e: &BytesStart<'_>, key: &[u8]) -> Option<String> {
    e.attributes().flatten().find(|a| a.key.as_ref() == key).map(|a| {
        let v = a.unescape_value().map(|v| v.into_owned());
        v.unwrap_or_else(|_| String::from_utf8_lossy(&a.value).into_owned())
    })
}

/// The namespace of an element: its default `xmlns` or that of its own prefix.
fn namespace(e: &BytesStart<'_>) -> Option<String> {
    let name = e.name();
    let prefix = name.prefix().map(|p| p.as_ref().to_vec());
    let key = match prefix {
        Some(p) => [b"xmlns:".as_slice(), &p].concat(),
        None => b"xmlns".to_vec(),
    };
    attr(e, &key)
}

/// The version a schema-revision namespace names (`.../mzML_0.99.1` gives `0.99.1`).
fn namespace_version(ns: &str, stem: &str) -> Option<String> {
    let at = ns.rfind(stem)? + stem.len();
    let v: String = ns[at..].chars().take_while(|c| c.is_ascii_digit() || *c == '.').collect();
    (!v.is_empty()).then_some(v)
}

/// `Some(error)` when the root (or the `<mzML>` inside `<indexedmzML>`) is not mzML 1.1.
pub(crate) fn unsupported(local: &[u8], e: &BytesStart<'_>) -> Option<ErrorKind> {
    let ns = namespace(e).unwrap_or_default();
    let version = attr(e, b"version");
    let say = |s: String| Some(ErrorKind::UnsupportedFormat(s));
    match local {
        b"mzML" | b"indexedmzML" => {
            let v = namespace_version(&ns, "mzML_")
                .or_else(|| if local == b"mzML" { version.clone() } else { None })?;
            if v.starts_with("0.") {
                say(format!("mzML {v} is a pre-release draft; {ADVICE}"))
            } else if v.starts_with("1.0") {
                say(format!(
                    "mzML {v} is not read (1.0 keeps scan and precursor terms in \
                     <spectrumDescription>, which mzML 1.1 replaced); {ADVICE}"
                ))
            } else if v.starts_with("1.") {
                None
            } else {
                say(format!("mzML version {v} is not known to this reader; {ADVICE}"))
            }
        }
        b"mzXML" | b"msRun" => {
            let v = namespace_version(&ns, "mzXML_").map(|v| format!(" {v}")).unwrap_or_default();
            say(format!("mzXML{v} is not read (another format than mzML); {ADVICE}"))
        }
        b"mzData" => {
            let v = version.map(|v| format!(" {v}")).unwrap_or_default();
            say(format!("mzData{v} is not read (the format mzML replaced); {ADVICE}"))
        }
        _ => None,
    }
}

/// The error for input whose first bytes are not markup: named as binary or as text.
pub(crate) fn not_xml(head: &[u8]) -> ErrorKind {
    let head = &head[..head.len().min(16)];
    let binary = head.iter().any(|&b| b < 0x09 || (0x0e..0x20).contains(&b) || b == 0x7f);
    let shown = if binary {
        let hex: Vec<String> = head.iter().map(|b| format!("{b:02X}")).collect();
        format!("binary data (first bytes {})", hex.join(" "))
    } else {
        let text = String::from_utf8_lossy(head);
        format!("text that is not XML (starts '{}')", text.trim().escape_default())
    };
    ErrorKind::UnsupportedFormat(format!("not an XML document: {shown}; {ADVICE}"))
}

/// The error for markup the tokenizer cannot read before any root element.
pub(crate) fn unreadable_markup(e: &quick_xml::Error) -> ErrorKind {
    ErrorKind::UnsupportedFormat(format!("not an XML document ({e}); {ADVICE}"))
}
