-- The running figures each entry row keeps for its project through that entry
-- (src/ledger/tally.rs): Σ |grams| over every entry, which the ledger's mass limit bounds, and
-- the RR cumulative stored over the entries no correction replaces, which the permitted capacity
-- bounds. An append reads them from the chain tip instead of summing the chain. They are derived
-- figures, outside the canonical bytes; rows written before this version hold NULL, and the
-- first append after it counts the chain once.
ALTER TABLE entries ADD COLUMN tally_magnitude_g INTEGER;
ALTER TABLE entries ADD COLUMN tally_stored_g INTEGER;
-- A project's seals, a few rows among its entries, found by index (the literal 'seal' lets the
-- planner use the partial index).
CREATE INDEX entries_seals ON entries (project, seq) WHERE kind = 'seal';
