-- qorbits curve dataset, schema version 1: the indexes, built after the data so that the
-- file layout depends only on the rows. `curves_ab` finds the curve y^2 = x^3 + Ax + B;
-- the elements of curve k are the key range (k, 1) .. (k, elements) of `elements`.

CREATE UNIQUE INDEX curves_ab ON curves (A, B);
