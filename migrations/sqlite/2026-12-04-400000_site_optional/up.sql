-- A leakage or a reversal may name no site: its pathway (a fault, a legacy well) need not be a
-- site of the project. Seals still stand at no site and every other entry at one. SQLite cannot
-- change a CHECK in place, so the table is rebuilt and its rows copied exactly as they are,
-- hashes included.
--
-- signatures references entries (project, seq), and with foreign keys on (they are, and cannot
-- be turned off inside the migration's transaction) renaming or dropping entries would carry
-- or break that reference. So signatures is set aside first and rebuilt after, with the very
-- text it had; both tables' triggers and entries' index are recreated with the text they had
-- (tests/migrations.rs compares sqlite_master before and after).

ALTER TABLE signatures RENAME TO signatures_before_site_optional;
ALTER TABLE entries RENAME TO entries_before_site_optional;

CREATE TABLE entries (
    project TEXT NOT NULL REFERENCES projects (code),
    seq INTEGER NOT NULL CHECK (seq >= 0),
    kind TEXT NOT NULL,
    site TEXT CHECK (CASE kind WHEN 'seal' THEN site IS NULL
                               WHEN 'leakage' THEN 1
                               WHEN 'reversal' THEN 1
                               ELSE site IS NOT NULL END),
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
    recorded_by TEXT,
    PRIMARY KEY (project, seq),
    UNIQUE (project, idem_key),
    FOREIGN KEY (project, site) REFERENCES sites (project, code)
) STRICT;

INSERT INTO entries (project, seq, kind, site, period_from, period_to, reading, grams, sign,
                     recorded_at, idem_key, meter, note, corrects, reason, evidence_name,
                     evidence_sha256, leaf_hash, chain_hash, recorded_by)
SELECT project, seq, kind, site, period_from, period_to, reading, grams, sign, recorded_at,
       idem_key, meter, note, corrects, reason, evidence_name, evidence_sha256, leaf_hash,
       chain_hash, recorded_by
FROM entries_before_site_optional ORDER BY rowid;

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

INSERT INTO signatures (project, seq, seal_seq, period, tree_size, root, role, statement,
                        signed_at, public_key, signature, row_hash)
SELECT project, seq, seal_seq, period, tree_size, root, role, statement, signed_at, public_key,
       signature, row_hash
FROM signatures_before_site_optional ORDER BY rowid;

-- The child first, so the old entries table is no one's parent when it goes; each takes its
-- triggers and index with it.
DROP TABLE signatures_before_site_optional;
DROP TABLE entries_before_site_optional;

CREATE TRIGGER entries_append_only_update BEFORE UPDATE ON entries
BEGIN SELECT RAISE(ABORT, 'sinkbook ledger is append-only: entries cannot be updated'); END;
CREATE TRIGGER entries_append_only_delete BEFORE DELETE ON entries
BEGIN SELECT RAISE(ABORT, 'sinkbook ledger is append-only: entries cannot be deleted'); END;
CREATE TRIGGER entries_append_only_replace BEFORE INSERT ON entries
WHEN EXISTS (SELECT 1 FROM entries WHERE project = NEW.project AND seq = NEW.seq)
  OR EXISTS (SELECT 1 FROM entries WHERE project = NEW.project AND idem_key = NEW.idem_key)
BEGIN SELECT RAISE(ABORT, 'sinkbook ledger is append-only: entries cannot be replaced'); END;
CREATE INDEX entries_corrects ON entries (project, corrects) WHERE corrects IS NOT NULL;

CREATE TRIGGER signatures_append_only_update BEFORE UPDATE ON signatures
BEGIN SELECT RAISE(ABORT, 'sinkbook ledger is append-only: signatures cannot be updated'); END;
CREATE TRIGGER signatures_append_only_delete BEFORE DELETE ON signatures
BEGIN SELECT RAISE(ABORT, 'sinkbook ledger is append-only: signatures cannot be deleted'); END;
CREATE TRIGGER signatures_append_only_replace BEFORE INSERT ON signatures
WHEN EXISTS (SELECT 1 FROM signatures WHERE project = NEW.project AND seq = NEW.seq)
BEGIN SELECT RAISE(ABORT, 'sinkbook ledger is append-only: signatures cannot be replaced'); END;
