-- A random salt per workshop for the order of the anonymised round
-- feedback. The order was a hash of the question's and the expert's ids
-- alone, which anyone who knew the ids' sequence could recompute and so
-- tell who was who; with a secret salt it cannot be recomputed.

CREATE TABLE panel_salts (
    workshop_id  INTEGER PRIMARY KEY REFERENCES workshops (id),
    salt         BLOB    NOT NULL CHECK (length(salt) = 32)
);

INSERT INTO panel_salts (workshop_id, salt) SELECT id, randomblob(32) FROM workshops;

CREATE TRIGGER panel_salt_for_new_workshop AFTER INSERT ON workshops
BEGIN
    INSERT INTO panel_salts (workshop_id, salt) VALUES (NEW.id, randomblob(32));
END;

CREATE TRIGGER panel_salts_no_update BEFORE UPDATE ON panel_salts
BEGIN
    SELECT RAISE(ABORT, 'panel salts never change');
END;
