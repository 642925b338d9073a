-- Schema 1: the events as stored, their decoded columns, the fold
-- (supersessions, heads, current values), audits and the publish cursor.
-- Runs with search_path set to the target schema. Never edit a released
-- migration: add a new one.

-- Every event exactly once, keyed by its id (SHA-256 of raw). raw is the
-- event's deterministic CBOR, the truth; the other columns are decoded
-- from it for SQL and never change.
CREATE TABLE events (
    id            bytea PRIMARY KEY CHECK (octet_length(id) = 32),
    raw           bytea NOT NULL,
    entity        uuid NOT NULL,
    kind          smallint NOT NULL,          -- 1 site, 2 bale, 3 pull, 4 setting, 5 measured batch
    device        bytea NOT NULL,             -- authoring device (16 bytes)
    clock_ms      bigint NOT NULL,            -- hybrid logical clock: Unix ms ...
    clock_logical bigint NOT NULL,            -- ... and counter
    clock         timestamptz NOT NULL,       -- clock_ms as a time
    supersedes    bytea[] NOT NULL,
    deleted       boolean NOT NULL,
    -- site
    site_name     text,
    site_kind     text,
    lat           double precision,           -- WGS 84 degrees
    lon           double precision,
    site_notes    text,
    -- bale
    bale_site     uuid,
    received      timestamptz,
    gross_kg      double precision,
    length_m      double precision,           -- NULL when not measured
    width_m       double precision,
    height_m      double precision,
    tag           text,
    grader        text,
    spec          text,
    bale_notes    text,
    -- pull
    pull_bale     uuid,
    label         text,
    taken         timestamptz,
    kg            jsonb,                      -- {category key: kg}
    pieces        jsonb,                      -- {category key: pieces}, counted ones
    stated_kg     double precision,
    parts_kg      double precision,           -- sum of kg
    -- setting
    setting_kind  text,
    setting_name  text,
    setting_body  jsonb,
    -- measured batch: what the plant weighed and the lab measured
    measured_line    text,
    measured_bales   uuid[],
    ran              timestamptz,
    flake_kg         double precision,          -- as weighed off the line, moisture included
    moisture_pct     double precision,          -- % of the wet flake
    streams_kg       jsonb,                     -- {stream name: kg}
    reactor_flake_kg double precision,
    glycol           text,
    glycol_kg        double precision,
    strip_eg         double precision,          -- share of the liberated EG stripped
    product_kg       double precision,          -- glycolysate weighed
    hydroxyl_value   double precision,          -- mg KOH/g
    hydroxyl_method  text,
    acid_value       double precision,          -- mg KOH/g
    acid_method      text,
    measured_notes   text
);
CREATE INDEX events_entity ON events (entity);
CREATE INDEX events_pull_bale ON events (pull_bale) WHERE pull_bale IS NOT NULL;
CREATE INDEX events_bale_site ON events (bale_site) WHERE bale_site IS NOT NULL;

-- superseding lists superseded in its supersedes; only edges within one
-- entity count.
CREATE TABLE supersessions (
    entity      uuid NOT NULL,
    superseded  bytea NOT NULL,
    superseding bytea NOT NULL,
    PRIMARY KEY (entity, superseded, superseding)
);

-- Heads: the events that no event of the same entity supersedes, with
-- what choosing the shown one needs (copied from events). Every entity
-- with events has at least one head, and all its events share a kind.
CREATE TABLE heads (
    entity        uuid NOT NULL,
    event         bytea NOT NULL,
    deleted       boolean NOT NULL,
    kind          smallint NOT NULL,
    clock_ms      bigint NOT NULL,
    clock_logical bigint NOT NULL,
    device        bytea NOT NULL,
    PRIMARY KEY (entity, event)
);

-- The shown value of every entity that is not deleted: the latest head
-- in (clock, device, id) order that is not a tombstone; heads > 1 is a
-- conflict.
CREATE TABLE current (
    entity uuid PRIMARY KEY,
    kind   smallint NOT NULL,
    event  bytea NOT NULL UNIQUE,
    heads  integer NOT NULL
);
CREATE INDEX current_kind ON current (kind);

-- Audits computed by the publisher with package assess, keyed by the bale
-- and the digest of the records they were computed from (see
-- audit_inputs), so the same inputs never give a second row.
CREATE TABLE audits (
    bale            uuid NOT NULL,
    inputs          bytea NOT NULL,
    pulls           integer NOT NULL,
    sampled_kg      double precision,
    bale_kg         double precision,
    confidence      double precision,
    method          text,
    target_pet      double precision,         -- mass share of the bale
    target_pet_low  double precision,         -- interval; NULL with one pull
    target_pet_high double precision,
    other_plastics  double precision,
    non_plastics    double precision,
    moisture_fines  double precision,
    hazards         double precision,
    hazard_found    boolean,
    categories      jsonb,                    -- {category key: mass share} of the categories found
    label_clash     text[],                   -- pull labels used twice (two devices): a conflict to resolve
    spec            text,                     -- the spec the bale is judged against (its own, or glycol-feed)
    verdict         text,                     -- pass, fail or undecided; NULL when that spec is not found

    grade           text,
    limiting        text,                     -- the item that governs the verdict
    more_pulls      integer,                  -- pulls the advice asks for beyond those taken
    error           text,                     -- why no estimate could be made
    PRIMARY KEY (bale, inputs)
);

-- Bales whose audit may be out of date; the publisher empties it.
CREATE TABLE audit_pending (
    bale uuid PRIMARY KEY
);

-- The audit of each bale as its records stand: removed in the same
-- transaction that queues the bale in audit_pending, set again when its
-- audit is computed. audit_inputs recomputes the key from the records,
-- to check it.
CREATE TABLE audit_current (
    bale   uuid PRIMARY KEY,
    inputs bytea NOT NULL
);

-- Per publishing store: the last local sequence number published, and the
-- event at it (a copied or rebuilt store whose event differs is published
-- in full instead).
CREATE TABLE publish_cursor (
    store_device bytea PRIMARY KEY,
    last_seq     bigint NOT NULL,
    last_event   bytea NOT NULL,
    updated_at   timestamptz NOT NULL DEFAULT now()
);

-- One row per publish, for the operator.
CREATE TABLE publish_log (
    at           timestamptz NOT NULL DEFAULT now(),
    store_device bytea NOT NULL,
    from_seq     bigint NOT NULL,
    to_seq       bigint NOT NULL,
    read         bigint NOT NULL,
    new_events   bigint NOT NULL,
    audits       bigint NOT NULL
);

CREATE VIEW sites AS
SELECT c.entity AS id, e.site_name AS name, e.site_kind AS kind, e.lat, e.lon, e.site_notes AS notes,
       c.heads > 1 AS conflicted, c.event, e.clock, e.device
FROM current c JOIN events e ON e.id = c.event
WHERE c.kind = 1;

CREATE VIEW pulls AS
SELECT c.entity AS id, e.pull_bale AS bale, e.label, e.taken, e.parts_kg AS total_kg, e.stated_kg, e.kg, e.pieces,
       c.heads > 1 AS conflicted, c.event, e.clock, e.device
FROM current c JOIN events e ON e.id = c.event
WHERE c.kind = 3;

CREATE VIEW bales AS
SELECT c.entity AS id, e.bale_site AS site, s.name AS site_name, e.received, e.gross_kg,
       e.length_m, e.width_m, e.height_m,
       CASE WHEN e.length_m * e.width_m * e.height_m > 0 THEN e.gross_kg / (e.length_m * e.width_m * e.height_m) END AS density_kg_m3,
       e.tag, e.grader, e.spec, e.bale_notes AS notes,
       (SELECT count(*) FROM events pe JOIN current pc ON pc.event = pe.id
         WHERE pe.pull_bale = c.entity AND pc.kind = 3) AS pulls,
       c.heads > 1 AS conflicted, c.event, e.clock, e.device
FROM current c JOIN events e ON e.id = c.event
LEFT JOIN sites s ON s.id = e.bale_site
WHERE c.kind = 2;

CREATE VIEW settings AS
SELECT c.entity AS id, e.setting_kind AS kind, e.setting_name AS name, e.setting_body AS body,
       c.heads > 1 AS conflicted, c.event, e.clock, e.device
FROM current c JOIN events e ON e.id = c.event
WHERE c.kind = 4;

CREATE VIEW measured AS
SELECT c.entity AS id, e.measured_line AS line, e.measured_bales AS bales, e.ran, e.flake_kg, e.moisture_pct, e.streams_kg,
       e.reactor_flake_kg, e.glycol, e.glycol_kg, e.strip_eg, e.product_kg,
       e.hydroxyl_value, e.hydroxyl_method, e.acid_value, e.acid_method, e.measured_notes AS notes,
       c.heads > 1 AS conflicted, c.event, e.clock, e.device
FROM current c JOIN events e ON e.id = c.event
WHERE c.kind = 5;

-- Entities with more than one head, deleted ones included, with the heads
-- in (clock, device, id) order.
CREATE VIEW conflicts AS
SELECT h.entity AS id, min(e.kind) AS kind, count(*) AS heads,
       array_agg(h.event ORDER BY e.clock_ms, e.clock_logical, e.device, e.id) AS events,
       bool_and(h.deleted) AS deleted
FROM heads h JOIN events e ON e.id = h.event
GROUP BY h.entity
HAVING count(*) > 1;

-- The digest of what a bale's audit depends on: its shown event, the
-- shown events of its pulls and of the stored specs of the name it is
-- judged against. Must match auditInputs in data/publish/audit.go. It
-- reads every bale's records: for checks, not for everyday queries.
CREATE VIEW audit_inputs AS
SELECT b.entity AS bale,
       sha256(convert_to('baleassay audit 1', 'UTF8') || b.event
              || int4send((SELECT count(*)::integer FROM events pe JOIN current p ON p.event = pe.id
                           WHERE pe.pull_bale = b.entity AND p.kind = 3))
              || coalesce((SELECT string_agg(p.event, ''::bytea ORDER BY p.event)
                           FROM events pe JOIN current p ON p.event = pe.id
                           WHERE pe.pull_bale = b.entity AND p.kind = 3), ''::bytea)
              || coalesce((SELECT string_agg(s.event || CASE WHEN s.heads > 1 THEN '\x01'::bytea ELSE '\x00'::bytea END,
                                             ''::bytea ORDER BY s.event)
                           FROM current s JOIN events se ON se.id = s.event
                           WHERE s.kind = 4 AND se.setting_kind = 'spec'
                             AND se.setting_name = coalesce(be.spec, 'glycol-feed')), ''::bytea)) AS inputs
FROM current b JOIN events be ON be.id = b.event
WHERE b.kind = 2;

-- The audit of every bale as its records stand now. A bale whose records
-- changed while its audit was not yet computed has no row until then.
CREATE VIEW bale_audits AS
SELECT a.*
FROM audit_current c JOIN audits a ON a.bale = c.bale AND a.inputs = c.inputs;

-- Per site: bales received, bales with an audit estimate, and the mean,
-- sample standard deviation, minimum and maximum of the target-PET share
-- across audited bales (as 'bale sites summary' gives for one site).
CREATE VIEW site_quality AS
SELECT s.id AS site, s.name,
       count(b.entity) AS bales,
       count(a.target_pet) AS audited,
       avg(a.target_pet) AS target_pet_mean,
       stddev_samp(a.target_pet) AS target_pet_sd,
       min(a.target_pet) AS target_pet_min,
       max(a.target_pet) AS target_pet_max,
       count(*) FILTER (WHERE a.hazard_found) AS hazard_bales
FROM sites s
LEFT JOIN (current b JOIN events be ON be.id = b.event AND b.kind = 2) ON be.bale_site = s.id
LEFT JOIN bale_audits a ON a.bale = b.entity AND a.error IS NULL
GROUP BY s.id, s.name;
