-- Each workshop's latest fact time (store.stamp): a fact is stamped no
-- earlier than one microsecond after it, so that a server clock set back
-- cannot write a fact before one already written, which would move a
-- value of the record fingerprint already noted at a round's close and
-- put a save before the round it was saved in. Not a fact itself, and
-- not append-only: one row per workshop, moved on by every write.
CREATE TABLE fact_clock (
    workshop_id INTEGER PRIMARY KEY,
    last        TEXT    NOT NULL
);
