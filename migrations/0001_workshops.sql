-- Workshops, their questions, the panel, the revisions experts save, and
-- the facilitator's events. Times are UTC RFC 3339 text; lists are JSON
-- text; booleans are 0 or 1.

CREATE TABLE workshops (
    id          INTEGER PRIMARY KEY,
    title       TEXT    NOT NULL,
    purpose     TEXT    NOT NULL DEFAULT '',
    decision    TEXT    NOT NULL DEFAULT '',
    notes       TEXT    NOT NULL DEFAULT '',
    round       INTEGER NOT NULL DEFAULT 1 CHECK (round >= 1),
    round_open  INTEGER NOT NULL DEFAULT 1 CHECK (round_open IN (0, 1)),
    invented    INTEGER NOT NULL DEFAULT 0 CHECK (invented IN (0, 1)),
    created     TEXT    NOT NULL
);

CREATE TABLE questions (
    id           INTEGER PRIMARY KEY,
    workshop_id  INTEGER NOT NULL REFERENCES workshops (id),
    position     INTEGER NOT NULL,
    wording      TEXT    NOT NULL,
    quantity     TEXT    NOT NULL DEFAULT '',
    units        TEXT    NOT NULL DEFAULT '',
    lower        REAL    NOT NULL,
    upper        REAL    NOT NULL,
    format       TEXT    NOT NULL,
    probs        TEXT    NOT NULL DEFAULT '[]',
    bin_edges    TEXT    NOT NULL DEFAULT '[]',
    chips        INTEGER NOT NULL DEFAULT 0,
    calibration  INTEGER NOT NULL DEFAULT 0 CHECK (calibration IN (0, 1)),
    true_value   REAL,
    revealed     INTEGER NOT NULL DEFAULT 0 CHECK (revealed IN (0, 1)),
    CHECK (lower < upper),
    UNIQUE (workshop_id, position)
);

-- token_hash is NULL for an expert whose link has not been issued (for
-- example after an import); only hashes of tokens are stored.
CREATE TABLE experts (
    id           INTEGER PRIMARY KEY,
    workshop_id  INTEGER NOT NULL REFERENCES workshops (id),
    name         TEXT    NOT NULL,
    affiliation  TEXT    NOT NULL DEFAULT '',
    expertise    TEXT    NOT NULL DEFAULT '',
    token_hash   BLOB    UNIQUE,
    revoked      INTEGER NOT NULL DEFAULT 0 CHECK (revoked IN (0, 1)),
    created      TEXT    NOT NULL
);

CREATE TABLE revisions (
    id            INTEGER PRIMARY KEY,
    question_id   INTEGER NOT NULL REFERENCES questions (id),
    expert_id     INTEGER NOT NULL REFERENCES experts (id),
    round         INTEGER NOT NULL CHECK (round >= 1),
    at            TEXT    NOT NULL,
    reason        TEXT    NOT NULL DEFAULT '',
    answer_values TEXT    NOT NULL DEFAULT '[]',
    lowest        REAL    NOT NULL DEFAULT 0,
    highest       REAL    NOT NULL DEFAULT 0,
    best          REAL    NOT NULL DEFAULT 0,
    confidence    REAL    NOT NULL DEFAULT 0,
    counts        TEXT    NOT NULL DEFAULT '[]'
);

CREATE INDEX revisions_by_question ON revisions (question_id, expert_id, id);

CREATE TABLE events (
    id           INTEGER PRIMARY KEY,
    workshop_id  INTEGER NOT NULL REFERENCES workshops (id),
    question_id  INTEGER REFERENCES questions (id),
    kind         TEXT    NOT NULL,
    at           TEXT    NOT NULL,
    reason       TEXT    NOT NULL DEFAULT '',
    detail       TEXT    NOT NULL DEFAULT ''
);

CREATE INDEX events_by_workshop ON events (workshop_id, id);

-- The record is append-only: a revision or an event, once written, is
-- never changed or removed.
CREATE TRIGGER revisions_no_update BEFORE UPDATE ON revisions
BEGIN
    SELECT RAISE(ABORT, 'revisions are append-only');
END;

CREATE TRIGGER revisions_no_delete BEFORE DELETE ON revisions
BEGIN
    SELECT RAISE(ABORT, 'revisions are append-only');
END;

CREATE TRIGGER events_no_update BEFORE UPDATE ON events
BEGIN
    SELECT RAISE(ABORT, 'events are append-only');
END;

CREATE TRIGGER events_no_delete BEFORE DELETE ON events
BEGIN
    SELECT RAISE(ABORT, 'events are append-only');
END;
