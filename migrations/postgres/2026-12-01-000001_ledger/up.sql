-- sinkbook ledger, schema 1, on PostgreSQL: the tables of migrations/sqlite with the same names
-- and columns. BIGINT for grams and seqs (INTEGER is 4 bytes here), hashes as lowercase hex TEXT,
-- UTC times as TIMESTAMP (whole microseconds, as the canonical bytes hold them). Append-only:
-- one trigger function refuses every UPDATE, DELETE and TRUNCATE, whoever asks.

CREATE FUNCTION sinkbook_append_only() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
    RAISE EXCEPTION 'sinkbook ledger is append-only: % cannot be %', TG_TABLE_NAME,
        CASE TG_OP WHEN 'UPDATE' THEN 'updated' WHEN 'DELETE' THEN 'deleted' ELSE 'truncated' END
        USING ERRCODE = 'insufficient_privilege';
END;
$$;

-- Makes `tbl` append-only: rows can be inserted, never changed, removed or truncated away.
CREATE FUNCTION sinkbook_make_append_only(tbl regclass) RETURNS void LANGUAGE plpgsql AS $$
BEGIN
    EXECUTE format('CREATE TRIGGER %I BEFORE UPDATE OR DELETE ON %s FOR EACH ROW '
                   'EXECUTE FUNCTION sinkbook_append_only()', tbl::text || '_append_only', tbl);
    EXECUTE format('CREATE TRIGGER %I BEFORE TRUNCATE ON %s FOR EACH STATEMENT '
                   'EXECUTE FUNCTION sinkbook_append_only()', tbl::text || '_no_truncate', tbl);
END;
$$;

CREATE TABLE projects (
    code TEXT COLLATE "C" PRIMARY KEY NOT NULL,
    name TEXT COLLATE "C" NOT NULL,
    method TEXT COLLATE "C" NOT NULL,
    operator TEXT COLLATE "C" NOT NULL,
    permit_ref TEXT COLLATE "C",
    permit_capacity_g BIGINT,
    permit_annual_g BIGINT,
    created_at TIMESTAMP NOT NULL,
    row_hash TEXT COLLATE "C" NOT NULL
);

CREATE TABLE sites (
    project TEXT COLLATE "C" NOT NULL REFERENCES projects (code),
    code TEXT COLLATE "C" NOT NULL,
    kind TEXT COLLATE "C" NOT NULL,
    area TEXT COLLATE "C",
    uncertainty TEXT COLLATE "C",
    created_at TIMESTAMP NOT NULL,
    row_hash TEXT COLLATE "C" NOT NULL,
    PRIMARY KEY (project, code)
);

CREATE TABLE entries (
    project TEXT COLLATE "C" NOT NULL REFERENCES projects (code),
    seq BIGINT NOT NULL CHECK (seq >= 0),
    kind TEXT COLLATE "C" NOT NULL,
    site TEXT COLLATE "C" NOT NULL,
    period_from TEXT COLLATE "C" NOT NULL,
    period_to TEXT COLLATE "C" NOT NULL,
    reading TEXT COLLATE "C" NOT NULL,
    grams BIGINT NOT NULL,
    sign TEXT COLLATE "C" NOT NULL,
    recorded_at TIMESTAMP NOT NULL,
    idem_key TEXT COLLATE "C" NOT NULL,
    meter TEXT COLLATE "C",
    note TEXT COLLATE "C",
    corrects BIGINT,
    reason TEXT COLLATE "C",
    evidence_name TEXT COLLATE "C",
    evidence_sha256 TEXT COLLATE "C",
    leaf_hash TEXT COLLATE "C" NOT NULL,
    chain_hash TEXT COLLATE "C" NOT NULL,
    PRIMARY KEY (project, seq),
    UNIQUE (project, idem_key),
    FOREIGN KEY (project, site) REFERENCES sites (project, code)
);

SELECT sinkbook_make_append_only('projects');
SELECT sinkbook_make_append_only('sites');
SELECT sinkbook_make_append_only('entries');
