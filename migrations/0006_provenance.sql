-- Who entered each revision and how it reached Parley. An expert types
-- their own on their private link; the facilitator may enter one on an
-- expert's behalf, saying how the judgement reached them. Revisions
-- written before this version were all typed by the experts.

ALTER TABLE revisions ADD COLUMN entered_by TEXT NOT NULL DEFAULT 'expert'
    CHECK (entered_by IN ('expert', 'facilitator'));
ALTER TABLE revisions ADD COLUMN channel TEXT NOT NULL DEFAULT ''
    CHECK ((entered_by = 'expert' AND channel = '') OR
           (entered_by = 'facilitator' AND channel IN ('in_person', 'phone', 'paper_form', 'message', 'file')));
