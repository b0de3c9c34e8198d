-- Raw meter readings as imported, kept beside the entries they roll up into, so a verifier can
-- recompute every daily total from the rows of the file. Append-only like the rest.

CREATE TABLE imports (
    id INTEGER PRIMARY KEY,
    project TEXT NOT NULL REFERENCES projects (code),
    file_name TEXT NOT NULL,
    file_sha256 TEXT NOT NULL,
    kind TEXT NOT NULL,
    row_count INTEGER NOT NULL,
    imported_at TEXT NOT NULL,
    UNIQUE (project, file_sha256)
) STRICT;

-- One row per accepted line of the file, kept as written (raw), with the line number, the meter,
-- the meter's day and the grams sinkbook read from it, so any daily entry can be recomputed from
-- its rows. The import row is written after its readings (in the same transaction), so there is
-- no foreign key here.
CREATE TABLE readings (
    import_id INTEGER NOT NULL,
    line INTEGER NOT NULL,
    meter TEXT NOT NULL,
    day TEXT NOT NULL,
    grams INTEGER NOT NULL,
    raw TEXT NOT NULL,
    PRIMARY KEY (import_id, line)
) STRICT, WITHOUT ROWID;

CREATE TRIGGER imports_append_only_update BEFORE UPDATE ON imports
BEGIN SELECT RAISE(ABORT, 'sinkbook ledger is append-only: imports cannot be updated'); END;
CREATE TRIGGER imports_append_only_delete BEFORE DELETE ON imports
BEGIN SELECT RAISE(ABORT, 'sinkbook ledger is append-only: imports cannot be deleted'); END;
CREATE TRIGGER readings_append_only_update BEFORE UPDATE ON readings
BEGIN SELECT RAISE(ABORT, 'sinkbook ledger is append-only: readings cannot be updated'); END;
CREATE TRIGGER readings_append_only_delete BEFORE DELETE ON readings
BEGIN SELECT RAISE(ABORT, 'sinkbook ledger is append-only: readings cannot be deleted'); END;
