"""Dense Redheffer star-product composition in numpy (Debian python3-numpy), for `npm run bench`.

Reads {"sizes": [W, ...], "repeat": n} on stdin; for each W composes W slices, each a unitary
2W x 2W scattering matrix (W channels each way), with the star product, and prints
{"numpy": version, "results": [{"W": W, "seconds": best_of_n, "transmission": T}]}.
"""
import json
import sys
import time

import numpy as np


def random_unitary(n, rng):
    z = rng.standard_normal((n, n)) + 1j * rng.standard_normal((n, n))
    q, r = np.linalg.qr(z)
    return q * (np.diag(r) / abs(np.diag(r)))


def star(a, b, w):
    r1, t1p, t1, r1p = a[:w, :w], a[:w, w:], a[w:, :w], a[w:, w:]
    r2, t2p, t2, r2p = b[:w, :w], b[:w, w:], b[w:, :w], b[w:, w:]
    eye = np.eye(w)
    x = np.linalg.solve(eye - r1p @ r2, np.hstack([t1, r1p @ t2p]))
    y = np.linalg.solve(eye - r2 @ r1p, t2p)
    out = np.empty_like(a)
    out[w:, :w] = t2 @ x[:, :w]
    out[:w, :w] = r1 + t1p @ r2 @ x[:, :w]
    out[:w, w:] = t1p @ y
    out[w:, w:] = r2p + t2 @ x[:, w:]
    return out


def main():
    req = json.load(sys.stdin)
    rng = np.random.default_rng(1)
    results = []
    for w in req["sizes"]:
        s = random_unitary(2 * w, rng)
        best = float("inf")
        T = 0.0
        for _ in range(req.get("repeat", 3)):
            t0 = time.perf_counter()
            acc = s
            for _ in range(w - 1):
                acc = star(acc, s, w)
            best = min(best, time.perf_counter() - t0)
            T = float(np.sum(abs(acc[w:, :w]) ** 2))
        results.append({"W": w, "seconds": best, "transmission": T})
    print(json.dumps({"numpy": np.__version__, "results": results}))


if __name__ == "__main__":
    main()
