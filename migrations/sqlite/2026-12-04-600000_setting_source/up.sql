-- A setting keeps where its value comes from (a monitoring plan, a measurement): `project set
-- ... --source TEXT`. Rows written before keep NULL; the row hash covers the source where there
-- is one (docs/ledger-format.md), so their hashes do not change.
ALTER TABLE settings ADD COLUMN source TEXT;
