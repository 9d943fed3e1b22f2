-- 0003: stored reports of offline trials (a proposed rule or settings
-- change run against a judged set; see internal/trial). The report is kept
-- whole as JSON; title, actor and the time are columns for listing.
-- Times are Unix nanoseconds.
CREATE TABLE trials (
    id          TEXT PRIMARY KEY,
    created_ns  BIGINT NOT NULL,
    actor       TEXT NOT NULL,
    title       TEXT NOT NULL,
    report_json TEXT NOT NULL
);
CREATE INDEX trials_created ON trials (created_ns);
