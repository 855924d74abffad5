"""Vectorised numpy reference for bench/risk.ts (Stagewright Risk simulation).

Reads {"cases": [{"label", "matrices": [K][n][n], "weights": [K], "initial": [n],
"horizon", "replicates", "threshold", "burnIn", "repeats"}]} from the JSON file
named on the command line and prints one JSON object:
{"numpy": version, "blas": {...}, "results": {label: {"seconds": [...], "cpu": [...], "summary": {...}}}}
(wall-clock and process CPU seconds per run).

Each case does what Stagewright's fast path does, with all replicates as one
array: N (replicates x stages) is updated each year by a batched matrix
product with a matrix chosen per replicate (independent choice with the
given weights), grouping the replicates by their chosen matrix (one BLAS
product per matrix; faster here than einsum over a gathered stack). Per year
it records first passages at or below the threshold on the total and the
mean and variance of the total; it keeps log N at the burn-in year for the
stochastic growth rate, and at the end the final totals' histogram on fixed
log bins (100 per decade) and quantiles.
"""
import ctypes
import glob
import json
import os
import sys
import time

import numpy as np


def blas_info():
    """Which BLAS numpy runs here, and with how many threads (threadpoolctl when present, else the bundled OpenBLAS)."""
    info = {
        "OPENBLAS_CORETYPE": os.environ.get("OPENBLAS_CORETYPE"),
        "OPENBLAS_L2_SIZE": os.environ.get("OPENBLAS_L2_SIZE"),
        "OPENBLAS_NUM_THREADS": os.environ.get("OPENBLAS_NUM_THREADS"),
    }
    try:
        from threadpoolctl import threadpool_info

        info["threadpools"] = [
            {k: p.get(k) for k in ("internal_api", "version", "architecture", "num_threads")} for p in threadpool_info()
        ]
        return info
    except ImportError:
        pass
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


def simulate(case, rng):
    A = np.asarray(case["matrices"], dtype=np.float64)  # K x n x n
    AT = np.ascontiguousarray(A.transpose(0, 2, 1))  # N @ A_k^T == (A_k N^T)^T
    K, n, _ = A.shape
    R = case["replicates"]
    T = case["horizon"]
    thr = case["threshold"]
    burn = case["burnIn"]
    cum = np.cumsum(np.asarray(case["weights"], dtype=np.float64))
    N = np.tile(np.asarray(case["initial"], dtype=np.float64), (R, 1))
    total = N.sum(axis=1)
    extinct = total <= thr
    first = np.zeros(T + 1, dtype=np.int64)
    first[0] = extinct.sum()
    mean = np.empty(T + 1)
    var = np.empty(T + 1)
    mean[0] = total[0]
    var[0] = 0.0
    log_start = np.log(total) if burn == 0 else None
    out = np.empty_like(N)
    for t in range(1, T + 1):
        k = np.searchsorted(cum, rng.random(R), side="right")
        np.minimum(k, K - 1, out=k)
        order = np.argsort(k, kind="stable")
        counts = np.bincount(k, minlength=K)
        Ns = N[order]
        start = 0
        for j in range(K):
            end = start + counts[j]
            if end > start:
                out[order[start:end]] = Ns[start:end] @ AT[j]
            start = end
        N, out = out, N
        total = N.sum(axis=1)
        hit = (total <= thr) & ~extinct
        first[t] = hit.sum()
        extinct |= hit
        mean[t] = total.mean()
        var[t] = total.var(ddof=1)
        if t == burn:
            log_start = np.log(total)
    growth = (np.log(total) - log_start) / (T - burn)
    edges = 10.0 ** (np.arange(-6 * 100, 15 * 100 + 1) / 100)
    hist, _ = np.histogram(total, bins=edges)
    quantiles = np.quantile(total, [0.025, 0.05, 0.1, 0.25, 0.5, 0.75, 0.9, 0.95, 0.975])
    return {
        "quasiExtinctionAtHorizon": float(first.sum() / R),
        "firstPassage": first.tolist(),
        "meanFinal": float(mean[T]),
        "logLambdaS": float(growth.mean()),
        "logLambdaSStandardError": float(growth.std(ddof=1) / np.sqrt(R)),
        "medianFinal": float(quantiles[4]),
        "histogramBins": int((hist > 0).sum()),
    }


def main():
    with open(sys.argv[1], encoding="utf8") as f:
        spec = json.load(f)
    results = {}
    for case in spec["cases"]:
        rng = np.random.default_rng(case.get("seed", 1))
        simulate(case, rng)  # warm-up
        seconds = []
        cpu = []
        summary = None
        for _ in range(case["repeats"]):
            c0 = time.process_time()
            t0 = time.perf_counter()
            summary = simulate(case, rng)
            seconds.append(time.perf_counter() - t0)
            cpu.append(time.process_time() - c0)
        results[case["label"]] = {"seconds": seconds, "cpu": cpu, "summary": summary}
    print(json.dumps({"numpy": np.__version__, "blas": blas_info(), "results": results}))


if __name__ == "__main__":
    main()
