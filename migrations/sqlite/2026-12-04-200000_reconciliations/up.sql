-- Reconciliations recorded against a project: a verifier's (or the operator's) comparison of
-- the ledger with one monitoring report, kept as evidence about its periods. Not entries: they
-- change no figure and no seal. Append-only and hashed like every table (row_hash over the
-- canonical bytes, docs/ledger-format.md); each row's bytes open with the previous row's hash,
-- so a row removed from the middle or altered is seen by `verify`.
CREATE TABLE reconciliations (
    project TEXT NOT NULL REFERENCES projects (code),
    seq INTEGER NOT NULL CHECK (seq >= 0),
    previous TEXT NOT NULL,
    report_name TEXT NOT NULL,
    report_sha256 TEXT NOT NULL,
    method TEXT NOT NULL,
    materiality TEXT NOT NULL,
    basis TEXT NOT NULL,
    chain_size INTEGER NOT NULL CHECK (chain_size >= 0),
    chain_head TEXT NOT NULL,
    lines TEXT NOT NULL,
    years TEXT NOT NULL,
    verdict TEXT NOT NULL,
    role TEXT NOT NULL,
    by_name TEXT,
    recorded_by TEXT,
    recorded_at TEXT NOT NULL,
    row_hash TEXT NOT NULL,
    PRIMARY KEY (project, seq)
) STRICT;

CREATE TRIGGER reconciliations_append_only_update BEFORE UPDATE ON reconciliations
BEGIN SELECT RAISE(ABORT, 'sinkbook ledger is append-only: reconciliations cannot be updated'); END;
CREATE TRIGGER reconciliations_append_only_delete BEFORE DELETE ON reconciliations
BEGIN SELECT RAISE(ABORT, 'sinkbook ledger is append-only: reconciliations cannot be deleted'); END;
CREATE TRIGGER reconciliations_append_only_replace BEFORE INSERT ON reconciliations
WHEN EXISTS (SELECT 1 FROM reconciliations WHERE project = NEW.project AND seq = NEW.seq)
BEGIN SELECT RAISE(ABORT, 'sinkbook ledger is append-only: reconciliations cannot be replaced'); END;
