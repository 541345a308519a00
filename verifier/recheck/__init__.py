"""An independent re-checker of qreferee's certificates (``qreferee recheck REPORT.json``).

It imports nothing from the rest of qreferee: it reads the JSON report with the standard
library, and recomputes everything with plain Python integers and Fractions, by
algorithms that differ from the main engine's:

* sigma_k(n) from the factorisation of n, Bernoulli numbers by the Akiyama-Tanigawa
  algorithm, E_k from those (:mod:`.atoms`);
* eta from Euler's pentagonal series, its inverse from the partition recurrence;
* theta series of lattices by counting lattice points in a box;
* products by schoolbook convolution (:mod:`.series`);
* the index of Gamma_0(N), the Sturm bound, the Newman conditions, characters and
  Ligozat's orders at the cusps from their formulas (:mod:`.arith`).

:mod:`.check` re-verifies one certificate; :mod:`.run` a whole report.
"""
