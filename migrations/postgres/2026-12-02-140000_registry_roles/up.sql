-- Who may write what in a shared registry, enforced by the server itself.
--
-- Three group roles (cluster-wide in PostgreSQL, so created once and shared by every registry
-- on the server): operators write their own projects, verifiers read everything, regulators
-- only read. `sinkbook registry role add` creates login roles in them and records each in
-- registry_roles; row-level security keys on that table, so an operator's role inserts
-- projects, sites, settings, feedstocks, imports (with their kept bytes) and entries only where the project's operator
-- is the role's; verifiers' roles add signed statements over seals. No application role holds UPDATE, DELETE or TRUNCATE on any table, and the
-- append-only triggers refuse them even to the owner.

DO $$
DECLARE g TEXT;
BEGIN
    FOREACH g IN ARRAY ARRAY['sinkbook_operator', 'sinkbook_verifier', 'sinkbook_regulator'] LOOP
        BEGIN
            EXECUTE format('CREATE ROLE %I NOLOGIN', g);
        EXCEPTION WHEN duplicate_object OR unique_violation THEN
            NULL; -- made by another registry on this server
        END;
    END LOOP;
END;
$$;

CREATE TABLE registry_roles (
    role_name TEXT COLLATE "C" PRIMARY KEY NOT NULL,
    kind TEXT COLLATE "C" NOT NULL CHECK (kind IN ('operator', 'verifier', 'regulator')),
    operator TEXT COLLATE "C" CHECK ((kind = 'operator') = (operator IS NOT NULL)),
    created_at TIMESTAMP NOT NULL
);
SELECT sinkbook_make_append_only('registry_roles');

-- The operator a role writes for, or NULL when it is no operator's role.
CREATE FUNCTION sinkbook_operator_of(role_name TEXT) RETURNS TEXT LANGUAGE sql STABLE AS $$
    SELECT r.operator FROM registry_roles r WHERE r.role_name = $1 AND r.kind = 'operator'
$$;

-- Whether the current role writes for the operator of `project`.
CREATE FUNCTION sinkbook_operates(project TEXT) RETURNS boolean LANGUAGE sql STABLE AS $$
    SELECT EXISTS (SELECT 1 FROM projects p
                   WHERE p.code = $1 AND p.operator = sinkbook_operator_of(current_user::text))
$$;

-- Every entry names the database role that wrote it; set by the server, never by the writer.
ALTER TABLE entries ADD COLUMN recorded_by TEXT NOT NULL DEFAULT current_user;
CREATE FUNCTION sinkbook_recorded_by() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
    NEW.recorded_by := current_user;
    RETURN NEW;
END;
$$;
CREATE TRIGGER entries_recorded_by BEFORE INSERT ON entries
    FOR EACH ROW EXECUTE FUNCTION sinkbook_recorded_by();

REVOKE ALL ON ALL TABLES IN SCHEMA public FROM PUBLIC;
GRANT SELECT ON ALL TABLES IN SCHEMA public
    TO sinkbook_operator, sinkbook_verifier, sinkbook_regulator;
ALTER DEFAULT PRIVILEGES IN SCHEMA public GRANT SELECT ON TABLES
    TO sinkbook_operator, sinkbook_verifier, sinkbook_regulator;
GRANT INSERT ON projects, sites, entries, settings, feedstocks, imports, import_evidence
    TO sinkbook_operator;
GRANT USAGE ON SEQUENCE imports_id_seq TO sinkbook_operator;
GRANT INSERT ON signatures TO sinkbook_operator, sinkbook_verifier;

DO $$
DECLARE t TEXT;
BEGIN
    FOREACH t IN ARRAY ARRAY['projects', 'sites', 'entries', 'settings', 'feedstocks', 'imports',
                             'import_evidence', 'signatures', 'registry_roles'] LOOP
        EXECUTE format('ALTER TABLE %I ENABLE ROW LEVEL SECURITY', t);
        EXECUTE format('CREATE POLICY %I ON %I FOR SELECT USING (true)', t || '_read', t);
    END LOOP;
    FOREACH t IN ARRAY ARRAY['sites', 'entries', 'settings', 'feedstocks', 'imports',
                             'signatures'] LOOP
        EXECUTE format('CREATE POLICY %I ON %I FOR INSERT TO sinkbook_operator '
                       'WITH CHECK (sinkbook_operates(project))', t || '_operator_writes', t);
    END LOOP;
END;
$$;

CREATE POLICY projects_operator_writes ON projects FOR INSERT TO sinkbook_operator
    WITH CHECK (operator = sinkbook_operator_of(current_user::text));

-- An import's kept bytes are written just before its import row: an operator may add parts
-- under an import id no import holds yet, or under one of its own projects' imports.
CREATE POLICY import_evidence_operator_writes ON import_evidence FOR INSERT TO sinkbook_operator
    WITH CHECK (NOT EXISTS (SELECT 1 FROM imports i WHERE i.id = import_id)
                OR EXISTS (SELECT 1 FROM imports i WHERE i.id = import_id
                           AND sinkbook_operates(i.project)));

-- A verifier's role signs statements over any project's seals, and writes nothing else.
CREATE POLICY signatures_verifier_writes ON signatures FOR INSERT TO sinkbook_verifier
    WITH CHECK (EXISTS (SELECT 1 FROM registry_roles r
                        WHERE r.role_name = current_user::text AND r.kind = 'verifier'));
