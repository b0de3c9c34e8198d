//! Rows as the tables hold them, and their exact conversion to and from ledger values. A row
//! that does not convert back is a finding for `verify`, never a panic.

use super::schema::{entries, projects, sites};
use crate::ledger::canonical::{encode_project, encode_site};
use crate::ledger::hash::leaf_hash;
use crate::ledger::period::parse_date;
use crate::ledger::tally::Tally;
use crate::ledger::{
    Entry, EntryKind, Evidence, Hash, Method, Period, Project, Reading, SealedEntry, Sign, Site,
    SiteKind,
};
use crate::quantity::Mass;
use chrono::{DateTime, NaiveDateTime, Utc};
use diesel::prelude::*;

#[derive(Queryable, Selectable, Insertable)]
#[diesel(table_name = projects, check_for_backend(diesel::sqlite::Sqlite))]
pub struct ProjectRow {
    pub code: String,
    pub name: String,
    pub method: String,
    pub operator: String,
    pub permit_ref: Option<String>,
    pub permit_capacity_g: Option<i64>,
    pub permit_annual_g: Option<i64>,
    pub created_at: NaiveDateTime,
    pub row_hash: String,
}

#[derive(Queryable, Selectable, Insertable)]
#[diesel(table_name = sites, check_for_backend(diesel::sqlite::Sqlite))]
pub struct SiteRow {
    pub project: String,
    pub code: String,
    pub kind: String,
    pub area: Option<String>,
    pub uncertainty: Option<String>,
    pub created_at: NaiveDateTime,
    pub row_hash: String,
}

/// Inserted with every column bound (NULL for None), so the statement's text is the same for
/// every row and SQLite prepares it once for a whole import.
#[derive(Clone, Queryable, Selectable, Insertable)]
#[diesel(table_name = entries, check_for_backend(diesel::sqlite::Sqlite))]
#[diesel(treat_none_as_default_value = false)]
pub struct EntryRow {
    pub project: String,
    pub seq: i64,
    pub kind: String,
    /// NULL for seals, which stand at no site, and for a leakage or reversal that names none.
    pub site: Option<String>,
    pub period_from: String,
    pub period_to: String,
    pub reading: String,
    pub grams: i64,
    pub sign: String,
    #[diesel(deserialize_as = super::stored_time::StoredTime)]
    pub recorded_at: NaiveDateTime,
    pub idem_key: String,
    pub meter: Option<String>,
    pub note: Option<String>,
    pub corrects: Option<i64>,
    pub reason: Option<String>,
    pub evidence_name: Option<String>,
    pub evidence_sha256: Option<String>,
    pub leaf_hash: String,
    pub chain_hash: String,
    /// The registry role named in the entry's bytes; NULL for a v1 entry.
    pub recorded_by: Option<String>,
}

fn utc(t: NaiveDateTime) -> DateTime<Utc> {
    t.and_utc()
}

/// A stored hash, or a finding that names the column.
fn hash(column: &str, text: &str) -> Result<Hash, String> {
    Hash::from_hex(text).ok_or_else(|| format!("{column} {text:?} is not a SHA-256 hex digest"))
}

impl ProjectRow {
    pub fn from_project(p: &Project) -> Self {
        Self {
            code: p.code.clone(),
            name: p.name.clone(),
            method: p.method.name().into(),
            operator: p.operator.clone(),
            permit_ref: p.permit_ref.clone(),
            permit_capacity_g: p.permit_capacity.map(Mass::grams),
            permit_annual_g: p.permit_annual.map(Mass::grams),
            created_at: p.registered_at.naive_utc(),
            row_hash: leaf_hash(&encode_project(p)).to_hex(),
        }
    }

    /// The project, checked against the row's own hash.
    pub fn to_project(&self) -> Result<Project, String> {
        let p = Project {
            code: self.code.clone(),
            name: self.name.clone(),
            method: Method::from_name(&self.method).ok_or_else(|| {
                format!("project {}: unknown method {:?}", self.code, self.method)
            })?,
            operator: self.operator.clone(),
            permit_ref: self.permit_ref.clone(),
            permit_capacity: self.permit_capacity_g.map(Mass::from_grams),
            permit_annual: self.permit_annual_g.map(Mass::from_grams),
            registered_at: utc(self.created_at),
        };
        if leaf_hash(&encode_project(&p)).to_hex() != self.row_hash {
            return Err(format!(
                "project {} registration differs from its row hash",
                self.code
            ));
        }
        Ok(p)
    }
}

impl SiteRow {
    pub fn from_site(s: &Site) -> Self {
        Self {
            project: s.project.clone(),
            code: s.code.clone(),
            kind: s.kind.name().into(),
            area: s.area.clone(),
            uncertainty: s.uncertainty.clone(),
            created_at: s.registered_at.naive_utc(),
            row_hash: leaf_hash(&encode_site(s)).to_hex(),
        }
    }

    pub fn to_site(&self) -> Result<Site, String> {
        let s = Site {
            project: self.project.clone(),
            code: self.code.clone(),
            kind: SiteKind::from_name(&self.kind).ok_or_else(|| {
                format!(
                    "site {} of project {}: unknown site kind {:?}",
                    self.code, self.project, self.kind
                )
            })?,
            area: self.area.clone(),
            uncertainty: self.uncertainty.clone(),
            registered_at: utc(self.created_at),
        };
        if leaf_hash(&encode_site(&s)).to_hex() != self.row_hash {
            return Err(format!(
                "site {} of project {} differs from its row hash",
                self.code, self.project
            ));
        }
        Ok(s)
    }
}

impl EntryRow {
    pub fn from_sealed(s: &SealedEntry) -> Self {
        let e = &s.entry;
        Self {
            project: e.project.clone(),
            seq: e.seq as i64,
            kind: e.kind.name().into(),
            site: (!e.site.is_empty()).then(|| e.site.clone()),
            period_from: e.period.from.to_string(),
            period_to: e.period.to.to_string(),
            reading: serde_json::to_string(&e.reading.0).expect("strings serialize"),
            grams: e.mass.grams(),
            sign: e.sign.name().into(),
            recorded_at: e.recorded_at.naive_utc(),
            idem_key: e.key.clone(),
            meter: e.meter.clone(),
            note: e.note.clone(),
            corrects: e.corrects.map(|c| c as i64),
            reason: e.reason.clone(),
            evidence_name: e.evidence.as_ref().map(|v| v.file_name.clone()),
            evidence_sha256: e.evidence.as_ref().map(|v| v.sha256.to_hex()),
            leaf_hash: s.leaf.to_hex(),
            chain_hash: s.chain.to_hex(),
            recorded_by: e.recorded_by.clone(),
        }
    }

    /// The entry exactly as stored; a field that cannot be read back is named in the error.
    pub fn to_sealed(&self) -> Result<SealedEntry, String> {
        self.clone().into_sealed(Vec::new())
    }

    /// [`EntryRow::to_sealed`], taking the row's texts into the entry rather than copying them,
    /// and reading its reading into `pairs`, whose strings are reused (the walk reads every row
    /// of a chain once, each into the reading of the row before).
    pub fn into_sealed(self, mut pairs: Vec<(String, String)>) -> Result<SealedEntry, String> {
        let date = |col: &str, v: &str| parse_date(v).map_err(|e| format!("{col} {v:?} {e}"));
        let from = date("period_from", &self.period_from)?;
        let to = date("period_to", &self.period_to)?;
        let evidence = match (self.evidence_name, &self.evidence_sha256) {
            (Some(file_name), Some(h)) => Some(Evidence {
                file_name,
                sha256: hash("evidence_sha256", h)?,
            }),
            (None, None) => None,
            _ => return Err("evidence name and hash must be present together".into()),
        };
        let entry = Entry {
            project: self.project,
            seq: u64::try_from(self.seq).map_err(|_| format!("seq {} is negative", self.seq))?,
            kind: EntryKind::from_name(&self.kind)
                .ok_or_else(|| format!("unknown kind {:?}", self.kind))?,
            site: self.site.unwrap_or_default(),
            period: Period { from, to },
            reading: {
                super::reading_text::parse_into(&self.reading, &mut pairs)
                    .map_err(|e| format!("reading is not readable: {e}"))?;
                Reading(pairs)
            },
            mass: Mass::from_grams(self.grams),
            sign: Sign::from_name(&self.sign)
                .ok_or_else(|| format!("unknown sign {:?}", self.sign))?,
            recorded_at: utc(self.recorded_at),
            key: self.idem_key,
            meter: self.meter,
            note: self.note,
            corrects: self
                .corrects
                .map(|c| u64::try_from(c).map_err(|_| format!("corrects {c} is negative")))
                .transpose()?,
            reason: self.reason,
            evidence,
            recorded_by: self.recorded_by,
        };
        crate::ledger::reading_fields::check(&entry.reading).map_err(|e| e.to_string())?;
        Ok(SealedEntry {
            entry,
            leaf: hash("leaf_hash", &self.leaf_hash)?,
            chain: hash("chain_hash", &self.chain_hash)?,
        })
    }
}

/// An entry row as appended: the entry, and its project's running figures through it
/// (`ledger::tally`), which are not part of the entry's bytes.
#[derive(Insertable)]
#[diesel(table_name = entries, treat_none_as_default_value = false)]
pub struct TalliedRow {
    #[diesel(embed)]
    pub row: EntryRow,
    pub tally_magnitude_g: Option<i64>,
    pub tally_stored_g: Option<i64>,
}

impl TalliedRow {
    pub fn new(s: &SealedEntry, t: Tally) -> Self {
        Self {
            row: EntryRow::from_sealed(s),
            tally_magnitude_g: Some(t.magnitude),
            tally_stored_g: Some(t.stored),
        }
    }
}

#[derive(Queryable, Selectable, Insertable)]
#[diesel(table_name = super::schema::imports, check_for_backend(diesel::sqlite::Sqlite))]
pub struct ImportRow {
    pub id: i64,
    pub project: String,
    pub file_name: String,
    pub file_sha256: String,
    pub kind: String,
    pub row_count: i64,
    pub imported_at: NaiveDateTime,
    pub columns_map: String,
    pub density: String,
    pub byte_count: i64,
}

#[derive(Queryable, Selectable, Insertable)]
#[diesel(table_name = super::schema::settings, check_for_backend(diesel::sqlite::Sqlite))]
pub struct SettingRow {
    pub project: String,
    pub seq: i64,
    pub name: String,
    pub value: String,
    pub recorded_at: NaiveDateTime,
    pub row_hash: String,
    pub effective_from: Option<String>,
    pub source: Option<String>,
}

impl SettingRow {
    pub fn from_setting(s: &crate::ledger::setting::Setting) -> Self {
        Self {
            project: s.project.clone(),
            seq: s.seq as i64,
            name: s.name.name().into(),
            value: s.value.clone(),
            recorded_at: s.recorded_at.naive_utc(),
            row_hash: leaf_hash(&crate::ledger::canonical::encode_setting(s)).to_hex(),
            effective_from: s.effective.map(|d| d.to_string()),
            source: s.source.clone(),
        }
    }

    /// The setting, checked against the row's own hash.
    pub fn to_setting(&self) -> Result<crate::ledger::setting::Setting, String> {
        use crate::ledger::setting::{Setting, SettingName};
        let s = Setting {
            project: self.project.clone(),
            seq: u64::try_from(self.seq).map_err(|_| {
                format!(
                    "setting {} of project {}: seq is negative",
                    self.seq, self.project
                )
            })?,
            name: SettingName::from_name(&self.name).ok_or_else(|| {
                format!(
                    "setting {} of project {}: unknown setting {:?}",
                    self.seq, self.project, self.name
                )
            })?,
            value: self.value.clone(),
            recorded_at: utc(self.recorded_at),
            effective: self
                .effective_from
                .as_deref()
                .map(|d| {
                    crate::ledger::period::parse_date(d).map_err(|e| {
                        format!(
                            "setting {} of project {}: effective_from {d:?} {e}",
                            self.seq, self.project
                        )
                    })
                })
                .transpose()?,
            source: self.source.clone(),
        };
        crate::ledger::setting::sourced(&s)?;
        if leaf_hash(&crate::ledger::canonical::encode_setting(&s)).to_hex() != self.row_hash {
            return Err(format!(
                "setting {} of project {} differs from its row hash",
                self.seq, self.project
            ));
        }
        Ok(s)
    }
}

#[derive(Queryable, Selectable, Insertable)]
#[diesel(table_name = super::schema::feedstocks, check_for_backend(diesel::sqlite::Sqlite))]
pub struct FeedstockRow {
    pub project: String,
    pub code: String,
    pub oxides: String,
    pub oxide_unit: String,
    pub elements: String,
    pub element_unit: String,
    pub density: String,
    pub d80: Option<String>,
    pub created_at: NaiveDateTime,
    pub row_hash: String,
}

impl FeedstockRow {
    pub fn from_feedstock(f: &crate::ledger::feedstock::Feedstock) -> Self {
        Self {
            project: f.project.clone(),
            code: f.code.clone(),
            oxides: serde_json::to_string(&f.oxides).expect("strings serialize"),
            oxide_unit: f.oxide_unit.clone(),
            elements: serde_json::to_string(&f.elements).expect("strings serialize"),
            element_unit: f.element_unit.clone(),
            density: f.density.clone(),
            d80: f.d80.clone(),
            created_at: f.registered_at.naive_utc(),
            row_hash: leaf_hash(&crate::ledger::canonical::encode_feedstock(f)).to_hex(),
        }
    }

    /// The feedstock, checked against the row's own hash.
    pub fn to_feedstock(&self) -> Result<crate::ledger::feedstock::Feedstock, String> {
        let pairs = |column: &str, text: &str| {
            serde_json::from_str(text).map_err(|e| {
                format!(
                    "feedstock {} of project {}: {column} is not readable: {e}",
                    self.code, self.project
                )
            })
        };
        let f = crate::ledger::feedstock::Feedstock {
            project: self.project.clone(),
            code: self.code.clone(),
            oxides: pairs("oxides", &self.oxides)?,
            oxide_unit: self.oxide_unit.clone(),
            elements: pairs("elements", &self.elements)?,
            element_unit: self.element_unit.clone(),
            density: self.density.clone(),
            d80: self.d80.clone(),
            registered_at: utc(self.created_at),
        };
        if leaf_hash(&crate::ledger::canonical::encode_feedstock(&f)).to_hex() != self.row_hash {
            return Err(format!(
                "feedstock {} of project {} differs from its row hash",
                self.code, self.project
            ));
        }
        Ok(f)
    }
}

#[derive(Queryable, Selectable, Insertable)]
#[diesel(table_name = super::schema::signatures, check_for_backend(diesel::sqlite::Sqlite))]
pub struct SignatureRow {
    pub project: String,
    pub seq: i64,
    pub seal_seq: i64,
    pub period: String,
    pub tree_size: i64,
    pub root: String,
    pub role: String,
    pub statement: String,
    pub signed_at: NaiveDateTime,
    pub public_key: String,
    pub signature: String,
    pub row_hash: String,
}

impl SignatureRow {
    pub fn from_statement(s: &crate::ledger::signature::Statement) -> Self {
        use crate::ledger::signature::hex;
        let g = &s.signed;
        Self {
            project: g.project.clone(),
            seq: s.seq as i64,
            seal_seq: g.seal_seq as i64,
            period: g.period.clone(),
            tree_size: g.tree_size as i64,
            root: g.root.to_hex(),
            role: g.role.name().into(),
            statement: g.statement.clone(),
            signed_at: g.signed_at.naive_utc(),
            public_key: hex(&s.public_key),
            signature: hex(&s.signature),
            row_hash: leaf_hash(&crate::ledger::canonical::encode_signature_row(s)).to_hex(),
        }
    }

    /// The statement as stored, checked against its row hash (not its signature: that is
    /// `verify`'s and `statements`' to judge and report).
    pub fn to_statement(&self) -> Result<crate::ledger::signature::Statement, String> {
        use crate::ledger::signature::{Role, Signed, Statement};
        let at = || format!("signature {} of project {}", self.seq, self.project);
        let unsigned = |v: i64, name: &str| {
            u64::try_from(v).map_err(|_| format!("{}: {name} {v} is negative", at()))
        };
        let bytes = |s: &str, n: usize| -> Result<Vec<u8>, String> {
            let v: Option<Vec<u8>> = (s.len() == 2 * n && s.is_ascii())
                .then(|| {
                    (0..n)
                        .map(|i| u8::from_str_radix(&s[2 * i..2 * i + 2], 16).ok())
                        .collect()
                })
                .flatten();
            v.ok_or_else(|| format!("{}: not {n} bytes of hex", at()))
        };
        let s = Statement {
            seq: unsigned(self.seq, "seq")?,
            signed: Signed {
                project: self.project.clone(),
                seal_seq: unsigned(self.seal_seq, "seal_seq")?,
                period: self.period.clone(),
                tree_size: unsigned(self.tree_size, "tree_size")?,
                root: hash("root", &self.root).map_err(|e| format!("{}: {e}", at()))?,
                role: Role::from_name(&self.role)
                    .ok_or_else(|| format!("{}: unknown role {:?}", at(), self.role))?,
                statement: self.statement.clone(),
                signed_at: utc(self.signed_at),
            },
            public_key: bytes(&self.public_key, 32)?.try_into().expect("32 bytes"),
            signature: bytes(&self.signature, 64)?.try_into().expect("64 bytes"),
        };
        if leaf_hash(&crate::ledger::canonical::encode_signature_row(&s)).to_hex() != self.row_hash
        {
            return Err(format!("{} differs from its row hash", at()));
        }
        Ok(s)
    }
}
