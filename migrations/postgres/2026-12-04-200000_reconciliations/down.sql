DROP TABLE reconciliations;
DROP FUNCTION sinkbook_reconciliation_recorded_by();
