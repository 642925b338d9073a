-- Schema 2, only where the PostGIS extension is available: a geography
-- column on site events (WGS 84, longitude first as PostGIS wants it) with
-- a GiST index, and the sites view with it.
ALTER TABLE events ADD COLUMN geog geography(Point, 4326)
    GENERATED ALWAYS AS (CASE WHEN lat IS NULL OR lon IS NULL THEN NULL
                              ELSE ST_SetSRID(ST_MakePoint(lon, lat), 4326)::geography END) STORED;
CREATE INDEX events_site_geog ON events USING gist (geog) WHERE kind = 1;

CREATE OR REPLACE VIEW sites AS
SELECT c.entity AS id, e.site_name AS name, e.site_kind AS kind, e.lat, e.lon, e.site_notes AS notes,
       c.heads > 1 AS conflicted, c.event, e.clock, e.device, e.geog
FROM current c JOIN events e ON e.id = c.event
WHERE c.kind = 1 AND e.kind = 1; -- e.kind lets the planner use the partial index
