//! The lines of a bundle: one JSON object per line, in one canonical form (docs/bundle-format.md).
//! A line is read back only if writing it again gives the same bytes and the ledger value it
//! holds gives the same line, so a bundle has exactly one spelling of its content.

use crate::ledger::canonical::{
    encode_feedstock, encode_project, encode_reconciliation, encode_setting, encode_signature_row,
    encode_site,
};
use crate::ledger::feedstock::Feedstock;
use crate::ledger::hash::leaf_hash;
use crate::ledger::period::parse_date;
use crate::ledger::reconciliation::{Recorded, RecordedLine, RecordedYear};
use crate::ledger::setting::{Setting, SettingName};
use crate::ledger::signature::{Role, Signed, Statement, hex};
use crate::ledger::{
    Entry, EntryKind, Evidence, Hash, Method, Period, Project, Reading, SealedEntry, Sign, Site,
    SiteKind,
};
use crate::quantity::Mass;
use chrono::{DateTime, Utc};
use serde::{Deserialize, Serialize};

/// The format's name in the header line.
pub const FORMAT: &str = "sinkbook-bundle";
/// The version this build writes. Version 2 added the reconciliation lines; a version 1
/// bundle (which has none) is still read.
pub const VERSION: u32 = 2;
/// The versions this build reads.
pub const READS: [u32; 2] = [1, 2];

/// Pairs of text, as readings and analyses keep them.
type Pairs = Vec<(String, String)>;

/// One line of a bundle. Field order here is the order on the line.
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
#[serde(tag = "type", rename_all = "snake_case", deny_unknown_fields)]
pub enum Line {
    Header {
        format: String,
        version: u32,
        project: String,
        /// The seqs of the project's seal entries, ascending.
        seals: Vec<u64>,
    },
    Project {
        code: String,
        name: String,
        method: String,
        operator: String,
        permit_ref: Option<String>,
        permit_capacity_g: Option<i64>,
        permit_annual_g: Option<i64>,
        registered_at: String,
        row_hash: String,
    },
    Site {
        code: String,
        kind: String,
        area: Option<String>,
        uncertainty: Option<String>,
        registered_at: String,
        row_hash: String,
    },
    Setting {
        seq: u64,
        name: String,
        value: String,
        recorded_at: String,
        row_hash: String,
        /// The day it takes effect; absent for settings recorded before they had one.
        #[serde(default, skip_serializing_if = "Option::is_none")]
        effective_from: Option<String>,
        /// Where the value comes from; absent where none was given.
        #[serde(default, skip_serializing_if = "Option::is_none")]
        source: Option<String>,
    },
    Feedstock {
        code: String,
        oxides: Pairs,
        oxide_unit: String,
        elements: Pairs,
        element_unit: String,
        density: String,
        d80: Option<String>,
        registered_at: String,
        row_hash: String,
    },
    /// An imported file; the parts of its bytes follow it.
    Import {
        file_name: String,
        file_sha256: String,
        kind: String,
        row_count: i64,
        columns_map: String,
        density: String,
        byte_count: i64,
        imported_at: String,
    },
    /// One part of an imported file's bytes, as lowercase hex.
    Evidence { part: i64, bytes: String },
    Entry {
        seq: u64,
        kind: String,
        site: String,
        period_from: String,
        period_to: String,
        reading: Pairs,
        grams: i64,
        sign: String,
        recorded_at: String,
        key: String,
        meter: Option<String>,
        note: Option<String>,
        corrects: Option<u64>,
        reason: Option<String>,
        evidence_name: Option<String>,
        evidence_sha256: Option<String>,
        /// Present only for an entry under encoding v2, so a ledger file's bundle keeps its bytes.
        #[serde(default, skip_serializing_if = "Option::is_none")]
        recorded_by: Option<String>,
        leaf_hash: String,
        chain_hash: String,
    },
    /// A statement signed over one of the bundle's seals, as the ledger's signatures table keeps
    /// it (docs/ledger-format.md gives the bytes signed and hashed).
    Signature {
        seq: u64,
        seal_seq: u64,
        period: String,
        tree_size: u64,
        root: String,
        role: String,
        statement: String,
        signed_at: String,
        public_key: String,
        signature: String,
        row_hash: String,
    },
    /// A reconciliation recorded against the project, as the ledger's reconciliations table
    /// keeps it (docs/ledger-format.md gives the bytes hashed).
    Reconciliation {
        seq: u64,
        previous: String,
        report_name: String,
        report_sha256: String,
        method: String,
        materiality: String,
        basis: String,
        chain_size: u64,
        chain_head: String,
        lines: Vec<RecordedLine>,
        years: Vec<RecordedYear>,
        verdict: String,
        role: String,
        by: Option<String>,
        recorded_by: Option<String>,
        recorded_at: String,
        row_hash: String,
    },
    /// The last line: what came before it, its tree head, and a digest of its bytes.
    Trailer {
        lines: u64,
        entries: u64,
        tree_size: u64,
        root: String,
        chain_head: String,
        sha256: String,
    },
}

/// UTC to the microsecond, the one spelling of a time in a bundle.
pub fn time_text(t: DateTime<Utc>) -> String {
    t.format("%Y-%m-%dT%H:%M:%S%.6fZ").to_string()
}

fn time(field: &str, s: &str) -> Result<DateTime<Utc>, String> {
    DateTime::parse_from_rfc3339(s)
        .map(|t| t.with_timezone(&Utc))
        .map_err(|e| format!("{field} {s:?} is not an RFC 3339 time: {e}"))
}

fn hash(field: &str, s: &str) -> Result<Hash, String> {
    Hash::from_hex(s).ok_or_else(|| format!("{field} {s:?} is not a SHA-256 hex digest"))
}

fn named<T>(field: &str, s: &str, f: impl Fn(&str) -> Option<T>) -> Result<T, String> {
    f(s).ok_or_else(|| format!("{field} {s:?} is not known"))
}

/// A registration's stored hash must be the hash of its canonical bytes.
fn row_hash_matches(what: &str, bytes: &[u8], stored: &str) -> Result<(), String> {
    if leaf_hash(bytes).to_hex() == stored {
        Ok(())
    } else {
        Err(format!("{what} differs from its row_hash"))
    }
}

impl Line {
    /// The header this build writes.
    pub fn header(project: &str, seals: &[u64]) -> Line {
        Line::header_of(VERSION, project, seals)
    }

    fn header_of(version: u32, project: &str, seals: &[u64]) -> Line {
        Line::Header {
            format: FORMAT.into(),
            version,
            project: project.into(),
            seals: seals.to_vec(),
        }
    }

    pub fn reconciliation(r: &Recorded) -> Line {
        Line::Reconciliation {
            seq: r.seq,
            previous: r.previous.to_hex(),
            report_name: r.report_name.clone(),
            report_sha256: r.report_sha256.to_hex(),
            method: r.method.clone(),
            materiality: r.materiality.clone(),
            basis: r.basis.clone(),
            chain_size: r.chain_size,
            chain_head: r.chain_head.to_hex(),
            lines: r.lines.clone(),
            years: r.years.clone(),
            verdict: r.verdict.clone(),
            role: r.role.name().into(),
            by: r.by.clone(),
            recorded_by: r.recorded_by.clone(),
            recorded_at: time_text(r.recorded_at),
            row_hash: r.row_hash().to_hex(),
        }
    }

    pub fn project(p: &Project) -> Line {
        Line::Project {
            code: p.code.clone(),
            name: p.name.clone(),
            method: p.method.name().into(),
            operator: p.operator.clone(),
            permit_ref: p.permit_ref.clone(),
            permit_capacity_g: p.permit_capacity.map(Mass::grams),
            permit_annual_g: p.permit_annual.map(Mass::grams),
            registered_at: time_text(p.registered_at),
            row_hash: leaf_hash(&encode_project(p)).to_hex(),
        }
    }

    pub fn site(s: &Site) -> Line {
        Line::Site {
            code: s.code.clone(),
            kind: s.kind.name().into(),
            area: s.area.clone(),
            uncertainty: s.uncertainty.clone(),
            registered_at: time_text(s.registered_at),
            row_hash: leaf_hash(&encode_site(s)).to_hex(),
        }
    }

    pub fn setting(s: &Setting) -> Line {
        Line::Setting {
            seq: s.seq,
            name: s.name.name().into(),
            value: s.value.clone(),
            recorded_at: time_text(s.recorded_at),
            row_hash: leaf_hash(&encode_setting(s)).to_hex(),
            effective_from: s.effective.map(|d| d.to_string()),
            source: s.source.clone(),
        }
    }

    pub fn feedstock(f: &Feedstock) -> Line {
        Line::Feedstock {
            code: f.code.clone(),
            oxides: f.oxides.clone(),
            oxide_unit: f.oxide_unit.clone(),
            elements: f.elements.clone(),
            element_unit: f.element_unit.clone(),
            density: f.density.clone(),
            d80: f.d80.clone(),
            registered_at: time_text(f.registered_at),
            row_hash: leaf_hash(&encode_feedstock(f)).to_hex(),
        }
    }

    pub fn entry(s: &SealedEntry) -> Line {
        let e = &s.entry;
        Line::Entry {
            seq: e.seq,
            kind: e.kind.name().into(),
            site: e.site.clone(),
            period_from: e.period.from.to_string(),
            period_to: e.period.to.to_string(),
            reading: e.reading.0.clone(),
            grams: e.mass.grams(),
            sign: e.sign.name().into(),
            recorded_at: time_text(e.recorded_at),
            key: e.key.clone(),
            meter: e.meter.clone(),
            note: e.note.clone(),
            corrects: e.corrects,
            reason: e.reason.clone(),
            evidence_name: e.evidence.as_ref().map(|v| v.file_name.clone()),
            evidence_sha256: e.evidence.as_ref().map(|v| v.sha256.to_hex()),
            recorded_by: e.recorded_by.clone(),
            leaf_hash: s.leaf.to_hex(),
            chain_hash: s.chain.to_hex(),
        }
    }

    pub fn signature(s: &Statement) -> Line {
        let g = &s.signed;
        Line::Signature {
            seq: s.seq,
            seal_seq: g.seal_seq,
            period: g.period.clone(),
            tree_size: g.tree_size,
            root: g.root.to_hex(),
            role: g.role.name().into(),
            statement: g.statement.clone(),
            signed_at: time_text(g.signed_at),
            public_key: hex(&s.public_key),
            signature: hex(&s.signature),
            row_hash: leaf_hash(&encode_signature_row(s)).to_hex(),
        }
    }

    /// The line as written: compact JSON, fields in declaration order, then a newline.
    pub fn to_text(&self) -> String {
        let mut s = serde_json::to_string(self).expect("bundle lines serialize");
        s.push('\n');
        s
    }

    /// Reads one line (without its newline); refuses any spelling but the canonical one.
    pub fn parse(text: &str) -> Result<Line, String> {
        let line: Line =
            serde_json::from_str(text).map_err(|e| format!("not a bundle line: {e}"))?;
        if line.to_text().trim_end_matches('\n') != text {
            return Err("not in the bundle's canonical form (spacing, field order or number spelling differ)".into());
        }
        Ok(line)
    }
}

/// What a line holds, as ledger values checked against their stored hashes.
#[derive(Debug, Clone, PartialEq)]
pub enum Item {
    Header {
        version: u32,
        project: String,
        seals: Vec<u64>,
    },
    Project(Project),
    Site(Site),
    Setting(Setting),
    Feedstock(Feedstock),
    Import(Import),
    Evidence(EvidencePart),
    /// An entry as stored, its leaf hash checked against its content (the chain link is the
    /// reader's to check: it needs the entry before).
    Entry(SealedEntry),
    /// A statement whose row hash is its content's (its signature and the seal it names are the
    /// checker's to judge).
    Signature(Statement),
    /// A recorded reconciliation whose row hash is its content's (the run of records is the
    /// checker's to follow).
    Reconciliation(Recorded),
    Trailer(Trailer),
}

/// An imported file as a bundle names it (the ledger's own id for it stays in the ledger).
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Import {
    pub file_name: String,
    pub file_sha256: Hash,
    pub kind: String,
    pub row_count: i64,
    /// How the file was read (`--columns` as given, the density method), so it re-reads alike.
    pub columns_map: String,
    pub density: String,
    pub byte_count: i64,
    pub imported_at: DateTime<Utc>,
}

/// One part of the bytes of the import before it.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct EvidencePart {
    pub part: i64,
    pub bytes: Vec<u8>,
}

#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Trailer {
    pub lines: u64,
    pub entries: u64,
    pub tree_size: u64,
    pub root: Hash,
    pub chain_head: Hash,
    pub sha256: Hash,
}

impl Import {
    pub fn to_line(&self) -> Line {
        Line::Import {
            file_name: self.file_name.clone(),
            file_sha256: self.file_sha256.to_hex(),
            kind: self.kind.clone(),
            row_count: self.row_count,
            columns_map: self.columns_map.clone(),
            density: self.density.clone(),
            byte_count: self.byte_count,
            imported_at: time_text(self.imported_at),
        }
    }
}

impl EvidencePart {
    pub fn to_line(&self) -> Line {
        let mut hex = String::with_capacity(self.bytes.len() * 2);
        for b in &self.bytes {
            hex.push(char::from(HEX[usize::from(b >> 4)]));
            hex.push(char::from(HEX[usize::from(b & 15)]));
        }
        Line::Evidence {
            part: self.part,
            bytes: hex,
        }
    }
}

const HEX: &[u8; 16] = b"0123456789abcdef";

/// Lowercase hex to bytes.
fn unhex(s: &str) -> Result<Vec<u8>, String> {
    let digit = |c: u8| HEX.iter().position(|&h| h == c).map(|d| d as u8);
    if !s.len().is_multiple_of(2) {
        return Err("bytes: an odd number of hex digits".into());
    }
    s.as_bytes()
        .chunks(2)
        .map(|p| match (digit(p[0]), digit(p[1])) {
            (Some(h), Some(l)) => Ok(h << 4 | l),
            _ => Err("bytes: not lowercase hex".to_string()),
        })
        .collect()
}

/// Lowercase hex of exactly N bytes.
fn fixed<const N: usize>(field: &str, s: &str) -> Result<[u8; N], String> {
    unhex(s)
        .map_err(|e| format!("{field}: {e}"))?
        .try_into()
        .map_err(|_| format!("{field}: not {N} bytes"))
}

impl Trailer {
    pub fn to_line(&self) -> Line {
        Line::Trailer {
            lines: self.lines,
            entries: self.entries,
            tree_size: self.tree_size,
            root: self.root.to_hex(),
            chain_head: self.chain_head.to_hex(),
            sha256: self.sha256.to_hex(),
        }
    }
}

impl Line {
    /// The ledger value of the line (of project `project`), its stored hash checked; the value
    /// must give back this very line.
    pub fn to_item(&self, project: &str) -> Result<Item, String> {
        let item = self.value(project)?;
        let again = match &item {
            Item::Header {
                version,
                project,
                seals,
            } => Line::header_of(*version, project, seals),
            Item::Project(p) => Line::project(p),
            Item::Site(s) => Line::site(s),
            Item::Setting(s) => Line::setting(s),
            Item::Feedstock(f) => Line::feedstock(f),
            Item::Import(i) => i.to_line(),
            Item::Evidence(p) => p.to_line(),
            Item::Entry(e) => Line::entry(e),
            Item::Signature(s) => Line::signature(s),
            Item::Reconciliation(r) => Line::reconciliation(r),
            Item::Trailer(t) => t.to_line(),
        };
        if &again != self {
            return Err("a time, date or hash is not in its one spelling".into());
        }
        Ok(item)
    }

    fn value(&self, project: &str) -> Result<Item, String> {
        Ok(match self.clone() {
            Line::Header {
                format,
                version,
                project,
                seals,
            } => {
                if format != FORMAT {
                    return Err(format!("format {format:?} is not {FORMAT:?}"));
                }
                if !READS.contains(&version) {
                    return Err(format!(
                        "version {version} is not a version this build reads (1 or 2); a newer sinkbook wrote it"
                    ));
                }
                Item::Header {
                    version,
                    project,
                    seals,
                }
            }
            Line::Project {
                code,
                name,
                method,
                operator,
                permit_ref,
                permit_capacity_g,
                permit_annual_g,
                registered_at,
                row_hash,
            } => {
                let p = Project {
                    code,
                    name,
                    method: named("method", &method, Method::from_name)?,
                    operator,
                    permit_ref,
                    permit_capacity: permit_capacity_g.map(Mass::from_grams),
                    permit_annual: permit_annual_g.map(Mass::from_grams),
                    registered_at: time("registered_at", &registered_at)?,
                };
                row_hash_matches("the project", &encode_project(&p), &row_hash)?;
                Item::Project(p)
            }
            Line::Site {
                code,
                kind,
                area,
                uncertainty,
                registered_at,
                row_hash,
            } => {
                let s = Site {
                    project: project.into(),
                    code,
                    kind: named("kind", &kind, SiteKind::from_name)?,
                    area,
                    uncertainty,
                    registered_at: time("registered_at", &registered_at)?,
                };
                row_hash_matches(&format!("site {}", s.code), &encode_site(&s), &row_hash)?;
                Item::Site(s)
            }
            Line::Setting {
                seq,
                name,
                value,
                recorded_at,
                row_hash,
                effective_from,
                source,
            } => {
                let s = Setting {
                    project: project.into(),
                    seq,
                    name: named("name", &name, SettingName::from_name)?,
                    value,
                    recorded_at: time("recorded_at", &recorded_at)?,
                    effective: effective_from
                        .as_deref()
                        .map(|d| parse_date(d).map_err(|e| format!("effective_from {d:?} {e}")))
                        .transpose()?,
                    source,
                };
                crate::ledger::setting::sourced(&s)?;
                row_hash_matches(&format!("setting {seq}"), &encode_setting(&s), &row_hash)?;
                Item::Setting(s)
            }
            Line::Feedstock {
                code,
                oxides,
                oxide_unit,
                elements,
                element_unit,
                density,
                d80,
                registered_at,
                row_hash,
            } => {
                let f = Feedstock {
                    project: project.into(),
                    code,
                    oxides,
                    oxide_unit,
                    elements,
                    element_unit,
                    density,
                    d80,
                    registered_at: time("registered_at", &registered_at)?,
                };
                let what = format!("feedstock {}", f.code);
                row_hash_matches(&what, &encode_feedstock(&f), &row_hash)?;
                Item::Feedstock(f)
            }
            Line::Import {
                file_name,
                file_sha256,
                kind,
                row_count,
                columns_map,
                density,
                byte_count,
                imported_at,
            } => Item::Import(Import {
                file_name,
                file_sha256: hash("file_sha256", &file_sha256)?,
                kind,
                row_count,
                columns_map,
                density,
                byte_count,
                imported_at: time("imported_at", &imported_at)?,
            }),
            Line::Evidence { part, bytes } => Item::Evidence(EvidencePart {
                part,
                bytes: unhex(&bytes)?,
            }),
            entry @ Line::Entry { .. } => Item::Entry(entry_value(entry, project)?),
            Line::Signature {
                seq,
                seal_seq,
                period,
                tree_size,
                root,
                role,
                statement,
                signed_at,
                public_key,
                signature,
                row_hash,
            } => {
                let s = Statement {
                    seq,
                    signed: Signed {
                        project: project.into(),
                        seal_seq,
                        period,
                        tree_size,
                        root: hash("root", &root)?,
                        role: named("role", &role, Role::from_name)?,
                        statement,
                        signed_at: time("signed_at", &signed_at)?,
                    },
                    public_key: fixed("public_key", &public_key)?,
                    signature: fixed("signature", &signature)?,
                };
                row_hash_matches(
                    &format!("signature {seq}"),
                    &encode_signature_row(&s),
                    &row_hash,
                )?;
                Item::Signature(s)
            }
            Line::Reconciliation {
                seq,
                previous,
                report_name,
                report_sha256,
                method,
                materiality,
                basis,
                chain_size,
                chain_head,
                lines,
                years,
                verdict,
                role,
                by,
                recorded_by,
                recorded_at,
                row_hash,
            } => {
                let r = Recorded {
                    project: project.into(),
                    seq,
                    previous: hash("previous", &previous)?,
                    report_name,
                    report_sha256: hash("report_sha256", &report_sha256)?,
                    method,
                    materiality,
                    basis,
                    chain_size,
                    chain_head: hash("chain_head", &chain_head)?,
                    lines,
                    years,
                    verdict,
                    role: named("role", &role, Role::from_name)?,
                    by,
                    recorded_by,
                    recorded_at: time("recorded_at", &recorded_at)?,
                };
                row_hash_matches(
                    &format!("reconciliation {seq}"),
                    &encode_reconciliation(&r),
                    &row_hash,
                )?;
                Item::Reconciliation(r)
            }
            Line::Trailer {
                lines,
                entries,
                tree_size,
                root,
                chain_head,
                sha256,
            } => Item::Trailer(Trailer {
                lines,
                entries,
                tree_size,
                root: hash("root", &root)?,
                chain_head: hash("chain_head", &chain_head)?,
                sha256: hash("sha256", &sha256)?,
            }),
        })
    }
}

/// An entry line as a sealed entry whose leaf hash is its content's.
fn entry_value(line: Line, project: &str) -> Result<SealedEntry, String> {
    let Line::Entry {
        seq,
        kind,
        site,
        period_from,
        period_to,
        reading,
        grams,
        sign,
        recorded_at,
        key,
        meter,
        note,
        corrects,
        reason,
        evidence_name,
        evidence_sha256,
        recorded_by,
        leaf_hash: leaf,
        chain_hash,
    } = line
    else {
        return Err("not an entry line".into());
    };
    let date = |f: &str, v: &str| parse_date(v).map_err(|e| format!("{f} {v:?} {e}"));
    let evidence = match (evidence_name, evidence_sha256) {
        (Some(file_name), Some(h)) => Some(Evidence {
            file_name,
            sha256: hash("evidence_sha256", &h)?,
        }),
        (None, None) => None,
        _ => return Err("evidence_name and evidence_sha256 go together".into()),
    };
    let entry = Entry {
        project: project.into(),
        seq,
        kind: named("kind", &kind, EntryKind::from_name)?,
        site,
        period: Period::new(
            date("period_from", &period_from)?,
            date("period_to", &period_to)?,
        )?,
        reading: Reading(reading),
        mass: Mass::from_grams(grams),
        sign: named("sign", &sign, Sign::from_name)?,
        recorded_at: time("recorded_at", &recorded_at)?,
        key,
        meter,
        note,
        corrects,
        reason,
        evidence,
        recorded_by,
    };
    let leaf_stored = hash("leaf_hash", &leaf)?;
    let leaf_now = leaf_hash(&crate::ledger::canonical::encode(&entry));
    if leaf_now != leaf_stored {
        return Err(format!("entry seq {seq} differs from its leaf_hash"));
    }
    crate::ledger::reading_fields::check(&entry.reading)
        .map_err(|e| format!("entry seq {seq}: {e}"))?;
    Ok(SealedEntry {
        entry,
        leaf: leaf_stored,
        chain: hash("chain_hash", &chain_hash)?,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn one_spelling_only() {
        let header = r#"{"type":"header","format":"sinkbook-bundle","version":2,"project":"TFS","seals":[]}"#;
        assert!(Line::parse(header).is_ok());
        // Version 1 is still read; a version this build does not know is refused by name.
        let v1 = header.replace(r#""version":2"#, r#""version":1"#);
        assert!(Line::parse(&v1).unwrap().to_item("TFS").is_ok());
        let v3 = header.replace(r#""version":2"#, r#""version":3"#);
        let e = Line::parse(&v3).unwrap().to_item("TFS").unwrap_err();
        assert!(
            e.contains("version 3 is not a version this build reads"),
            "{e}"
        );
        // The same meaning, spelt otherwise: spaces, another field order, an unknown field.
        for other in [
            r#"{"type": "header","format":"sinkbook-bundle","version":1,"project":"TFS","seals":[]}"#,
            r#"{"type":"header","version":1,"format":"sinkbook-bundle","project":"TFS","seals":[]}"#,
            r#"{"type":"header","format":"sinkbook-bundle","version":1,"project":"TFS","seals":[],"x":0}"#,
        ] {
            assert!(Line::parse(other).is_err(), "{other}");
        }
        let t = "2026-12-01T09:00:00+00:00";
        let site = Line::Site {
            code: "TF-I1".into(),
            kind: "injection-well".into(),
            area: None,
            uncertainty: None,
            registered_at: t.into(),
            row_hash: "00".repeat(32),
        };
        let err = site.to_item("TFS").unwrap_err();
        assert!(err.contains("row_hash"), "{err}");
    }

    #[test]
    fn evidence_bytes_are_lowercase_hex() {
        let p = EvidencePart {
            part: 0,
            bytes: vec![0, 0xab, 0xff, b'\n'],
        };
        let line = p.to_line();
        assert_eq!(
            line,
            Line::Evidence {
                part: 0,
                bytes: "00abff0a".into()
            }
        );
        assert_eq!(line.to_item("TFS").unwrap(), Item::Evidence(p));
        assert!(unhex("00ABff0a").is_err());
        assert!(unhex("abc").is_err());
    }
}
