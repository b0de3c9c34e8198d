DROP TABLE reconciliations;
