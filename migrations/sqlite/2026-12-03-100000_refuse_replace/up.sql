-- INSERT OR REPLACE (and REPLACE INTO) resolves a key conflict by deleting the row that holds
-- the key, and SQLite fires no DELETE trigger for that unless the connection set
-- recursive_triggers (sinkbook's own connections do; any other tool's need not). So each
-- append-only table refuses, before the insert, a row whose key or unique column set is
-- already held: then no conflict resolution ever runs and no stored row can be replaced.

CREATE TRIGGER projects_append_only_replace BEFORE INSERT ON projects
WHEN EXISTS (SELECT 1 FROM projects WHERE code = NEW.code)
BEGIN SELECT RAISE(ABORT, 'sinkbook ledger is append-only: projects cannot be replaced'); END;

CREATE TRIGGER sites_append_only_replace BEFORE INSERT ON sites
WHEN EXISTS (SELECT 1 FROM sites WHERE project = NEW.project AND code = NEW.code)
BEGIN SELECT RAISE(ABORT, 'sinkbook ledger is append-only: sites cannot be replaced'); END;

CREATE TRIGGER entries_append_only_replace BEFORE INSERT ON entries
WHEN EXISTS (SELECT 1 FROM entries WHERE project = NEW.project AND seq = NEW.seq)
  OR EXISTS (SELECT 1 FROM entries WHERE project = NEW.project AND idem_key = NEW.idem_key)
BEGIN SELECT RAISE(ABORT, 'sinkbook ledger is append-only: entries cannot be replaced'); END;

CREATE TRIGGER imports_append_only_replace BEFORE INSERT ON imports
WHEN EXISTS (SELECT 1 FROM imports WHERE id = NEW.id)
  OR EXISTS (SELECT 1 FROM imports WHERE project = NEW.project AND file_sha256 = NEW.file_sha256)
BEGIN SELECT RAISE(ABORT, 'sinkbook ledger is append-only: imports cannot be replaced'); END;

CREATE TRIGGER feedstocks_append_only_replace BEFORE INSERT ON feedstocks
WHEN EXISTS (SELECT 1 FROM feedstocks WHERE project = NEW.project AND code = NEW.code)
BEGIN SELECT RAISE(ABORT, 'sinkbook ledger is append-only: feedstocks cannot be replaced'); END;

CREATE TRIGGER settings_append_only_replace BEFORE INSERT ON settings
WHEN EXISTS (SELECT 1 FROM settings WHERE project = NEW.project AND seq = NEW.seq)
BEGIN SELECT RAISE(ABORT, 'sinkbook ledger is append-only: settings cannot be replaced'); END;

CREATE TRIGGER signatures_append_only_replace BEFORE INSERT ON signatures
WHEN EXISTS (SELECT 1 FROM signatures WHERE project = NEW.project AND seq = NEW.seq)
BEGIN SELECT RAISE(ABORT, 'sinkbook ledger is append-only: signatures cannot be replaced'); END;

CREATE TRIGGER import_evidence_append_only_replace BEFORE INSERT ON import_evidence
WHEN EXISTS (SELECT 1 FROM import_evidence WHERE import_id = NEW.import_id AND part = NEW.part)
BEGIN SELECT RAISE(ABORT, 'sinkbook ledger is append-only: import evidence cannot be replaced'); END;
