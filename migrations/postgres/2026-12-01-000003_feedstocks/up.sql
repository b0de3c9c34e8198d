-- Feedstocks of enhanced-weathering projects (as in migrations/sqlite), append-only.

CREATE TABLE feedstocks (
    project TEXT COLLATE "C" NOT NULL REFERENCES projects (code),
    code TEXT COLLATE "C" NOT NULL,
    oxides TEXT COLLATE "C" NOT NULL,
    oxide_unit TEXT COLLATE "C" NOT NULL,
    elements TEXT COLLATE "C" NOT NULL,
    element_unit TEXT COLLATE "C" NOT NULL,
    density TEXT COLLATE "C" NOT NULL,
    d80 TEXT COLLATE "C",
    created_at TIMESTAMP NOT NULL,
    row_hash TEXT COLLATE "C" NOT NULL,
    PRIMARY KEY (project, code)
);

SELECT sinkbook_make_append_only('feedstocks');
