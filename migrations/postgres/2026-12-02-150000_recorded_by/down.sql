CREATE OR REPLACE FUNCTION sinkbook_recorded_by() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
    NEW.recorded_by := current_user;
    RETURN NEW;
END;
$$;
ALTER TABLE entries DROP COLUMN recorded_by;
ALTER TABLE entries RENAME COLUMN written_by TO recorded_by;
