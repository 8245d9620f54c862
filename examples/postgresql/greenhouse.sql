-- A tomato greenhouse's harvest log, invented for the Countercheck demo: every crate picked over a
-- season, with the bay it came from, its grade, the picker's shift and the crate's net weight.
-- Load it into any PostgreSQL database:  psql -f examples/postgresql/greenhouse.sql
DROP TABLE IF EXISTS harvest_crates;
CREATE TABLE harvest_crates (
  crate_id   integer PRIMARY KEY,
  bay        text NOT NULL,
  grade      text,             -- NULL: not graded yet
  shift      text NOT NULL,
  net_kg     double precision  -- NULL: the scale was offline
);
-- Deterministic: the same rows on every server. Bays near the vents (A, B) grade worse in the heat.
INSERT INTO harvest_crates
SELECT i,
       (ARRAY['A vent', 'B vent', 'C middle', 'D middle', 'E wall'])[1 + (i * 37) % 5],
       CASE WHEN i % 97 = 0 THEN NULL
            WHEN (i * 7919) % 100 < CASE WHEN (i * 37) % 5 < 2 THEN 58 ELSE 66 END THEN 'premium'
            WHEN (i * 7919) % 100 < 90 THEN 'standard'
            ELSE 'processing' END,
       CASE WHEN i % 3 = 0 THEN 'late' ELSE 'early' END,
       CASE WHEN i % 211 = 0 THEN NULL
            -- about 12 kg with a spread near 0.5 kg: a scaled sum of six scrambled uniforms
            ELSE round((12.0 + 0.7 * (((i * 48271) % 1000) / 1000.0 + ((i * 16807) % 1009) / 1009.0 + ((i * 69621) % 1013) / 1013.0
                                      + ((i * 7919) % 997) / 997.0 + ((i::bigint * 104729) % 1019) / 1019.0 + ((i::bigint * 1299709) % 1021) / 1021.0 - 3))::numeric, 3)::double precision END
FROM generate_series(1, 4000) AS i;
