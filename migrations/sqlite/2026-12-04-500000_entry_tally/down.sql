DROP INDEX entries_seals;
ALTER TABLE entries DROP COLUMN tally_stored_g;
ALTER TABLE entries DROP COLUMN tally_magnitude_g;
