-- Each import keeps its meter file's bytes verbatim, in parts, as its evidence: the rows are
-- re-read from them (`readings`, `reconcile --recompute`) and `verify` recomputes their SHA-256
-- against the entries that name the file. The import records how the file was read (column
-- map, density method), so a re-read gives the same meter-days. One raw row per reading is no
-- longer kept: the bytes are the exact evidence, at a fraction of the writes.

ALTER TABLE imports ADD COLUMN columns_map TEXT NOT NULL DEFAULT '';
ALTER TABLE imports ADD COLUMN density TEXT NOT NULL DEFAULT 'eos';
ALTER TABLE imports ADD COLUMN byte_count INTEGER NOT NULL DEFAULT 0;

CREATE TABLE import_evidence (
    import_id INTEGER NOT NULL,
    part INTEGER NOT NULL CHECK (part >= 0),
    bytes BLOB NOT NULL,
    PRIMARY KEY (import_id, part)
) STRICT;

CREATE TRIGGER import_evidence_append_only_update BEFORE UPDATE ON import_evidence
BEGIN SELECT RAISE(ABORT, 'sinkbook ledger is append-only: import evidence cannot be updated'); END;
CREATE TRIGGER import_evidence_append_only_delete BEFORE DELETE ON import_evidence
BEGIN SELECT RAISE(ABORT, 'sinkbook ledger is append-only: import evidence cannot be deleted'); END;

DROP TRIGGER readings_append_only_update;
DROP TRIGGER readings_append_only_delete;
DROP TABLE readings;
