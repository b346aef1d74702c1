-- The facilitator's withdrawals of revisions: a judgement entered against
-- the wrong expert or the wrong question, or one the expert asked to take
-- back. A withdrawn revision stays in the record, marked, and is nobody's
-- current answer; the expert's earlier revision, if any, is current again.
-- A withdrawal is final (the right answer is entered anew) and, like every
-- correction, append-only: a row is never changed, removed or replaced.
-- Each row has its revision_withdrawn event, written in the same
-- transaction, which carries the same reason into the record's chain.
CREATE TABLE withdrawals (
    id           INTEGER PRIMARY KEY,
    revision_id  INTEGER NOT NULL UNIQUE REFERENCES revisions (id),
    reason       TEXT    NOT NULL CHECK (reason <> ''),
    at           TEXT    NOT NULL
);

CREATE TRIGGER withdrawals_no_update BEFORE UPDATE ON withdrawals
BEGIN
    SELECT RAISE(ABORT, 'withdrawals are append-only');
END;

CREATE TRIGGER withdrawals_no_delete BEFORE DELETE ON withdrawals
BEGIN
    SELECT RAISE(ABORT, 'withdrawals are append-only');
END;

CREATE TRIGGER withdrawals_no_replace BEFORE INSERT ON withdrawals
WHEN EXISTS (SELECT 1 FROM withdrawals WHERE id = NEW.id OR revision_id = NEW.revision_id)
BEGIN
    SELECT RAISE(ABORT, 'withdrawals are append-only');
END;
