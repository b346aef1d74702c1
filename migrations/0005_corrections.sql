-- What a workshop in the room needs beyond version 4: answers frozen at a
-- calibration question's reveal, corrections (retired questions, archived
-- and deleted workshops), withheld reasons in the round feedback, and a
-- note on agreed priors recorded while their round was still open.

-- A calibration question's reveal freezes its answers: revealed_at is the
-- time of the first reveal and revealed_through the largest revision id of
-- the question counted at that moment (0 when unknown). Saves after the
-- reveal are refused; scores use the answers as they stood at the reveal.
ALTER TABLE questions ADD COLUMN revealed_at TEXT;
ALTER TABLE questions ADD COLUMN revealed_through INTEGER NOT NULL DEFAULT 0;

-- Questions revealed before this version: the reveal time is the first
-- truth_revealed event's, and the answers counted are those saved by then.
UPDATE questions SET revealed_at = (
    SELECT e.at FROM events e
    WHERE e.question_id = questions.id AND e.kind = 'truth_revealed'
    ORDER BY e.id LIMIT 1)
WHERE revealed = 1;

UPDATE questions SET revealed_through = COALESCE((
    SELECT MAX(r.id) FROM revisions r
    WHERE r.question_id = questions.id AND julianday(r.at) <= julianday(questions.revealed_at)), 0)
WHERE revealed = 1 AND revealed_at IS NOT NULL;

-- A retired question is hidden from experts and kept in the record.
ALTER TABLE questions ADD COLUMN retired INTEGER NOT NULL DEFAULT 0 CHECK (retired IN (0, 1));

-- An archived workshop is finished: listed apart, its round closed.
ALTER TABLE workshops ADD COLUMN archived INTEGER NOT NULL DEFAULT 0 CHECK (archived IN (0, 1));

-- An agreed prior recorded while its round was still open says so.
ALTER TABLE agreed_priors ADD COLUMN round_open INTEGER NOT NULL DEFAULT 0 CHECK (round_open IN (0, 1));

-- The facilitator's decisions to withhold a revision's reason from the
-- round feedback (for example one that names a person) or to show it
-- again. The latest row for a revision is in force; rows are never changed.
CREATE TABLE reason_decisions (
    id           INTEGER PRIMARY KEY,
    revision_id  INTEGER NOT NULL REFERENCES revisions (id),
    withheld     INTEGER NOT NULL CHECK (withheld IN (0, 1)),
    reason       TEXT    NOT NULL CHECK (reason <> ''),
    at           TEXT    NOT NULL
);

CREATE INDEX reason_decisions_by_revision ON reason_decisions (revision_id, id);

CREATE TRIGGER reason_decisions_no_update BEFORE UPDATE ON reason_decisions
BEGIN
    SELECT RAISE(ABORT, 'reason decisions are append-only');
END;

CREATE TRIGGER reason_decisions_no_delete BEFORE DELETE ON reason_decisions
BEGIN
    SELECT RAISE(ABORT, 'reason decisions are append-only');
END;

-- A workshop with no answers and no agreed prior can be deleted outright.
-- The deletion leaves this row behind; while it is pending (inside the
-- deleting transaction) the workshop's events and weight sets may be
-- removed, and at no other time.
CREATE TABLE workshop_deletions (
    id           INTEGER PRIMARY KEY,
    workshop_id  INTEGER NOT NULL,
    title        TEXT    NOT NULL,
    reason       TEXT    NOT NULL,
    at           TEXT    NOT NULL,
    pending      INTEGER NOT NULL DEFAULT 1 CHECK (pending IN (0, 1))
);

DROP TRIGGER events_no_delete;
CREATE TRIGGER events_no_delete BEFORE DELETE ON events
WHEN NOT EXISTS (SELECT 1 FROM workshop_deletions d WHERE d.workshop_id = OLD.workshop_id AND d.pending = 1)
BEGIN
    SELECT RAISE(ABORT, 'events are append-only');
END;

DROP TRIGGER weight_sets_no_delete;
CREATE TRIGGER weight_sets_no_delete BEFORE DELETE ON weight_sets
WHEN NOT EXISTS (SELECT 1 FROM workshop_deletions d WHERE d.workshop_id = OLD.workshop_id AND d.pending = 1)
BEGIN
    SELECT RAISE(ABORT, 'weight sets are append-only');
END;

-- Revisions and agreed priors are never deleted: a workshop that has them
-- is archived, not deleted.
