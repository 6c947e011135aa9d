-- qorbits table, schema version 4: the tables (DESIGN §4). Column reference: schema/README.md.
-- Version 4 changes the layout, not the content of version 3: class labels of our own
-- (schema/labels.md), factorisations as space-separated p^e tokens, classes.rational_class
-- as the id of the first class of the class over Q, `local` and `pair_primes` keyed
-- without a rowid, `pairs` linked to its classes by `first_id` (the classes of a pair are
-- consecutive in row order) and to `pair_primes` by its id, and only the indexes that serve
-- the documented queries.
-- Only INTEGER and TEXT columns, so that the content hash never depends on how a platform
-- prints floating-point numbers. Rows are inserted in row order, pair by pair.

CREATE TABLE meta (
  key   TEXT PRIMARY KEY,
  value TEXT NOT NULL
) WITHOUT ROWID;

CREATE TABLE classes (
  id             INTEGER PRIMARY KEY,
  label          TEXT    NOT NULL,
  a              INTEGER NOT NULL,
  b              INTEGER NOT NULL,
  c              INTEGER NOT NULL,
  d              INTEGER NOT NULL,
  e              INTEGER NOT NULL,
  I              INTEGER NOT NULL,
  J              INTEGER NOT NULL,
  disc           INTEGER NOT NULL,
  h4             INTEGER NOT NULL,
  real_roots     INTEGER NOT NULL,
  signature      TEXT    NOT NULL,
  factorisation  TEXT    NOT NULL,
  irreducible    INTEGER NOT NULL,
  galois         TEXT,
  stabiliser     INTEGER NOT NULL,
  els            INTEGER NOT NULL,
  insoluble_at   TEXT    NOT NULL,
  rational_class INTEGER
);

CREATE TABLE local (
  class_id INTEGER NOT NULL,
  p        INTEGER NOT NULL,
  v_disc   INTEGER,
  pattern  TEXT    NOT NULL,
  soluble  INTEGER NOT NULL,
  PRIMARY KEY (class_id, p)
) WITHOUT ROWID;

CREATE TABLE pairs (
  id           INTEGER PRIMARY KEY,
  first_id     INTEGER NOT NULL,
  I            INTEGER NOT NULL,
  J            INTEGER NOT NULL,
  disc         INTEGER NOT NULL,
  disc_factors TEXT    NOT NULL,
  h4           INTEGER NOT NULL,
  classes      INTEGER NOT NULL,
  irreducible  INTEGER NOT NULL,
  reducible    INTEGER,
  els          INTEGER NOT NULL,
  rational_els INTEGER NOT NULL
);

CREATE TABLE pair_primes (
  pair_id INTEGER NOT NULL,
  p       INTEGER NOT NULL,
  e       INTEGER NOT NULL,
  PRIMARY KEY (pair_id, p)
) WITHOUT ROWID;
