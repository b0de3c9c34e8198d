-- Seals and signed statements. A seal entry closes a reporting period of the whole project and
-- stands at no site, so entries.site becomes NULL for seals (and only for them; the foreign key
-- to sites holds for every other entry). SQLite cannot drop NOT NULL in place: the table is
-- rebuilt and its rows copied exactly as they are, hashes included.

CREATE TABLE entries_with_seals (
    project TEXT NOT NULL REFERENCES projects (code),
    seq INTEGER NOT NULL CHECK (seq >= 0),
    kind TEXT NOT NULL,
    site TEXT CHECK ((site IS NULL) = (kind = 'seal')),
    period_from TEXT NOT NULL,
    period_to TEXT NOT NULL,
    reading TEXT NOT NULL,
    grams INTEGER NOT NULL,
    sign TEXT NOT NULL,
    recorded_at TEXT NOT NULL,
    idem_key TEXT NOT NULL,
    meter TEXT,
    note TEXT,
    corrects INTEGER,
    reason TEXT,
    evidence_name TEXT,
    evidence_sha256 TEXT,
    leaf_hash TEXT NOT NULL,
    chain_hash TEXT NOT NULL,
    PRIMARY KEY (project, seq),
    UNIQUE (project, idem_key),
    FOREIGN KEY (project, site) REFERENCES sites (project, code)
) STRICT;

INSERT INTO entries_with_seals SELECT * FROM entries;
DROP TABLE entries;
ALTER TABLE entries_with_seals RENAME TO entries;

CREATE TRIGGER entries_append_only_update BEFORE UPDATE ON entries
BEGIN SELECT RAISE(ABORT, 'sinkbook ledger is append-only: entries cannot be updated'); END;
CREATE TRIGGER entries_append_only_delete BEFORE DELETE ON entries
BEGIN SELECT RAISE(ABORT, 'sinkbook ledger is append-only: entries cannot be deleted'); END;

-- Statements signed over a seal's tree head, by the operator or a verifier. Their own table,
-- append-only and hashed (row_hash over the canonical bytes, docs/ledger-format.md), so a role
-- that may only add statements never writes into the operator's chain.
CREATE TABLE signatures (
    project TEXT NOT NULL REFERENCES projects (code),
    seq INTEGER NOT NULL CHECK (seq >= 0),
    seal_seq INTEGER NOT NULL,
    period TEXT NOT NULL,
    tree_size INTEGER NOT NULL,
    root TEXT NOT NULL,
    role TEXT NOT NULL,
    statement TEXT NOT NULL,
    signed_at TEXT NOT NULL,
    public_key TEXT NOT NULL,
    signature TEXT NOT NULL,
    row_hash TEXT NOT NULL,
    PRIMARY KEY (project, seq),
    FOREIGN KEY (project, seal_seq) REFERENCES entries (project, seq)
) STRICT;

CREATE TRIGGER signatures_append_only_update BEFORE UPDATE ON signatures
BEGIN SELECT RAISE(ABORT, 'sinkbook ledger is append-only: signatures cannot be updated'); END;
CREATE TRIGGER signatures_append_only_delete BEFORE DELETE ON signatures
BEGIN SELECT RAISE(ABORT, 'sinkbook ledger is append-only: signatures cannot be deleted'); END;
