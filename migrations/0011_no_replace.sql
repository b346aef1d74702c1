-- The append-only tables also refuse REPLACE. An INSERT OR REPLACE (or
-- REPLACE INTO) naming an existing row's key deletes that row and writes
-- another in its place, and SQLite fires no delete trigger for a row a
-- REPLACE removes (unless recursive_triggers is on, which is a setting of
-- the connection, not of the file). So the triggers of 0001, 0002, 0004,
-- 0005, 0009 and 0010 let anyone with the file rewrite a revision's answer
-- and reason in place. Each table now refuses, before it is inserted, a
-- row whose key is already taken: a plain INSERT would fail on the key
-- anyway, and a REPLACE no longer removes anything.

CREATE TRIGGER revisions_no_replace BEFORE INSERT ON revisions
WHEN EXISTS (SELECT 1 FROM revisions WHERE id = NEW.id)
BEGIN
    SELECT RAISE(ABORT, 'revisions are append-only');
END;

CREATE TRIGGER events_no_replace BEFORE INSERT ON events
WHEN EXISTS (SELECT 1 FROM events WHERE id = NEW.id)
BEGIN
    SELECT RAISE(ABORT, 'events are append-only');
END;

CREATE TRIGGER weight_sets_no_replace BEFORE INSERT ON weight_sets
WHEN EXISTS (SELECT 1 FROM weight_sets WHERE id = NEW.id)
BEGIN
    SELECT RAISE(ABORT, 'weight sets are append-only');
END;

CREATE TRIGGER agreed_priors_no_replace BEFORE INSERT ON agreed_priors
WHEN EXISTS (SELECT 1 FROM agreed_priors WHERE id = NEW.id)
BEGIN
    SELECT RAISE(ABORT, 'agreed priors are append-only');
END;

CREATE TRIGGER reason_decisions_no_replace BEFORE INSERT ON reason_decisions
WHEN EXISTS (SELECT 1 FROM reason_decisions WHERE id = NEW.id)
BEGIN
    SELECT RAISE(ABORT, 'reason decisions are append-only');
END;

CREATE TRIGGER revision_fits_no_replace BEFORE INSERT ON revision_fits
WHEN EXISTS (SELECT 1 FROM revision_fits WHERE revision_id = NEW.revision_id)
BEGIN
    SELECT RAISE(ABORT, 'revision fits are append-only');
END;

CREATE TRIGGER study_data_no_replace BEFORE INSERT ON study_data
WHEN EXISTS (SELECT 1 FROM study_data WHERE id = NEW.id)
BEGIN
    SELECT RAISE(ABORT, 'study data are append-only');
END;

CREATE TRIGGER panel_salts_no_replace BEFORE INSERT ON panel_salts
WHEN EXISTS (SELECT 1 FROM panel_salts WHERE workshop_id = NEW.workshop_id)
BEGIN
    SELECT RAISE(ABORT, 'panel salts never change');
END;
