-- The running figures each entry row keeps for its project through that entry, as on SQLite
-- (same version; src/ledger/tally.rs): Σ |grams| over every entry and the RR cumulative stored
-- over the entries no correction replaces, read from the chain tip by an append. Derived,
-- outside the canonical bytes; NULL on rows written before this version, and the first append
-- after it counts the chain once.
ALTER TABLE entries ADD COLUMN tally_magnitude_g BIGINT;
ALTER TABLE entries ADD COLUMN tally_stored_g BIGINT;
-- A project's seals, a few rows among its entries, found by index.
CREATE INDEX entries_seals ON entries (project, seq) WHERE kind = 'seal';
