-- Each revision's fit, computed once when the revision is saved or
-- imported (issue 16): the pages and the record read it instead of
-- fitting every revision again. elicit.Fit as JSON. A revision saved
-- before this migration has no row here and is fitted when read (and
-- kept at the next server start, store.KeepMissingFits). Append-only,
-- like the revisions themselves.
CREATE TABLE revision_fits (
    revision_id INTEGER PRIMARY KEY REFERENCES revisions(id),
    fit         TEXT NOT NULL
);

CREATE TRIGGER revision_fits_no_update BEFORE UPDATE ON revision_fits
BEGIN
    SELECT RAISE(ABORT, 'revision fits are append-only');
END;

CREATE TRIGGER revision_fits_no_delete BEFORE DELETE ON revision_fits
BEGIN
    SELECT RAISE(ABORT, 'revision fits are append-only');
END;
