-- Whether an expert typed a proportion question's values as percentages
-- (5% rather than 0.05). The values are stored as proportions either way;
-- the flag lets every page and export show them as they were typed.
ALTER TABLE revisions ADD COLUMN percent INTEGER NOT NULL DEFAULT 0 CHECK (percent IN (0, 1));
