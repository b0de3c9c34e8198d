-- Reconciliations recorded against a project (as in migrations/sqlite): append-only, hashed,
-- each row's bytes opening with the previous row's hash. The row names the registry role that
-- recorded it, and the server refuses any other name than the writing role's. Operators record
-- reconciliations of their own projects, verifiers of any project.
CREATE TABLE reconciliations (
    project TEXT COLLATE "C" NOT NULL REFERENCES projects (code),
    seq BIGINT NOT NULL CHECK (seq >= 0),
    previous TEXT COLLATE "C" NOT NULL,
    report_name TEXT COLLATE "C" NOT NULL,
    report_sha256 TEXT COLLATE "C" NOT NULL,
    method TEXT COLLATE "C" NOT NULL,
    materiality TEXT COLLATE "C" NOT NULL,
    basis TEXT COLLATE "C" NOT NULL,
    chain_size BIGINT NOT NULL CHECK (chain_size >= 0),
    chain_head TEXT COLLATE "C" NOT NULL,
    lines TEXT COLLATE "C" NOT NULL,
    years TEXT COLLATE "C" NOT NULL,
    verdict TEXT COLLATE "C" NOT NULL,
    role TEXT COLLATE "C" NOT NULL,
    by_name TEXT COLLATE "C",
    recorded_by TEXT COLLATE "C",
    recorded_at TIMESTAMP NOT NULL,
    row_hash TEXT COLLATE "C" NOT NULL,
    PRIMARY KEY (project, seq)
);
SELECT sinkbook_make_append_only('reconciliations');
GRANT SELECT ON reconciliations TO sinkbook_operator, sinkbook_verifier, sinkbook_regulator;

CREATE FUNCTION sinkbook_reconciliation_recorded_by() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
    IF NEW.recorded_by IS NOT NULL AND NEW.recorded_by <> current_user::text THEN
        RAISE EXCEPTION 'reconciliation % of project % names % as the role that recorded it, but % is writing it',
            NEW.seq, NEW.project, NEW.recorded_by, current_user
            USING ERRCODE = 'insufficient_privilege';
    END IF;
    RETURN NEW;
END;
$$;
CREATE TRIGGER reconciliations_recorded_by BEFORE INSERT ON reconciliations
    FOR EACH ROW EXECUTE FUNCTION sinkbook_reconciliation_recorded_by();

GRANT INSERT ON reconciliations TO sinkbook_operator, sinkbook_verifier;
ALTER TABLE reconciliations ENABLE ROW LEVEL SECURITY;
CREATE POLICY reconciliations_read ON reconciliations FOR SELECT USING (true);
CREATE POLICY reconciliations_operator_writes ON reconciliations FOR INSERT TO sinkbook_operator
    WITH CHECK (sinkbook_operates(project));
CREATE POLICY reconciliations_verifier_writes ON reconciliations FOR INSERT TO sinkbook_verifier
    WITH CHECK (EXISTS (SELECT 1 FROM registry_roles r
                        WHERE r.role_name = current_user::text AND r.kind = 'verifier'));
