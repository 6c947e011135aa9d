-- qorbits table, schema version 3: the tables (DESIGN §4). Version 2 added the local data:
-- the `local` table, `classes.els` / `classes.insoluble_at` and `pairs.els`. Version 3 adds
-- the classes over Q: `classes.rational_class` and `pairs.rational_els`.
-- Only INTEGER and TEXT columns, so that the content hash never depends on how a platform
-- prints floating-point numbers. Uniqueness is enforced by the indexes in v3-indexes.sql,
-- which the writer builds after the data.

CREATE TABLE meta (
  key   TEXT NOT NULL,
  value TEXT NOT NULL
);

CREATE TABLE classes (
  id            INTEGER PRIMARY KEY,
  label         TEXT    NOT NULL,
  a             INTEGER NOT NULL,
  b             INTEGER NOT NULL,
  c             INTEGER NOT NULL,
  d             INTEGER NOT NULL,
  e             INTEGER NOT NULL,
  I             INTEGER NOT NULL,
  J             INTEGER NOT NULL,
  disc          INTEGER NOT NULL,
  h4            INTEGER NOT NULL,
  real_roots    INTEGER NOT NULL,
  signature     TEXT    NOT NULL,
  factorisation TEXT    NOT NULL,
  irreducible   INTEGER NOT NULL,
  galois        TEXT,
  stabiliser    INTEGER NOT NULL,
  els           INTEGER NOT NULL,
  insoluble_at  TEXT    NOT NULL,
  -- For an everywhere locally soluble class without a rational root (irreducible, or two
  -- quadratic factors in a table with reducible classes): the label of the first class (in
  -- row order) with the same (I, J) that is equivalent to it over Q (GL2(Q), scaled to keep
  -- I and J). NULL for the other classes.
  rational_class TEXT
);

-- One row per class and place: every prime p dividing 2·Disc (increasing), then the real
-- place, stored as p = 0. pattern: degrees^multiplicities of the factors of f mod p (a root
-- at infinity included; '0' when f vanishes mod p), or the signature at p = 0.
CREATE TABLE local (
  class_id INTEGER NOT NULL,
  p        INTEGER NOT NULL,
  v_disc   INTEGER,
  pattern  TEXT    NOT NULL,
  soluble  INTEGER NOT NULL
);

CREATE TABLE pairs (
  I            INTEGER NOT NULL,
  J            INTEGER NOT NULL,
  disc         INTEGER NOT NULL,
  disc_factors TEXT    NOT NULL,
  h4           INTEGER NOT NULL,
  classes      INTEGER NOT NULL,
  irreducible  INTEGER NOT NULL,
  reducible    INTEGER,
  els          INTEGER NOT NULL,
  -- Number of classes over Q among the els classes of the pair without a rational root.
  rational_els INTEGER NOT NULL
);

-- The factorisation of each pair's discriminant as rows: |Disc| = ∏ p^e.
CREATE TABLE pair_primes (
  I INTEGER NOT NULL,
  J INTEGER NOT NULL,
  p INTEGER NOT NULL,
  e INTEGER NOT NULL
);
