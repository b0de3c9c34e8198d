-- Seals and signed statements (as in migrations/sqlite). A seal stands at no site, so
-- entries.site is NULL for seals and only for them. PostgreSQL drops NOT NULL in place.

ALTER TABLE entries ALTER COLUMN site DROP NOT NULL;
ALTER TABLE entries ADD CONSTRAINT entries_site_iff_not_seal CHECK ((site IS NULL) = (kind = 'seal'));

-- Statements signed over a seal's tree head, by the operator or a verifier.
CREATE TABLE signatures (
    project TEXT COLLATE "C" NOT NULL REFERENCES projects (code),
    seq BIGINT NOT NULL CHECK (seq >= 0),
    seal_seq BIGINT NOT NULL,
    period TEXT COLLATE "C" NOT NULL,
    tree_size BIGINT NOT NULL,
    root TEXT COLLATE "C" NOT NULL,
    role TEXT COLLATE "C" NOT NULL,
    statement TEXT COLLATE "C" NOT NULL,
    signed_at TEXT COLLATE "C" NOT NULL,
    public_key TEXT COLLATE "C" NOT NULL,
    signature TEXT COLLATE "C" NOT NULL,
    row_hash TEXT COLLATE "C" NOT NULL,
    PRIMARY KEY (project, seq),
    FOREIGN KEY (project, seal_seq) REFERENCES entries (project, seq)
);
SELECT sinkbook_make_append_only('signatures');
