-- SQLite's INSERT OR REPLACE has no PostgreSQL form: INSERT ... ON CONFLICT DO UPDATE fires the
-- BEFORE UPDATE triggers that already refuse it (2026-12-01-000001_ledger). Nothing to add; the
-- version exists on both backends so that both list the same migrations.
SELECT 1;
