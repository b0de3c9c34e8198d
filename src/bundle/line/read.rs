//! Reading a line back: the ledger value it holds, each stored hash checked against the
//! content, and the value written again must give the very line.

use super::item::{EvidencePart, Import, Item, Trailer, fixed, unhex};
use super::{FORMAT, Line, READS};
use crate::ledger::canonical::{
    encode_feedstock, encode_project, encode_reconciliation, encode_setting, encode_signature_row,
    encode_site,
};
use crate::ledger::feedstock::Feedstock;
use crate::ledger::hash::leaf_hash;
use crate::ledger::period::parse_date;
use crate::ledger::reconciliation::Recorded;
use crate::ledger::setting::{Setting, SettingName};
use crate::ledger::signature::{Role, Signed, Statement};
use crate::ledger::{
    Entry, EntryKind, Evidence, Hash, Method, Period, Project, Reading, SealedEntry, Sign, Site,
    SiteKind,
};
use crate::quantity::Mass;
use chrono::{DateTime, Utc};

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
        let line = self.clone();
        Ok(match line {
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
            Line::Project { .. } => project_value(line)?,
            Line::Site { .. } => site_value(line, project)?,
            Line::Setting { .. } => setting_value(line, project)?,
            Line::Feedstock { .. } => feedstock_value(line, project)?,
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
            Line::Signature { .. } => signature_value(line, project)?,
            Line::Reconciliation { .. } => reconciliation_value(line, project)?,
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

/// A project line as its registration, its row hash checked.
fn project_value(line: Line) -> Result<Item, String> {
    let Line::Project {
        code,
        name,
        method,
        operator,
        permit_ref,
        permit_capacity_g,
        permit_annual_g,
        registered_at,
        row_hash,
    } = line
    else {
        return Err("not a project line".into());
    };
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
    Ok(Item::Project(p))
}

/// A site line as its registration, its row hash checked.
fn site_value(line: Line, project: &str) -> Result<Item, String> {
    let Line::Site {
        code,
        kind,
        area,
        uncertainty,
        registered_at,
        row_hash,
    } = line
    else {
        return Err("not a site line".into());
    };
    let s = Site {
        project: project.into(),
        code,
        kind: named("kind", &kind, SiteKind::from_name)?,
        area,
        uncertainty,
        registered_at: time("registered_at", &registered_at)?,
    };
    row_hash_matches(&format!("site {}", s.code), &encode_site(&s), &row_hash)?;
    Ok(Item::Site(s))
}

/// A setting line as its row, its row hash checked.
fn setting_value(line: Line, project: &str) -> Result<Item, String> {
    let Line::Setting {
        seq,
        name,
        value,
        recorded_at,
        row_hash,
        effective_from,
        source,
    } = line
    else {
        return Err("not a setting line".into());
    };
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
    Ok(Item::Setting(s))
}

/// A feedstock line as its registration, its row hash checked.
fn feedstock_value(line: Line, project: &str) -> Result<Item, String> {
    let Line::Feedstock {
        code,
        oxides,
        oxide_unit,
        elements,
        element_unit,
        density,
        d80,
        registered_at,
        row_hash,
    } = line
    else {
        return Err("not a feedstock line".into());
    };
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
    Ok(Item::Feedstock(f))
}

/// A signature line as its statement, its row hash checked.
fn signature_value(line: Line, project: &str) -> Result<Item, String> {
    let Line::Signature {
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
    } = line
    else {
        return Err("not a signature line".into());
    };
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
    Ok(Item::Signature(s))
}

/// A reconciliation line as its record, its row hash checked.
fn reconciliation_value(line: Line, project: &str) -> Result<Item, String> {
    let Line::Reconciliation {
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
    } = line
    else {
        return Err("not a reconciliation line".into());
    };
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
    Ok(Item::Reconciliation(r))
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
