-- signatures.signed_at is already the same TEXT timestamps every other time column of a ledger
-- file holds; the registry's was TEXT where its other times are TIMESTAMP (migrations/postgres,
-- same version). The version exists on both backends so that both list the same migrations.
SELECT 1;
