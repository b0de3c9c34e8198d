-- A leakage or a reversal may name no site: its pathway (a fault, a legacy well) need not be a
-- site of the project (as in migrations/sqlite, same version). Seals still stand at no site and
-- every other entry at one. PostgreSQL replaces the constraint in place; no row changes.
ALTER TABLE entries DROP CONSTRAINT entries_site_iff_not_seal;
ALTER TABLE entries ADD CONSTRAINT entries_site_by_kind CHECK (
    CASE kind WHEN 'seal' THEN site IS NULL
              WHEN 'leakage' THEN true
              WHEN 'reversal' THEN true
              ELSE site IS NOT NULL END);
