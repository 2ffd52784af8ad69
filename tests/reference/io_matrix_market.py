#!/usr/bin/python3
"""Matrix Market reference for the model-input tests (Debian python3-scipy, scipy.io).

  write DIR   writes the fixtures with scipy.io.mmwrite (coordinate and array, real and integer,
              general and symmetric) -- run once; the files are committed.
  read FILE.. prints {"FILE": [[row], ...]} as read by scipy.io.mmread, densified with toarray().

Run with /usr/bin/python3 (Debian's numpy/scipy).
"""
import json
import os
import sys

import numpy as np
import scipy.io
import scipy.sparse


def write(directory):
    rng = np.random.default_rng(20240611)
    os.makedirs(directory, exist_ok=True)
    dense = rng.standard_normal((4, 3))
    scipy.io.mmwrite(os.path.join(directory, 'array_general.mtx'), dense,
                     comment='array real general written by scipy.io.mmwrite')
    sym = rng.standard_normal((5, 5))
    sym = sym + sym.T
    scipy.io.mmwrite(os.path.join(directory, 'array_symmetric.mtx'), sym, symmetry='symmetric')
    sparse = scipy.sparse.random(6, 6, density=0.35, random_state=7, format='coo')
    sparse = sparse - 3.0 * scipy.sparse.eye(6)
    scipy.io.mmwrite(os.path.join(directory, 'coordinate_general.mtx'), sparse.tocoo(),
                     comment='coordinate real general: a stable sparse A')
    ssym = scipy.sparse.random(6, 6, density=0.3, random_state=11)
    ssym = (ssym + ssym.T - 4.0 * scipy.sparse.eye(6)).tocoo()
    scipy.io.mmwrite(os.path.join(directory, 'coordinate_symmetric.mtx'), ssym, symmetry='symmetric')
    ints = scipy.sparse.coo_matrix(np.array([[2, 0, -1], [0, 5, 0]], dtype=np.int64))
    scipy.io.mmwrite(os.path.join(directory, 'coordinate_integer.mtx'), ints, field='integer')


def read(files):
    out = {}
    for f in files:
        m = scipy.io.mmread(f)
        if scipy.sparse.issparse(m):
            m = m.toarray()
        out[os.path.basename(f)] = np.asarray(m, dtype=float).tolist()
    json.dump(out, sys.stdout)


if __name__ == '__main__':
    if sys.argv[1] == 'write':
        write(sys.argv[2])
    else:
        read(sys.argv[2:])
