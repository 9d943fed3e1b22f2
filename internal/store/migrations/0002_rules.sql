-- 0002: librarian rules (pin, block, relate terms) and their audit log.
-- rules holds the current state; every change to it commits together with
-- one rule_audit row naming the actor (an API token name or "demo", never
-- a user id) and the state before and after, as JSON ("" when absent).
-- Times are Unix nanoseconds; NULL start/expiry means none.
CREATE TABLE rules (
    id          TEXT PRIMARY KEY,
    kind        TEXT NOT NULL,
    query_key   TEXT NOT NULL,
    term        TEXT NOT NULL,
    department  TEXT NOT NULL,
    start_ns    BIGINT,
    expiry_ns   BIGINT,
    reason      TEXT NOT NULL,
    lang        TEXT NOT NULL,
    version     BIGINT NOT NULL,
    updated_ns  BIGINT NOT NULL
);

CREATE TABLE rule_audit (
    seq         {{SEQ}},
    rule_id     TEXT NOT NULL,
    actor       TEXT NOT NULL,
    at_ns       BIGINT NOT NULL,
    action      TEXT NOT NULL,
    before_json TEXT NOT NULL,
    after_json  TEXT NOT NULL,
    reason      TEXT NOT NULL
);
CREATE INDEX rule_audit_rule ON rule_audit (rule_id, seq);
