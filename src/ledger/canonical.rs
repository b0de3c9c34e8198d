//! Canonical encodings: the exact bytes an entry's leaf hash is taken over. v1 for entries of a
//! ledger file and every registration; v2, for an entry a registry role appended, is v1's
//! fields then the role. docs/ledger-format.md specifies them field by field, so anyone can
//! recompute a chain.

use super::entry::Entry;
use super::feedstock::Feedstock;
use super::period::epoch_days;
use super::project::{Project, Site};

/// The version byte that opens every encoding but a v2 entry's.
pub const VERSION: u8 = 1;

/// The version byte of an entry that names the registry role that recorded it.
pub const ENTRY_RECORDED_BY: u8 = 2;

/// Builds the canonical bytes.
#[derive(Default)]
struct Writer(Vec<u8>);

impl Writer {
    fn u8(&mut self, v: u8) {
        self.0.push(v);
    }
    fn u32(&mut self, v: u32) {
        self.0.extend_from_slice(&v.to_le_bytes());
    }
    fn u64(&mut self, v: u64) {
        self.0.extend_from_slice(&v.to_le_bytes());
    }
    fn i32(&mut self, v: i32) {
        self.0.extend_from_slice(&v.to_le_bytes());
    }
    fn i64(&mut self, v: i64) {
        self.0.extend_from_slice(&v.to_le_bytes());
    }
    /// u32 little-endian byte length, then the UTF-8 bytes.
    fn str(&mut self, s: &str) {
        self.u32(u32::try_from(s.len()).expect("fields are far below 4 GiB"));
        self.0.extend_from_slice(s.as_bytes());
    }
    /// 0x00 when absent; 0x01 then the value when present.
    fn opt<T>(&mut self, v: Option<T>, write: impl FnOnce(&mut Self, T)) {
        match v {
            None => self.u8(0),
            Some(x) => {
                self.u8(1);
                write(self, x);
            }
        }
    }
}

/// The canonical bytes of an entry (everything but its hashes): v1, or v2 when it names the
/// role that recorded it.
pub fn encode(e: &Entry) -> Vec<u8> {
    let mut w = Writer(Vec::with_capacity(encoded_len(e)));
    w.u8(match e.recorded_by {
        None => VERSION,
        Some(_) => ENTRY_RECORDED_BY,
    });
    w.str(&e.project);
    w.u64(e.seq);
    w.u8(e.kind.ordinal());
    w.str(&e.site);
    w.i32(epoch_days(e.period.from));
    w.i32(epoch_days(e.period.to));
    w.u32(u32::try_from(e.reading.0.len()).expect("few reading fields"));
    for (name, value) in &e.reading.0 {
        w.str(name);
        w.str(value);
    }
    w.i64(e.mass.grams());
    w.u8(e.sign.ordinal());
    w.i64(e.recorded_at.timestamp_micros());
    w.str(&e.key);
    w.opt(e.meter.as_deref(), Writer::str);
    w.opt(e.note.as_deref(), Writer::str);
    w.opt(e.corrects, Writer::u64);
    w.opt(e.reason.as_deref(), Writer::str);
    w.opt(e.evidence.as_ref(), |w, ev| {
        w.str(&ev.file_name);
        w.0.extend_from_slice(&ev.sha256.0);
    });
    if let Some(role) = &e.recorded_by {
        w.str(role);
    }
    w.0
}

/// The length of an entry's canonical bytes, give or take a few: the walk encodes every entry of
/// a chain, so the buffer is sized once rather than grown.
fn encoded_len(e: &Entry) -> usize {
    let texts = [&e.meter, &e.note, &e.reason, &e.recorded_by]
        .into_iter()
        .flatten()
        .map(|t| 4 + t.len());
    let reading = e.reading.0.iter().map(|(n, v)| 8 + n.len() + v.len());
    let evidence = e.evidence.as_ref().map_or(0, |v| 36 + v.file_name.len());
    96 + e.project.len()
        + e.site.len()
        + e.key.len()
        + evidence
        + texts.chain(reading).sum::<usize>()
}

/// The canonical bytes of a project's registration, whose hash the projects table keeps.
pub fn encode_project(p: &Project) -> Vec<u8> {
    let mut w = Writer::default();
    w.u8(VERSION);
    w.str("project");
    w.str(&p.code);
    w.str(&p.name);
    w.str(p.method.name());
    w.str(&p.operator);
    w.opt(p.permit_ref.as_deref(), Writer::str);
    w.opt(p.permit_capacity.map(|m| m.grams()), Writer::i64);
    w.opt(p.permit_annual.map(|m| m.grams()), Writer::i64);
    w.i64(p.registered_at.timestamp_micros());
    w.0
}

/// The canonical bytes of a site's registration.
pub fn encode_site(s: &Site) -> Vec<u8> {
    let mut w = Writer::default();
    w.u8(VERSION);
    w.str("site");
    w.str(&s.project);
    w.str(&s.code);
    w.str(s.kind.name());
    w.opt(s.area.as_deref(), Writer::str);
    w.opt(s.uncertainty.as_deref(), Writer::str);
    w.i64(s.registered_at.timestamp_micros());
    w.0
}

/// The canonical bytes of a project setting. The effective date follows only where the row has
/// one, and the source only where it has one (always after a date), so rows written before
/// either existed keep their hashes.
pub fn encode_setting(s: &super::setting::Setting) -> Vec<u8> {
    let mut w = Writer::default();
    w.u8(VERSION);
    w.str("setting");
    w.str(&s.project);
    w.u64(s.seq);
    w.str(s.name.name());
    w.str(&s.value);
    w.i64(s.recorded_at.timestamp_micros());
    if let Some(d) = s.effective {
        w.i32(epoch_days(d));
    }
    if let Some(source) = &s.source {
        w.str(source);
    }
    w.0
}

/// The canonical bytes of a feedstock's registration, whose hash the feedstocks table keeps.
pub fn encode_feedstock(f: &Feedstock) -> Vec<u8> {
    let pairs = |w: &mut Writer, list: &[(String, String)]| {
        w.u32(u32::try_from(list.len()).expect("few constituents"));
        for (name, value) in list {
            w.str(name);
            w.str(value);
        }
    };
    let mut w = Writer::default();
    w.u8(VERSION);
    w.str("feedstock");
    w.str(&f.project);
    w.str(&f.code);
    pairs(&mut w, &f.oxides);
    w.str(&f.oxide_unit);
    pairs(&mut w, &f.elements);
    w.str(&f.element_unit);
    w.str(&f.density);
    w.opt(f.d80.as_deref(), Writer::str);
    w.i64(f.registered_at.timestamp_micros());
    w.0
}

/// The bytes a statement's ed25519 signature is made over: what is signed, by whom in which
/// role, over which tree head, when.
pub fn encode_statement(s: &super::signature::Signed) -> Vec<u8> {
    let mut w = Writer::default();
    w.u8(VERSION);
    w.str("statement");
    w.str(&s.project);
    w.u64(s.seal_seq);
    w.str(&s.period);
    w.u64(s.tree_size);
    w.0.extend_from_slice(&s.root.0);
    w.str(s.role.name());
    w.str(&s.statement);
    w.i64(s.signed_at.timestamp_micros());
    w.0
}

/// The bytes of a stored statement, whose hash the signatures table keeps: its seq, the signed
/// bytes, the public key and the signature.
pub fn encode_signature_row(s: &super::signature::Statement) -> Vec<u8> {
    let mut w = Writer::default();
    w.u8(VERSION);
    w.str("signature");
    w.u64(s.seq);
    let signed = encode_statement(&s.signed);
    w.u32(u32::try_from(signed.len()).expect("statements are far below 4 GiB"));
    w.0.extend_from_slice(&signed);
    w.0.extend_from_slice(&s.public_key);
    w.0.extend_from_slice(&s.signature);
    w.0
}

/// The bytes of a recorded reconciliation, whose hash the reconciliations table keeps; they
/// open with the hash of the record before it, so the records of a project form one run.
pub fn encode_reconciliation(r: &super::reconciliation::Recorded) -> Vec<u8> {
    let mut w = Writer::default();
    w.u8(VERSION);
    w.str("reconciliation");
    w.str(&r.project);
    w.u64(r.seq);
    w.0.extend_from_slice(&r.previous.0);
    w.str(&r.report_name);
    w.0.extend_from_slice(&r.report_sha256.0);
    w.str(&r.method);
    w.str(&r.materiality);
    w.str(&r.basis);
    w.u64(r.chain_size);
    w.0.extend_from_slice(&r.chain_head.0);
    w.u32(u32::try_from(r.lines.len()).expect("few lines"));
    for l in &r.lines {
        w.str(&l.period);
        w.str(&l.quantity);
        w.opt(l.ledger_g, Writer::i64);
        w.opt(l.report_g, Writer::i64);
        w.i64(l.difference_g);
        w.str(&l.note);
    }
    w.u32(u32::try_from(r.years.len()).expect("few years"));
    for y in &r.years {
        w.i32(y.year);
        w.i64(y.stored_g);
        w.str(&y.counted);
        w.i64(y.misstatement_g);
        w.i64(y.threshold_g);
        w.str(&y.verdict);
    }
    w.str(&r.verdict);
    w.str(r.role.name());
    w.opt(r.by.as_deref(), Writer::str);
    w.opt(r.recorded_by.as_deref(), Writer::str);
    w.i64(r.recorded_at.timestamp_micros());
    w.0
}

/// The canonical bytes of an import's row: which file went into which project, as what, how it
/// was read and when. Its id is not among them (a bundle's import takes the next id of the
/// ledger it goes into); the ledger chain's link names the id.
pub fn encode_import(i: &super::ledger_chain::ImportRecord<'_>) -> Vec<u8> {
    let mut w = Writer::default();
    w.u8(VERSION);
    w.str("import");
    w.str(i.project);
    w.str(i.file_name);
    w.0.extend_from_slice(&i.file_sha256.0);
    w.str(i.kind);
    w.u64(i.row_count);
    w.str(i.columns_map);
    w.str(i.density);
    w.u64(i.byte_count);
    w.i64(i.imported_at.timestamp_micros());
    w.0
}

/// The canonical bytes of a link of the ledger chain.
pub fn encode_link(l: &super::ledger_chain::Link) -> Vec<u8> {
    let mut w = Writer::default();
    w.u8(VERSION);
    w.str("link");
    w.u64(l.seq);
    w.str(l.record.name());
    w.str(&l.project);
    w.str(&l.item);
    w.0.extend_from_slice(&l.row.0);
    w.0
}
