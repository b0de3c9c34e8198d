-- A statement's signing time as a TIMESTAMP, like every other time of the ledger (it was TEXT,
-- which the store reads as a timestamp, so a registry could record a statement but not read it
-- back). The values are kept: the text cast back to the time it spelt.
ALTER TABLE signatures ALTER COLUMN signed_at TYPE TIMESTAMP USING signed_at::timestamp;
