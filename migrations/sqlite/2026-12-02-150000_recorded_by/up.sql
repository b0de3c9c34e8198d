-- The registry role an entry names in its canonical bytes (encoding v2). A ledger file has no
-- database roles, so its own entries leave it NULL (v1); the column exists so a bundle of a
-- registry's project, whose entries name their roles, loads into a file unchanged.
ALTER TABLE entries ADD COLUMN recorded_by TEXT;
