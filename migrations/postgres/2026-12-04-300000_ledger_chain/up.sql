-- The ledger's own chain (as in migrations/sqlite, docs/ledger-format.md "The ledger chain"):
-- one link per project, site, setting, feedstock, import, signed statement, recorded
-- reconciliation and seal. No
-- foreign key, so a link outlives a deleted row and names it.

CREATE TABLE ledger_chain (
    seq BIGINT PRIMARY KEY NOT NULL CHECK (seq >= 0),
    record TEXT COLLATE "C" NOT NULL,
    project TEXT COLLATE "C" NOT NULL,
    item TEXT COLLATE "C" NOT NULL,
    row_hash TEXT COLLATE "C" NOT NULL,
    leaf_hash TEXT COLLATE "C" NOT NULL,
    chain_hash TEXT COLLATE "C" NOT NULL,
    UNIQUE (record, project, item)
);
SELECT sinkbook_make_append_only('ledger_chain');

-- Who links what: an operator's role links the rows it writes, in its own projects; a
-- verifier's role links the statements it signs and the reconciliations it records. Everyone reads.
REVOKE ALL ON ledger_chain FROM PUBLIC;
GRANT SELECT ON ledger_chain TO sinkbook_operator, sinkbook_verifier, sinkbook_regulator;
GRANT INSERT ON ledger_chain TO sinkbook_operator, sinkbook_verifier;
ALTER TABLE ledger_chain ENABLE ROW LEVEL SECURITY;
CREATE POLICY ledger_chain_read ON ledger_chain FOR SELECT USING (true);
CREATE POLICY ledger_chain_operator_writes ON ledger_chain FOR INSERT TO sinkbook_operator
    WITH CHECK (sinkbook_operates(project));
CREATE POLICY ledger_chain_verifier_writes ON ledger_chain FOR INSERT TO sinkbook_verifier
    WITH CHECK (record IN ('signature', 'reconciliation') AND EXISTS (SELECT 1 FROM registry_roles r
                WHERE r.role_name = current_user::text AND r.kind = 'verifier'));

-- The rows a registry already holds get their links when its owner next opens it (see
-- migrations/sqlite): sinkbook links them and drops this table in one transaction.
CREATE TABLE ledger_chain_to_link (pending INTEGER NOT NULL);
INSERT INTO ledger_chain_to_link VALUES (1);
