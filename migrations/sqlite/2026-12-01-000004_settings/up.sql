-- Project settings that change over time (buffer share, retention model, temporary storage):
-- each `project set` appends rows; the latest row of a name recorded by a date is in force then.
-- Append-only and hashed like projects and sites.

CREATE TABLE settings (
    project TEXT NOT NULL REFERENCES projects (code),
    seq INTEGER NOT NULL CHECK (seq >= 0),
    name TEXT NOT NULL,
    value TEXT NOT NULL,
    recorded_at TEXT NOT NULL,
    row_hash TEXT NOT NULL,
    PRIMARY KEY (project, seq)
) STRICT;

CREATE TRIGGER settings_append_only_update BEFORE UPDATE ON settings
BEGIN SELECT RAISE(ABORT, 'sinkbook ledger is append-only: settings cannot be updated'); END;
CREATE TRIGGER settings_append_only_delete BEFORE DELETE ON settings
BEGIN SELECT RAISE(ABORT, 'sinkbook ledger is append-only: settings cannot be deleted'); END;
