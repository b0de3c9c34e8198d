//! The lines of a bundle: one JSON object per line, in one canonical form (docs/bundle-format.md).
//! A line is read back only if writing it again gives the same bytes and the ledger value it
//! holds gives the same line, so a bundle has exactly one spelling of its content.

mod item;
mod read;

pub use item::{EvidencePart, Import, Item, Trailer};

use crate::ledger::canonical::{
    encode_feedstock, encode_project, encode_setting, encode_signature_row, encode_site,
};
use crate::ledger::feedstock::Feedstock;
use crate::ledger::hash::leaf_hash;
use crate::ledger::reconciliation::{Recorded, RecordedLine, RecordedYear};
use crate::ledger::setting::Setting;
use crate::ledger::signature::{Statement, hex};
use crate::ledger::{Project, SealedEntry, Site};
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

#[cfg(test)]
mod tests;
