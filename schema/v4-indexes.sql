-- qorbits table, schema version 4: the indexes, built after the data so that the file
-- layout depends only on the rows. Each serves a documented query (schema/README.md).
-- Queries by a property of the pair (I, J, height, discriminant) find the pair through
-- these indexes and its classes as the id range first_id .. first_id + classes - 1.

CREATE UNIQUE INDEX pairs_ij ON pairs (I, J);
CREATE INDEX pairs_h4 ON pairs (h4);
CREATE INDEX pairs_disc ON pairs (disc);

-- One small index for the per-class facets (Galois group, signature, stabiliser order,
-- local solubility): on a code that combines them, so that a query by any of them is a
-- search over the codes that have it (schema/README.md gives the expression; qorbits'
-- queries use it verbatim).
CREATE INDEX classes_facets ON classes ((CASE galois WHEN 'S4' THEN 1 WHEN 'A4' THEN 2 WHEN 'D4' THEN 3 WHEN 'C4' THEN 4 WHEN 'V4' THEN 5 ELSE 0 END) * 64 + (CASE signature WHEN '4real' THEN 0 WHEN '2real' THEN 1 WHEN 'posdef' THEN 2 ELSE 3 END) * 16 + stabiliser * 2 + els);
