-- qorbits curve dataset, schema version 1: the tables. Column reference: schema/README.md
-- ("The curve dataset"). One row per curve of the family of `selmer-stats` below a height
-- bound, and one row per non-trivial element of its 2-Selmer group, given by the canonical
-- quartic of the first class (in table order) of the element's class over Q.
-- Only INTEGER and TEXT columns, so that the content hash never depends on how a platform
-- prints floating-point numbers. Curves are inserted in the order (height, A, B), each
-- followed by its elements.

CREATE TABLE meta (
  key   TEXT PRIMARY KEY,
  value TEXT NOT NULL
) WITHOUT ROWID;

CREATE TABLE curves (
  id               INTEGER PRIMARY KEY,
  A                INTEGER NOT NULL,
  B                INTEGER NOT NULL,
  height           INTEGER NOT NULL,
  disc             INTEGER NOT NULL,
  I                INTEGER NOT NULL,
  J                INTEGER NOT NULL,
  two_torsion_rank INTEGER NOT NULL,
  selmer_rank      INTEGER NOT NULL,
  elements         INTEGER NOT NULL
);

CREATE TABLE elements (
  curve_id INTEGER NOT NULL,
  n        INTEGER NOT NULL,
  label    TEXT    NOT NULL,
  a        INTEGER NOT NULL,
  b        INTEGER NOT NULL,
  c        INTEGER NOT NULL,
  d        INTEGER NOT NULL,
  e        INTEGER NOT NULL,
  PRIMARY KEY (curve_id, n)
) WITHOUT ROWID;
