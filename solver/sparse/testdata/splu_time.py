"""Factor and solve a Matrix Market system with SciPy's SuperLU.

usage: /usr/bin/python3 splu_time.py A.mtx [X.mtx]

Reads A (coordinate format), sets b = A·1, factors A with
scipy.sparse.linalg.splu (default COLAMD column ordering) and prints one JSON
object: n, nnz, nnz_factors (L + U), factor_s, solve_s and the relative
residual ||Ax - b|| / ||b||. With X.mtx it also writes the solution x in
Matrix Market array format, for comparison with tearline's solver.
"""
import json
import sys
import time

import numpy as np
import scipy.io
import scipy.sparse.linalg as sla


def main():
    a = scipy.io.mmread(sys.argv[1]).tocsc()
    b = a @ np.ones(a.shape[0])
    t0 = time.perf_counter()
    lu = sla.splu(a)
    t1 = time.perf_counter()
    x = lu.solve(b)
    t2 = time.perf_counter()
    res = float(np.linalg.norm(a @ x - b) / np.linalg.norm(b))
    if len(sys.argv) > 2:
        scipy.io.mmwrite(sys.argv[2], x.reshape(-1, 1), precision=17)
    print(json.dumps({
        "n": a.shape[0],
        "nnz": int(a.nnz),
        "nnz_factors": int(lu.L.nnz + lu.U.nnz - a.shape[0]),
        "factor_s": t1 - t0,
        "solve_s": t2 - t1,
        "residual": res,
    }))


if __name__ == "__main__":
    main()
