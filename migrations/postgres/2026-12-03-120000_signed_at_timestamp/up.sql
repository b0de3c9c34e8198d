-- signatures.signed_at as TIMESTAMP like every other UTC time of the registry (it was TEXT, which
-- took the timestamps written but could not be read back as one). The text held is PostgreSQL's
-- own rendering of the timestamp written, so the cast back is exact. A change of type rewrites
-- the table without firing its append-only row triggers.
ALTER TABLE signatures ALTER COLUMN signed_at TYPE TIMESTAMP USING signed_at::timestamp;
