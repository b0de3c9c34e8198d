-- sinkbook ledger, schema 1. Every table is STRICT and append-only: triggers abort any UPDATE or
-- DELETE, so a correction can only ever be a new entry. Column types stay within what
-- PostgreSQL shares (BIGINT as INTEGER, TEXT, hashes as lowercase hex, UTC timestamps as text).

CREATE TABLE projects (
    code TEXT PRIMARY KEY NOT NULL,
    name TEXT NOT NULL,
    method TEXT NOT NULL,
    operator TEXT NOT NULL,
    permit_ref TEXT,
    permit_capacity_g INTEGER,
    permit_annual_g INTEGER,
    created_at TEXT NOT NULL,
    row_hash TEXT NOT NULL
) STRICT;

CREATE TABLE sites (
    project TEXT NOT NULL REFERENCES projects (code),
    code TEXT NOT NULL,
    kind TEXT NOT NULL,
    area TEXT,
    uncertainty TEXT,
    created_at TEXT NOT NULL,
    row_hash TEXT NOT NULL,
    PRIMARY KEY (project, code)
) STRICT;

CREATE TABLE entries (
    project TEXT NOT NULL REFERENCES projects (code),
    seq INTEGER NOT NULL CHECK (seq >= 0),
    kind TEXT NOT NULL,
    site TEXT NOT NULL,
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

CREATE TRIGGER projects_append_only_update BEFORE UPDATE ON projects
BEGIN SELECT RAISE(ABORT, 'sinkbook ledger is append-only: projects cannot be updated'); END;
CREATE TRIGGER projects_append_only_delete BEFORE DELETE ON projects
BEGIN SELECT RAISE(ABORT, 'sinkbook ledger is append-only: projects cannot be deleted'); END;
CREATE TRIGGER sites_append_only_update BEFORE UPDATE ON sites
BEGIN SELECT RAISE(ABORT, 'sinkbook ledger is append-only: sites cannot be updated'); END;
CREATE TRIGGER sites_append_only_delete BEFORE DELETE ON sites
BEGIN SELECT RAISE(ABORT, 'sinkbook ledger is append-only: sites cannot be deleted'); END;
CREATE TRIGGER entries_append_only_update BEFORE UPDATE ON entries
BEGIN SELECT RAISE(ABORT, 'sinkbook ledger is append-only: entries cannot be updated'); END;
CREATE TRIGGER entries_append_only_delete BEFORE DELETE ON entries
BEGIN SELECT RAISE(ABORT, 'sinkbook ledger is append-only: entries cannot be deleted'); END;
