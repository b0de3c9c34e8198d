-- A project's calibrations and tracer samples, a few rows among its entries, found by index:
-- reports read them before the metered entries they apply to (a calibration applies by
-- activity date, whenever it was recorded). The kinds are spelled as the query spells them
-- (src/store/stream.rs) so the planner uses the partial index.
CREATE INDEX entries_evidence ON entries (project, seq) WHERE kind IN ('calibration', 'tracer-sample');
