"""numpy's X.T @ X on the rows the moments benchmark uses (bench/kernel.ts writes them as
little-endian float64, n × d row-major), for the side-by-side benchmark (bench/bench.ts):

    python3 bench/alternatives/cross_product.py FILE N D

Times one warm-up and three more products and prints one JSON line with the median seconds.
numpy hands the product to its BLAS (OpenBLAS on Debian), which uses every core.
"""
import json
import sys
import time

import numpy as np

path, n, d = sys.argv[1], int(sys.argv[2]), int(sys.argv[3])
X = np.fromfile(path, dtype="<f8", count=n * d).reshape(n, d)
times = []
for round in range(4):
    start = time.perf_counter()
    S = X.T @ X
    times.append(time.perf_counter() - start)
print(json.dumps({"seconds": sorted(times[1:])[1], "trace": float(np.trace(S))}))
