DROP INDEX entries_evidence;
