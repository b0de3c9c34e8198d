-- The ledger's own chain (docs/ledger-format.md, "The ledger chain"): one link per project,
-- site, setting, feedstock, import, signed statement, recorded reconciliation and seal, naming
-- the row and its hash,
-- each link hashed onto the one before it like a project's entries. A project deleted with its
-- rows leaves its links behind, so `verify` names it; links have no foreign key for that reason.
-- Append-only like the rest, with the three triggers every such table has.

CREATE TABLE ledger_chain (
    seq INTEGER PRIMARY KEY NOT NULL CHECK (seq >= 0),
    record TEXT NOT NULL,
    project TEXT NOT NULL,
    item TEXT NOT NULL,
    row_hash TEXT NOT NULL,
    leaf_hash TEXT NOT NULL,
    chain_hash TEXT NOT NULL,
    UNIQUE (record, project, item)
) STRICT;

CREATE TRIGGER ledger_chain_append_only_update BEFORE UPDATE ON ledger_chain
BEGIN SELECT RAISE(ABORT, 'sinkbook ledger is append-only: ledger chain cannot be updated'); END;
CREATE TRIGGER ledger_chain_append_only_delete BEFORE DELETE ON ledger_chain
BEGIN SELECT RAISE(ABORT, 'sinkbook ledger is append-only: ledger chain cannot be deleted'); END;
CREATE TRIGGER ledger_chain_append_only_replace BEFORE INSERT ON ledger_chain
WHEN EXISTS (SELECT 1 FROM ledger_chain WHERE seq = NEW.seq)
  OR EXISTS (SELECT 1 FROM ledger_chain
             WHERE record = NEW.record AND project = NEW.project AND item = NEW.item)
BEGIN SELECT RAISE(ABORT, 'sinkbook ledger is append-only: ledger chain cannot be replaced'); END;

-- The rows a ledger already holds get their links when it is first opened after this
-- migration (hashing needs SHA-256, which SQL here lacks): sinkbook links them, in the same
-- transaction drops this table, and never links a row twice.
CREATE TABLE ledger_chain_to_link (pending INTEGER NOT NULL) STRICT;
INSERT INTO ledger_chain_to_link VALUES (1);
