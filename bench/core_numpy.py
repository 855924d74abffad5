"""Numpy reference timings for bench/core.ts.

Reads {"cases": [{"label": str, "matrices": [[[...]]]}], "minBatchSeconds": float}
from the JSON file named on the command line and prints one JSON object:
{"numpy": version, "blas": {...}, "results": {label: {"wall": s, "cpu": s}}}, the
median wall-clock and CPU seconds per analysis (CPU time sums all threads, so
it is comparable to the TypeScript side only with OPENBLAS_NUM_THREADS=1).
The analysis mirrors what the TypeScript core returns: eig of A and of A^T,
lambda and lambda_2, w (sum 1), v (v_1 = 1), then S and E as outer products.
"""
import ctypes
import glob
import json
import os
import statistics
import sys
import time

import numpy as np


def blas_info():
    info = {"OPENBLAS_CORETYPE": os.environ.get("OPENBLAS_CORETYPE"), "OPENBLAS_NUM_THREADS": os.environ.get("OPENBLAS_NUM_THREADS")}
    libs = glob.glob(os.path.join(os.path.dirname(np.__file__), os.pardir, "numpy.libs", "libscipy_openblas*.so"))
    if libs:
        try:
            lib = ctypes.CDLL(libs[0])
            for name, key in (("scipy_openblas_get_corename64_", "core"), ("scipy_openblas_get_config64_", "config")):
                fn = getattr(lib, name, None)
                if fn is not None:
                    fn.restype = ctypes.c_char_p
                    info[key] = fn().decode()
            threads = getattr(lib, "scipy_openblas_get_num_threads64_", None)
            if threads is not None:
                threads.restype = ctypes.c_int
                info["threads"] = threads()
        except OSError as exc:  # the library could not be loaded: report, don't guess
            info["error"] = str(exc)
    return info


def analyse(A):
    lam, W = np.linalg.eig(A)
    k = int(np.argmax(lam.real))
    lam1 = lam[k].real
    w = W[:, k].real
    w = w / w.sum()
    mods = np.sort(np.abs(np.delete(lam, k)))
    lam2 = mods[-1] if mods.size else 0.0
    lt, V = np.linalg.eig(A.T)
    kt = int(np.argmax(lt.real))
    v = V[:, kt].real
    v = v / v[0]
    S = np.outer(v, w) / v.dot(w)
    E = S * A / lam1
    return lam1, lam2, E


def main():
    with open(sys.argv[1]) as fh:
        spec = json.load(fh)
    min_batch = float(spec.get("minBatchSeconds", 0.02))
    results = {}
    for case in spec["cases"]:
        mats = [np.array(m, dtype=float) for m in case["matrices"]]
        warm_start = time.perf_counter()
        while True:  # warm up, as the TypeScript side does
            for m in mats:
                analyse(m)
            if time.perf_counter() - warm_start > 0.5:
                break
        t0 = time.perf_counter()
        analyse(mats[0])
        one = max(time.perf_counter() - t0, 1e-7)
        per_batch = max(1, int(min_batch / one))
        batches = max(3, min(25, int(3.0 / (one * per_batch))))
        wall, cpu = [], []
        for b in range(batches):
            t0 = time.perf_counter()
            c0 = time.process_time()
            for r in range(per_batch):
                analyse(mats[(b * per_batch + r) % len(mats)])
            cpu.append((time.process_time() - c0) / per_batch)
            wall.append((time.perf_counter() - t0) / per_batch)
        results[case["label"]] = {"wall": statistics.median(wall), "cpu": statistics.median(cpu)}
    print(json.dumps({"numpy": np.__version__, "blas": blas_info(), "results": results}))


if __name__ == "__main__":
    main()
