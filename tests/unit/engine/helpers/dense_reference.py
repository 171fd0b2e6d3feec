"""Independent dense reference (numpy, Debian python3-numpy) for the engine tests.

Reads one JSON request on stdin and writes one JSON answer on stdout:
- {"op": "scattering", graph}: solves the whole network's linear system
  x_c = sum_j S_n[m][j] z_in x_in for every channel c leaving node n through slot m (lead inputs
  are the right-hand side) and returns the lead-out x lead-in scattering matrix.
- {"op": "eigvals", n, re, im}: eigenvalues of a dense complex matrix.
- {"op": "eigvalsh", n, re, im}: eigenvalues of a Hermitian matrix (ascending).
- {"op": "solve"/"matmul", ...}: dense products and solves.
- {"op": "resolvent_diag", graph}: diagonal of (1 - U)^-1 for a closed graph, U the link-to-link operator.
"""
import json
import sys

import numpy as np


def cmat(n, m, re, im):
    return (np.array(re, dtype=float) + 1j * np.array(im, dtype=float)).reshape(n, m)


def out(a):
    a = np.asarray(a)
    return {"re": a.real.ravel().tolist(), "im": a.imag.ravel().tolist(), "shape": list(a.shape)}


def link_operator(g):
    chans = g["channels"]
    C = len(chans)
    nodes = g["nodes"]
    U = np.zeros((C, C), dtype=complex)
    lead_in = [c for c, ch in enumerate(chans) if ch["from"] < 0]
    for c, ch in enumerate(chans):
        n = ch["from"]
        if n < 0:
            continue
        node = nodes[n]
        k = node["k"]
        S = cmat(k, k, node["re"], node["im"])
        m = ch["fromSlot"]
        for j in range(k):
            cin = node["inChannel"][j]
            zin = complex(chans[cin]["zr"], chans[cin]["zi"])
            U[c, cin] += S[m, j] * zin
    return U, lead_in


def main():
    req = json.load(sys.stdin)
    op = req["op"]
    if op == "scattering":
        g = req["graph"]
        U, lead_in = link_operator(g)
        C = U.shape[0]
        chans = g["channels"]
        internal = [c for c in range(C) if chans[c]["from"] >= 0]
        lead_out = [c for c in range(C) if chans[c]["to"] < 0]
        # unknowns: internal channels; lead-in channels are given
        A = np.eye(len(internal), dtype=complex) - U[np.ix_(internal, internal)]
        B = U[np.ix_(internal, lead_in)]
        X = np.linalg.solve(A, B)
        pos = {c: i for i, c in enumerate(internal)}
        S = X[[pos[c] for c in lead_out], :]
        print(json.dumps({"rows": lead_out, "cols": lead_in, **out(S)}))
    elif op == "resolvent_diag":
        U, _ = link_operator(req["graph"])
        G = np.linalg.inv(np.eye(U.shape[0]) - U)
        print(json.dumps(out(np.diag(G))))
    elif op == "link_eigvals":
        U, _ = link_operator(req["graph"])
        print(json.dumps(out(np.linalg.eigvals(U))))
    elif op == "eigvals":
        print(json.dumps(out(np.linalg.eigvals(cmat(req["n"], req["n"], req["re"], req["im"])))))
    elif op == "eigvalsh":
        print(json.dumps(out(np.linalg.eigvalsh(cmat(req["n"], req["n"], req["re"], req["im"])))))
    elif op == "solve":
        a = cmat(req["n"], req["n"], req["are"], req["aim"])
        b = cmat(req["n"], req["nrhs"], req["bre"], req["bim"])
        print(json.dumps(out(np.linalg.solve(a, b))))
    elif op == "matmul":
        a = cmat(req["m"], req["k"], req["are"], req["aim"])
        b = cmat(req["k"], req["n"], req["bre"], req["bim"])
        print(json.dumps(out(a @ b)))
    else:
        raise SystemExit("unknown op " + op)


if __name__ == "__main__":
    main()
