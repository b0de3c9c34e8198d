-- Settings take effect from a date (ISO 8601 text, YYYY-MM-DD): `project set ... --from DATE`,
-- by default the day recorded. Rows written before keep NULL and take effect the day they were
-- recorded; the row hash covers the date where there is one (docs/ledger-format.md).
ALTER TABLE settings ADD COLUMN effective_from TEXT;
