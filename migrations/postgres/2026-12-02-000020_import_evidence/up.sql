-- Each import keeps its meter file's bytes verbatim, in parts, as its evidence (as in
-- migrations/sqlite): the rows are re-read from them; one raw row per reading is no longer kept.

ALTER TABLE imports ADD COLUMN columns_map TEXT COLLATE "C" NOT NULL DEFAULT '';
ALTER TABLE imports ADD COLUMN density TEXT COLLATE "C" NOT NULL DEFAULT 'eos';
ALTER TABLE imports ADD COLUMN byte_count BIGINT NOT NULL DEFAULT 0;

CREATE TABLE import_evidence (
    import_id BIGINT NOT NULL,
    part BIGINT NOT NULL CHECK (part >= 0),
    bytes BYTEA NOT NULL,
    PRIMARY KEY (import_id, part)
);
SELECT sinkbook_make_append_only('import_evidence');

-- DROP fires no row trigger: the table of raw rows goes whole, as on SQLite.
DROP TABLE readings;
