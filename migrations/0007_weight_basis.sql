-- Every applied weighting keeps what made it, and every agreed prior the
-- weights in force when it was agreed, so the record reproduces each pool
-- it shows. (Written as 0009 in the issue's plan; numbered after the
-- migrations before it.)

-- basis: for performance weights, elicit.WeightBasis as JSON: the scores
-- per expert, the cut-off and its rule, the probabilities, the scored
-- calibration questions with their true values and bounds, and the
-- calibration answers used with their revisions. NULL for equal and custom
-- weights (by_expert holds the facilitator's own inputs) and for
-- performance weights set before this version.
ALTER TABLE weight_sets ADD COLUMN basis TEXT;

-- weight_set_id: the weight set in force when the prior was agreed; NULL
-- when none had been applied, so equal weights.
ALTER TABLE agreed_priors ADD COLUMN weight_set_id INTEGER REFERENCES weight_sets (id);

-- Priors agreed before this version get the workshop's last weight set
-- recorded at or before the agreement. Every write goes through one
-- connection in order, so the times of sets and priors do not go back.
-- Agreed priors are append-only; the guard is lifted for this one
-- backfill inside the migration's transaction and put back unchanged.
DROP TRIGGER agreed_priors_no_update;

UPDATE agreed_priors SET weight_set_id = (
    SELECT s.id FROM weight_sets s JOIN questions q ON q.workshop_id = s.workshop_id
    WHERE q.id = agreed_priors.question_id AND julianday(s.at) <= julianday(agreed_priors.at)
    ORDER BY s.id DESC LIMIT 1);

CREATE TRIGGER agreed_priors_no_update BEFORE UPDATE ON agreed_priors
BEGIN
    SELECT RAISE(ABORT, 'agreed priors are append-only');
END;

-- The foreign key is checked when a weight set is deleted (with its
-- workshop, which must then have no agreed prior).
CREATE INDEX agreed_priors_by_weight_set ON agreed_priors (weight_set_id);
