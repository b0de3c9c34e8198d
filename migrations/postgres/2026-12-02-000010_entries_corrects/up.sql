-- The corrections of each entry, found by index, as on SQLite (same version): reads that
-- resolve the latest correction of a line, and the check that an entry is corrected once, look
-- a seq up here instead of reading the project's chain.
CREATE INDEX entries_corrects ON entries (project, corrects) WHERE corrects IS NOT NULL;
