-- Registry roles are PostgreSQL's (migrations/postgres, same version): a ledger file has one
-- writer, its owner, so there is nothing to create here. The version exists on both backends so
-- that both list the same migrations.
SELECT 1;
