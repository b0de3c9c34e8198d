-- Who wrote each entry, in the entry's own hashed bytes. `recorded_by` (canonical encoding v2)
-- names the role that appended the entry, and the server refuses any other name than the
-- writing role's; it is NULL for an entry hashed under v1 (written to a ledger file and loaded
-- from its bundle, or appended before this version). `written_by` keeps, for every row, the
-- role the server saw insert it, set by the server alone.
ALTER TABLE entries RENAME COLUMN recorded_by TO written_by;
ALTER TABLE entries ADD COLUMN recorded_by TEXT COLLATE "C";

CREATE OR REPLACE FUNCTION sinkbook_recorded_by() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
    NEW.written_by := current_user;
    IF NEW.recorded_by IS NOT NULL AND NEW.recorded_by <> current_user::text THEN
        RAISE EXCEPTION 'entry % of project % names % as the role that recorded it, but % is writing it',
            NEW.seq, NEW.project, NEW.recorded_by, current_user
            USING ERRCODE = 'insufficient_privilege';
    END IF;
    RETURN NEW;
END;
$$;
