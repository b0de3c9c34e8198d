-- PostgreSQL's signatures.signed_at becomes a TIMESTAMP (see migrations/postgres). SQLite keeps
-- every time as TEXT in one spelling already: nothing to change.
SELECT 1;
