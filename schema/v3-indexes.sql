-- qorbits table, schema version 3: the indexes, built after the data so that the file
-- layout depends only on the rows. The UNIQUE indexes are the table's keys.

CREATE INDEX classes_ij ON classes (I, J);
CREATE INDEX classes_h4 ON classes (h4);
CREATE INDEX classes_disc ON classes (disc);
CREATE UNIQUE INDEX classes_label ON classes (label);
CREATE UNIQUE INDEX pairs_ij ON pairs (I, J);
CREATE INDEX pairs_h4 ON pairs (h4);
CREATE UNIQUE INDEX meta_key ON meta (key);
CREATE INDEX local_class ON local (class_id);
CREATE INDEX local_p ON local (p);
CREATE INDEX classes_els ON classes (els);
CREATE INDEX pair_primes_ij ON pair_primes (I, J);
CREATE INDEX pair_primes_p ON pair_primes (p);
CREATE INDEX classes_rational ON classes (rational_class);
