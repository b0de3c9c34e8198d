ALTER TABLE entries DROP COLUMN recorded_by;
