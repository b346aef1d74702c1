-- agreed_priors.pooled_revisions: for a prior from the pool, the
-- revisions whose fits made the pool as the facilitator agreed it (a JSON
-- list of revision ids, roster order), so the record says which judgements
-- were pooled instead of leaving a reviewer to infer them. NULL for the
-- other sources and for every prior agreed before this version.
ALTER TABLE agreed_priors ADD COLUMN pooled_revisions TEXT;
