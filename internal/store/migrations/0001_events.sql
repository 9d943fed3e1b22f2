-- 0001: raw interaction events from the search page. No user identifier is
-- stored: session ids are short-lived client tokens, groups are a hash.
-- Tokens in double braces are filled in per dialect by migrate.go.
CREATE TABLE events (
    seq         {{SEQ}},
    id          TEXT NOT NULL UNIQUE,
    impression  TEXT NOT NULL,
    kind        TEXT NOT NULL,
    at_ns       BIGINT NOT NULL,
    session_id  TEXT NOT NULL,
    department  TEXT NOT NULL,
    groups_hash TEXT NOT NULL,
    query_key   TEXT NOT NULL,
    term        TEXT NOT NULL,
    pos         INTEGER NOT NULL,
    doc         TEXT NOT NULL,
    doc_rank    INTEGER NOT NULL,
    terms       TEXT NOT NULL,
    sources     TEXT NOT NULL
);
CREATE INDEX events_impression ON events (impression);
CREATE INDEX events_at ON events (at_ns);

CREATE TABLE impressions (
    id       TEXT PRIMARY KEY,
    event_id TEXT NOT NULL,
    at_ns    BIGINT NOT NULL
);
CREATE INDEX impressions_at ON impressions (at_ns);

CREATE TABLE impression_terms (
    impression TEXT NOT NULL,
    pos        INTEGER NOT NULL,
    term       TEXT NOT NULL,
    sources    TEXT NOT NULL,
    PRIMARY KEY (impression, pos)
);
