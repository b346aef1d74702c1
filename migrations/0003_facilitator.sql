-- Facilitator sign-in: the one secret's hash and the sessions it opened.
-- Only hashes are stored.

CREATE TABLE facilitator (
    id    INTEGER PRIMARY KEY CHECK (id = 1),
    hash  BLOB    NOT NULL,
    at    TEXT    NOT NULL
);

CREATE TABLE sessions (
    token_hash  BLOB PRIMARY KEY,
    expires     TEXT NOT NULL
);
