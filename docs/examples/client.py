# Download the client once: curl -O "$TRISKEL_URL/clients/triskel.py"
import json
import os

import triskel

c = triskel.Client(os.environ["TRISKEL_URL"], os.environ["TRISKEL_TOKEN"])
example = json.load(open("docs/examples/run.json"))

# The estimate first: compute-seconds and US dollars, nothing submitted.
print(c.estimate(example["network"], example["computation"])["estimate"])

# A calculation: waits and returns it; "result" is what `compute` prints.
run = c.run(example["network"], example["computation"])
g = run["result"]["conductance"]
print("G =", g["total"], g["unit"], "checks:", run["result"]["checks"])
print("warnings:", run["result"]["warnings"])

# A scan over the field, its results as CSV (units in the # lines).
field = {"parameter": "fieldTesla", "from": 0, "to": 0.2, "points": 5}
scan = c.sweep(example["network"], {"kind": "conductance", "energyMeV": 0.5}, axes=[field])
print(scan["grid"]["quantities"]["conductance.total"])
open("scan.csv", "w").write(c.sweep_csv(scan["id"]))

# Errors carry the HTTP status, the API's code and its message.
try:
    c.run(example["network"], {"kind": "conductance", "energyMeV": "high"})
except triskel.TriskelError as e:
    print(e.status, e.code, e.message)
