DROP INDEX entries_corrects;
