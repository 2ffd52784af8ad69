#!/usr/bin/python3
"""Reference values for the pull API's discretised export (tests/integration/pull-api-exports.test.ts),
from Debian's python3-numpy / python3-scipy.

Reads one JSON request on stdin, writes one JSON answer on stdout:

  {"A", "B", "C", "D", "ts"}  (matrices as lists of rows)
      -> {"Ad", "Bd", "Cd", "Dd"}   scipy.signal.cont2discrete((A, B, C, D), ts, method="zoh")
         "discretePoles": [[re, im], ...]      numpy.linalg.eigvals(Ad)
         "continuousPoles": [[re, im], ...]    numpy.linalg.eigvals(A)
"""
import json
import sys

import numpy as np
import scipy.signal


def main():
    req = json.load(sys.stdin)
    A, B, C, D = (np.array(req[k], dtype=float) for k in ("A", "B", "C", "D"))
    Ad, Bd, Cd, Dd, _ = scipy.signal.cont2discrete((A, B, C, D), float(req["ts"]), method="zoh")
    pairs = lambda z: [[float(v.real), float(v.imag)] for v in z]
    json.dump(
        {
            "Ad": Ad.tolist(),
            "Bd": Bd.tolist(),
            "Cd": Cd.tolist(),
            "Dd": Dd.tolist(),
            "discretePoles": pairs(np.linalg.eigvals(Ad)),
            "continuousPoles": pairs(np.linalg.eigvals(A)),
        },
        sys.stdout,
    )


if __name__ == "__main__":
    main()
