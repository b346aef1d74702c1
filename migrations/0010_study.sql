-- From the agreed prior to the study (issue 15).
--
-- study_data: each batch of observed data the project lead records
-- against a question's agreed prior (successes in trials, their source
-- and the day observed). Batches accumulate; append-only, like the rest
-- of the record.
--
-- agreed_priors.construction: for a prior made by a quick construction
-- (source 'construction'), the construction's inputs as JSON
-- (elicit.ConstructionInput); NULL for the other sources and for every
-- prior agreed before this version.
CREATE TABLE study_data (
    id           INTEGER PRIMARY KEY,
    question_id  INTEGER NOT NULL REFERENCES questions (id),
    successes    INTEGER NOT NULL CHECK (successes >= 0),
    trials       INTEGER NOT NULL CHECK (trials >= 1),
    source       TEXT    NOT NULL,
    observed_on  TEXT    NOT NULL,
    at           TEXT    NOT NULL,
    CHECK (successes <= trials)
);

CREATE INDEX study_data_by_question ON study_data (question_id, id);

CREATE TRIGGER study_data_no_update BEFORE UPDATE ON study_data
BEGIN
    SELECT RAISE(ABORT, 'study data are append-only');
END;

CREATE TRIGGER study_data_no_delete BEFORE DELETE ON study_data
BEGIN
    SELECT RAISE(ABORT, 'study data are append-only');
END;

ALTER TABLE agreed_priors ADD COLUMN construction TEXT;
