"""Drives public/clients/triskel.py against a running Triskel (tests/integration/python-client.test.ts).

Asserts what it can alone and prints one JSON object of findings that the test checks further.
Environment: TRISKEL_URL, TRISKEL_TOKEN (a Lab researcher), TRISKEL_STUDENT_TOKEN (Free),
TRISKEL_CLIENT_DIR (the folder of triskel.py), TRISKEL_WORK_DIR (for the dataset file).
"""

import json
import os
import sys
import threading
import time
from http.server import BaseHTTPRequestHandler, HTTPServer

sys.path.insert(0, os.environ["TRISKEL_CLIENT_DIR"])
import triskel  # noqa: E402

URL = os.environ["TRISKEL_URL"]
c = triskel.Client(URL, os.environ["TRISKEL_TOKEN"])
network = {
    "lattice": "triangular",
    "size": {"columns": 6, "rows": 6},
    "transverse": "periodic",
    "twistDegrees": 0.11,
    "node": {"forward": 0.6, "left": 0.2, "right": 0.2},
}
computation = {"kind": "conductance", "energyMeV": 0.5, "fieldTesla": 0.1}
out = {}

# a calculation, waited for; its result next to result.json
polls = []
c.progress = lambda job: polls.append(job["status"])
run = c.run(network, computation)
c.progress = None
assert run["status"] == "succeeded", run
assert polls[-1] == "succeeded", polls
out["run"] = {"id": run["id"], "result": run["result"], "polls": len(polls)}
assert c.run_result(run["id"]) == run["result"]
assert c.get_run(run["id"])["id"] == run["id"]

# the estimate, nothing submitted
out["estimate"] = c.estimate(network, computation)["estimate"]

# a scan and its CSV
scan = c.sweep(network, {"kind": "conductance", "energyMeV": 0.5}, [{"parameter": "fieldTesla", "values": [0, 0.1]}], ensemble=None, name="python client scan")
assert scan["status"] == "succeeded" and scan["pointCount"] == 2, scan
out["sweep"] = {"id": scan["id"], "grid": scan["grid"]["quantities"]["conductance.total"], "csv": c.sweep_csv(scan["id"])}
assert c.get_sweep(scan["id"])["name"] == "python client scan"

# cancel: a long scan without waiting, cancelled at once; waiting for it then raises job_cancelled
long = c.sweep(network, {"kind": "conductance", "energyMeV": 0.5}, [{"parameter": "fieldTesla", "from": 0, "to": 1, "points": 40}], wait=False)
cancelled = c.cancel(long["id"])
assert cancelled["id"] == long["id"], cancelled
try:
    c.wait_sweep(long["id"])
    raise AssertionError("a cancelled scan must raise")
except triskel.TriskelError as e:
    out["cancelled"] = {"status": e.status, "code": e.code, "message": e.message, "jobStatus": e.details["status"]}
try:
    c.cancel(long["id"])
    raise AssertionError("cancelling a finished scan must raise")
except triskel.TriskelError as e:
    out["cancelAgain"] = {"status": e.status, "code": e.code}

# errors: invalid input (422), plan limit on Free (402), a bad token (401), unreachable
def error_of(f):
    try:
        f()
    except triskel.TriskelError as e:
        return {"status": e.status, "code": e.code, "message": e.message, "details": e.details}
    raise AssertionError("expected a TriskelError")

out["invalid"] = error_of(lambda: c.run(network, {"kind": "conductance", "energyMeV": "high"}))
student = triskel.Client(URL, os.environ["TRISKEL_STUDENT_TOKEN"])
big = dict(network, size={"columns": 42, "rows": 42})
out["plan"] = error_of(lambda: student.run(big, {"kind": "conductance"}))
out["token"] = error_of(lambda: triskel.Client(URL, "trk_not_a_real_token_000000000000").get_run(run["id"]))
out["unreachable"] = error_of(lambda: triskel.Client("http://127.0.0.1:45099", "trk_x").get_run(run["id"]))

# a dataset: the model's own curve at five fields (synthetic, no noise), then a small quick fit of node.forward
work = os.environ["TRISKEL_WORK_DIR"]
fields = [0.0, 0.05, 0.1, 0.15, 0.2]
curve = c.sweep(network, {"kind": "conductance", "energyMeV": 0.5}, [{"parameter": "fieldTesla", "values": fields}])
g = curve["grid"]["quantities"]["conductance.total"]
csv_path = os.path.join(work, "python-curve (synthetic).csv")
with open(csv_path, "w") as f:
    f.write("B (T),G (e2/h),dG (e2/h)\n")
    for b, v in zip(fields, g):
        f.write("%g,%.12g,0.01\n" % (b, v))
dataset = c.upload_dataset(csv_path, {"name": "python client curve (synthetic)", "xColumn": "B (T)", "xUnit": "T", "yColumn": "G (e2/h)", "yUnit": "e2/h", "sigmaColumn": "dG (e2/h)"})
out["dataset"] = {"id": dataset["id"], "name": dataset["name"], "points": c.get_dataset(dataset["id"]).get("pointCount")}
started = time.monotonic()
fit = c.fit(
    dataset["id"],
    network,
    {"kind": "conductance", "energyMeV": 0.5},
    "fieldTesla",
    [{"parameter": "node.forward", "initial": 0.55, "min": 0.45, "max": 0.75}],
    options={"multiStart": 1, "globalStarts": 0, "maxIterations": 10, "profilePoints": 0},
)
out["fit"] = {"status": fit["status"], "parameters": fit["result"]["parameters"], "flags": fit["result"]["flags"], "seconds": time.monotonic() - started}
out["badMapping"] = error_of(lambda: c.upload_dataset(csv_path, {"name": "x", "xColumn": "B (T)", "xUnit": "gauss", "yColumn": "G (e2/h)", "yUnit": "e2/h"}))


# Retry-After: a stand-in answering 429 (Retry-After: 1) once, then the run
class Busy(BaseHTTPRequestHandler):
    hits = []

    def do_GET(self):
        Busy.hits.append(time.monotonic())
        if len(Busy.hits) == 1:
            body = json.dumps({"error": {"code": "rate_limited", "message": "Too many read requests. Retry in 1 s."}}).encode()
            self.send_response(429)
            self.send_header("Retry-After", "1")
        else:
            body = json.dumps({"id": "r1", "status": "succeeded"}).encode()
            self.send_response(200)
        self.send_header("Content-Type", "application/json")
        self.send_header("Content-Length", str(len(body)))
        self.end_headers()
        self.wfile.write(body)

    def log_message(self, *args):
        pass


server = HTTPServer(("127.0.0.1", 0), Busy)
threading.Thread(target=server.serve_forever, daemon=True).start()
got = triskel.Client("http://127.0.0.1:%d" % server.server_port, "trk_x").get_run("r1")
server.shutdown()
out["retryAfter"] = {"got": got, "hits": len(Busy.hits), "waited": Busy.hits[1] - Busy.hits[0]}

print(json.dumps(out))
