-- Project settings that change over time (as in migrations/sqlite), append-only.

CREATE TABLE settings (
    project TEXT COLLATE "C" NOT NULL REFERENCES projects (code),
    seq BIGINT NOT NULL CHECK (seq >= 0),
    name TEXT COLLATE "C" NOT NULL,
    value TEXT COLLATE "C" NOT NULL,
    recorded_at TIMESTAMP NOT NULL,
    row_hash TEXT COLLATE "C" NOT NULL,
    PRIMARY KEY (project, seq)
);

SELECT sinkbook_make_append_only('settings');
