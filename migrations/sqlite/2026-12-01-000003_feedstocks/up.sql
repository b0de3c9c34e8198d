-- Feedstocks of enhanced-weathering projects: the rock's analysis as the laboratory reported
-- it, registered once. Append-only like the rest; row_hash is SHA-256(0x00 || canonical bytes)
-- (docs/ledger-format.md), checked by `verify`.

CREATE TABLE feedstocks (
    project TEXT NOT NULL REFERENCES projects (code),
    code TEXT NOT NULL,
    -- JSON array of [oxide, value] pairs, values as exact decimal text, in oxide_unit.
    oxides TEXT NOT NULL,
    oxide_unit TEXT NOT NULL,
    -- JSON array of [element, value] pairs in element_unit (may be empty).
    elements TEXT NOT NULL,
    element_unit TEXT NOT NULL,
    density TEXT NOT NULL,
    d80 TEXT,
    created_at TEXT NOT NULL,
    row_hash TEXT NOT NULL,
    PRIMARY KEY (project, code)
) STRICT;

CREATE TRIGGER feedstocks_append_only_update BEFORE UPDATE ON feedstocks
BEGIN SELECT RAISE(ABORT, 'sinkbook ledger is append-only: feedstocks cannot be updated'); END;
CREATE TRIGGER feedstocks_append_only_delete BEFORE DELETE ON feedstocks
BEGIN SELECT RAISE(ABORT, 'sinkbook ledger is append-only: feedstocks cannot be deleted'); END;
