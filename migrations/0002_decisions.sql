-- The facilitator's decisions that carry data: pool weights and agreed
-- priors. Both keep their history; the latest row is the current one.

CREATE TABLE weight_sets (
    id           INTEGER PRIMARY KEY,
    workshop_id  INTEGER NOT NULL REFERENCES workshops (id),
    scheme       TEXT    NOT NULL,
    by_expert    TEXT    NOT NULL DEFAULT '{}',
    reason       TEXT    NOT NULL DEFAULT '',
    at           TEXT    NOT NULL
);

CREATE INDEX weight_sets_by_workshop ON weight_sets (workshop_id, id);

CREATE TABLE agreed_priors (
    id           INTEGER PRIMARY KEY,
    question_id  INTEGER NOT NULL REFERENCES questions (id),
    source       TEXT    NOT NULL,
    alpha        REAL    NOT NULL CHECK (alpha > 0),
    beta         REAL    NOT NULL CHECK (beta > 0),
    lower        REAL    NOT NULL,
    upper        REAL    NOT NULL,
    consensus    TEXT,
    rationale    TEXT    NOT NULL DEFAULT '',
    round        INTEGER NOT NULL CHECK (round >= 1),
    at           TEXT    NOT NULL,
    CHECK (lower < upper)
);

CREATE INDEX agreed_priors_by_question ON agreed_priors (question_id, id);

CREATE TRIGGER weight_sets_no_update BEFORE UPDATE ON weight_sets
BEGIN
    SELECT RAISE(ABORT, 'weight sets are append-only');
END;

CREATE TRIGGER weight_sets_no_delete BEFORE DELETE ON weight_sets
BEGIN
    SELECT RAISE(ABORT, 'weight sets are append-only');
END;

CREATE TRIGGER agreed_priors_no_update BEFORE UPDATE ON agreed_priors
BEGIN
    SELECT RAISE(ABORT, 'agreed priors are append-only');
END;

CREATE TRIGGER agreed_priors_no_delete BEFORE DELETE ON agreed_priors
BEGIN
    SELECT RAISE(ABORT, 'agreed priors are append-only');
END;
