-- qorbits table, schema version 1: the tables (DESIGN §4).
-- Only INTEGER and TEXT columns, so that the content hash never depends on how a platform
-- prints floating-point numbers. Uniqueness is enforced by the indexes in v1-indexes.sql,
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
  stabiliser    INTEGER NOT NULL
);

CREATE TABLE pairs (
  I            INTEGER NOT NULL,
  J            INTEGER NOT NULL,
  disc         INTEGER NOT NULL,
  disc_factors TEXT    NOT NULL,
  h4           INTEGER NOT NULL,
  classes      INTEGER NOT NULL,
  irreducible  INTEGER NOT NULL,
  reducible    INTEGER
);
