"""Triskel client: calculations, scans, datasets and fits from Python.

One file, standard library only (urllib, json, time), Python 3.9 or later. Download it from a
Triskel service at /clients/triskel.py and put it beside your script or notebook.

    import triskel
    c = triskel.Client("http://127.0.0.1:3000", "trk_...")
    run = c.run(network, computation)          # waits; the calculation as a dict
    print(run["result"]["conductance"]["total"], run["result"]["conductance"]["unit"])

Words: a calculation is a `run` in the API and a scan is a `sweep`. Every result is a model
prediction; it carries its own checks and warnings (`result["checks"]`, `result["warnings"]`):
read them. Estimates (compute-seconds and US dollars) are known before anything is charged:
`Client.estimate(...)` asks for one without submitting.

Errors raise TriskelError with `.status` (the HTTP status; None when the service could not be
reached or a job did not succeed), `.code` (the API's error code, e.g. "invalid_input",
"payment_required", "unauthenticated"; "unreachable", "job_failed", "job_cancelled" from the
client itself), `.message` and `.details`. Waiting backs off from 0.5 s to 5 s between polls, and
answers 429 and 503 are retried after the seconds their Retry-After header gives.
"""

import json
import os
import time
import urllib.error
import urllib.parse
import urllib.request
import uuid
from typing import Any, Callable, Dict, List, Optional, Union

__all__ = ["Client", "TriskelError"]
__version__ = "1.0.0"

FINISHED = ("succeeded", "failed", "cancelled")

Json = Dict[str, Any]
NetworkArg = Union[Json, str]


class TriskelError(Exception):
    """An error of the API or of a job.

    status:  HTTP status (400, 401, 402, 403, 404, 409, 413, 422, 429, 5xx), or None when the
             service could not be reached or a job finished without succeeding.
    code:    the API's error code (``invalid_input``, ``payment_required``, ...), or
             ``unreachable``, ``job_failed``, ``job_cancelled``.
    message: one sentence saying what is wrong (the API's own message).
    details: the API's details (e.g. ``{"field": "computation.energyMeV"}``), or the finished job.
    """

    def __init__(self, status: Optional[int], code: str, message: str, details: Any = None):
        super().__init__(message if status is None else "%s (HTTP %d %s)" % (message, status, code))
        self.status = status
        self.code = code
        self.message = message
        self.details = details


class Client:
    """A Triskel service at `url` (e.g. ``http://127.0.0.1:3000``) with an API token ``trk_...``.

    timeout:      seconds for one HTTP request.
    busy_retries: how often an answer 429 or 503 is waited out (as its Retry-After says) before
                  TriskelError is raised.
    progress:     optional callable, given the job (a dict) at every poll while waiting.
    """

    def __init__(
        self,
        url: str,
        token: str,
        timeout: float = 60.0,
        busy_retries: int = 5,
        progress: Optional[Callable[[Json], None]] = None,
    ):
        url = url.rstrip("/")
        if url.endswith("/api/v1"):
            url = url[: -len("/api/v1")]
        if not (url.startswith("http://") or url.startswith("https://")):
            raise ValueError("url must start with http:// or https://, e.g. http://127.0.0.1:3000; got %r" % url)
        if not token:
            raise ValueError("token: give an API token (trk_...)")
        self.url = url
        self.token = token
        self.timeout = timeout
        self.busy_retries = busy_retries
        self.progress = progress

    # ------------------------------------------------------------------ HTTP

    def _request(
        self,
        method: str,
        path: str,
        body: Any = None,
        query: Optional[Dict[str, Any]] = None,
        raw: Optional[bytes] = None,
        content_type: Optional[str] = None,
    ) -> bytes:
        """One request to /api/v1; returns the body's bytes. Retries 429 and 503 after Retry-After."""
        target = self.url + "/api/v1" + path
        if query:
            target += "?" + urllib.parse.urlencode({k: v for k, v in query.items() if v is not None})
        headers = {"Authorization": "Bearer " + self.token, "Accept": "application/json"}
        data = raw
        if body is not None:
            data = json.dumps(body).encode("utf-8")
            headers["Content-Type"] = "application/json"
        elif content_type:
            headers["Content-Type"] = content_type
        attempt = 0
        while True:
            req = urllib.request.Request(target, data=data, method=method, headers=headers)
            try:
                with urllib.request.urlopen(req, timeout=self.timeout) as res:
                    return res.read()
            except urllib.error.HTTPError as e:
                err = _error_of(e)
                if e.code in (429, 503) and attempt < self.busy_retries:
                    time.sleep(_retry_after(e.headers.get("Retry-After"), attempt))
                    attempt += 1
                    continue
                raise err from None
            except (urllib.error.URLError, OSError) as e:
                reason = getattr(e, "reason", e)
                raise TriskelError(None, "unreachable", "cannot reach %s: %s" % (self.url, reason)) from None

    def _json(self, method: str, path: str, body: Any = None, query: Optional[Dict[str, Any]] = None) -> Any:
        text = self._request(method, path, body=body, query=query)
        return json.loads(text.decode("utf-8")) if text else None

    # ------------------------------------------------------------------ calculations (runs)

    def run(self, network: NetworkArg, computation: Json, wait: bool = True, network_version: Optional[int] = None) -> Json:
        """Submit a calculation (POST /api/v1/runs) and, with wait=True, wait for it.

        network:     the network description (a dict, the engine's schema) or a saved network's id.
        computation: e.g. ``{"kind": "conductance", "energyMeV": 0.5, "fieldTesla": 0.1}``.
        Returns the finished calculation (GET /api/v1/runs/{id}: ``result`` is exactly what
        ``npm run -s cli -- compute`` prints), or with wait=False the 202 answer
        ``{id, status, estimate, ...}``. A calculation that fails or is cancelled raises
        TriskelError (code ``job_failed`` / ``job_cancelled``, ``details`` the calculation).
        """
        body = _with_network({"computation": computation}, network, network_version)
        created = self._json("POST", "/runs", body)
        return self.wait_run(created["id"]) if wait else created

    def get_run(self, run_id: str) -> Json:
        """A calculation as it stands now (GET /api/v1/runs/{id}), with its input and result."""
        return self._json("GET", "/runs/" + _seg(run_id))

    def run_result(self, run_id: str) -> Json:
        """A succeeded calculation's result.json (what the command line's compute prints)."""
        return json.loads(self._request("GET", "/runs/" + _seg(run_id) + "/result.json").decode("utf-8"))

    def wait_run(self, run_id: str, timeout: Optional[float] = None) -> Json:
        """Wait until the calculation finishes; returns it, raises TriskelError unless it succeeded."""
        return _finished(self._wait(lambda: self.get_run(run_id), timeout), "calculation")

    # ------------------------------------------------------------------ scans (sweeps)

    def sweep(
        self,
        network: NetworkArg,
        computation: Json,
        axes: List[Json],
        ensemble: Union[None, int, Json] = None,
        wait: bool = True,
        name: Optional[str] = None,
        network_version: Optional[int] = None,
    ) -> Json:
        """Submit a scan (POST /api/v1/sweeps) and, with wait=True, wait for it.

        axes:     one or two of ``{"parameter": "fieldTesla", "from": 0, "to": 0.2, "points": 21}``
                  or ``{"parameter": "energyMeV", "values": [0, 0.5, 1]}``; the first axis varies
                  slowest.
        ensemble: disorder seeds averaged at every point: a number or ``{"samples": n}``.
        Returns the finished scan (GET /api/v1/sweeps/{id}: ``points``, ``grid``), or with
        wait=False the 202 answer. A scan with failed points or cancelled raises TriskelError
        (``details`` the scan, whose succeeded points keep their results).
        """
        body: Json = {"computation": computation, "axes": axes}
        if ensemble is not None:
            body["ensemble"] = {"samples": ensemble} if isinstance(ensemble, int) else ensemble
        if name is not None:
            body["name"] = name
        created = self._json("POST", "/sweeps", _with_network(body, network, network_version))
        return self.wait_sweep(created["id"]) if wait else created

    def get_sweep(self, sweep_id: str) -> Json:
        """A scan as it stands now (GET /api/v1/sweeps/{id}), with its points and partial results."""
        return self._json("GET", "/sweeps/" + _seg(sweep_id))

    def sweep_csv(self, sweep_id: str) -> str:
        """A scan's results as CSV text (GET /api/v1/sweeps/{id}/results.csv; # lines give the units)."""
        return self._request("GET", "/sweeps/" + _seg(sweep_id) + "/results.csv").decode("utf-8")

    def wait_sweep(self, sweep_id: str, timeout: Optional[float] = None) -> Json:
        """Wait until the scan finishes; returns it, raises TriskelError unless it succeeded."""
        return _finished(self._wait(lambda: self.get_sweep(sweep_id), timeout), "scan")

    # ------------------------------------------------------------------ estimates and cancelling

    def estimate(
        self,
        network: NetworkArg,
        computation: Json,
        axes: Optional[List[Json]] = None,
        ensemble: Union[None, int, Json] = None,
    ) -> Json:
        """Every check and the estimate of a calculation (or, with axes, a scan), submitting nothing.

        Returns the API's dry-run answer; ``["estimate"]`` is ``{computeSeconds, costUsd}``.
        """
        body: Json = _with_network({"computation": computation}, network, None)
        if axes is None:
            return self._json("POST", "/runs", body, query={"dryRun": "true"})
        body["axes"] = axes
        if ensemble is not None:
            body["ensemble"] = {"samples": ensemble} if isinstance(ensemble, int) else ensemble
        return self._json("POST", "/sweeps", body, query={"dryRun": "true"})

    def cancel(self, job_id: str) -> Json:
        """Cancel a calculation, a scan or a fit by its id (tried in that order); returns it.

        Compute-seconds already spent are kept (and billed). Raises TriskelError 409 when the job
        had already finished, 404 when no job of yours has this id.
        """
        for path in ("/runs/", "/sweeps/", "/fits/"):
            try:
                return self._json("POST", path + _seg(job_id) + "/cancel")
            except TriskelError as e:
                if e.status != 404:
                    raise
        raise TriskelError(404, "not_found", "no calculation, scan or fit %s in this group" % job_id)

    # ------------------------------------------------------------------ datasets and fits

    def upload_dataset(self, path: str, mapping: Dict[str, str]) -> Json:
        """Upload a measured curve as CSV (POST /api/v1/datasets, multipart) with its column mapping.

        mapping: ``{"name": ..., "xColumn": ..., "xUnit": "T" | "mT" | ..., "yColumn": ...,
        "yUnit": ..., "sigmaColumn"?: ..., "temperatureColumn"?: ..., "yMeasures"?: ...,
        "description"?: ...}`` (docs/data-and-fits.md lists the units). Returns the dataset.
        """
        with open(path, "rb") as f:
            content = f.read()
        boundary = "triskel-" + uuid.uuid4().hex
        parts = []
        for key, value in mapping.items():
            parts.append(
                ("--%s\r\nContent-Disposition: form-data; name=\"%s\"\r\n\r\n%s\r\n" % (boundary, _quote(key), value)).encode("utf-8")
            )
        filename = _quote(os.path.basename(path))
        parts.append(
            (
                "--%s\r\nContent-Disposition: form-data; name=\"file\"; filename=\"%s\"\r\nContent-Type: text/csv\r\n\r\n" % (boundary, filename)
            ).encode("utf-8")
            + content
            + b"\r\n"
        )
        parts.append(("--%s--\r\n" % boundary).encode("utf-8"))
        text = self._request("POST", "/datasets", raw=b"".join(parts), content_type="multipart/form-data; boundary=" + boundary)
        return json.loads(text.decode("utf-8"))

    def get_dataset(self, dataset_id: str) -> Json:
        """A dataset with its points (GET /api/v1/datasets/{id})."""
        return self._json("GET", "/datasets/" + _seg(dataset_id))

    def fit(
        self,
        dataset_id: str,
        network: NetworkArg,
        computation: Json,
        sweep_parameter: str,
        parameters: List[Json],
        options: Optional[Json] = None,
        wait: bool = True,
        network_version: Optional[int] = None,
    ) -> Json:
        """Fit model parameters to a dataset (POST /api/v1/fits) and, with wait=True, wait for it.

        sweep_parameter: the computation field the dataset's x maps to (``"fieldTesla"``).
        parameters: up to 7 of ``{"parameter": "node.forward", "initial": 0.5, "min": 0.3, "max": 0.8}``.
        options: ``{"multiStart", "globalStarts", "maxIterations", "profilePoints", ...}``
        (docs/data-and-fits.md). Returns the finished fit (``result``: values with standard errors,
        chi2 per degree of freedom, flags), or with wait=False the 202 answer.
        """
        body: Json = {"datasetId": dataset_id, "computation": computation, "sweepParameter": sweep_parameter, "fit": parameters}
        if options is not None:
            body["options"] = options
        created = self._json("POST", "/fits", _with_network(body, network, network_version))
        return self.wait_fit(created["id"]) if wait else created

    def get_fit(self, fit_id: str) -> Json:
        """A fit as it stands now (GET /api/v1/fits/{id})."""
        return self._json("GET", "/fits/" + _seg(fit_id))

    def wait_fit(self, fit_id: str, timeout: Optional[float] = None) -> Json:
        """Wait until the fit finishes; returns it, raises TriskelError unless it succeeded."""
        return _finished(self._wait(lambda: self.get_fit(fit_id), timeout), "fit")

    # ------------------------------------------------------------------ waiting

    def _wait(self, poll: Callable[[], Json], timeout: Optional[float]) -> Json:
        """Poll until the job's status is final, 0.5 s growing to 5 s between polls."""
        start = time.monotonic()
        delay = 0.5
        while True:
            job = poll()
            if self.progress is not None:
                self.progress(job)
            if job.get("status") in FINISHED:
                return job
            if timeout is not None and time.monotonic() - start + delay > timeout:
                raise TriskelError(None, "timeout", "%s is still %s after %.0f s; it goes on (wait for it again)" % (job.get("id"), job.get("status"), timeout), job)
            time.sleep(delay)
            delay = min(delay * 1.5, 5.0)


# ---------------------------------------------------------------------- helpers


def _with_network(body: Json, network: NetworkArg, version: Optional[int]) -> Json:
    if isinstance(network, str):
        body["networkId"] = network
        if version is not None:
            body["networkVersion"] = version
    else:
        body["network"] = network
    return body


def _finished(job: Json, noun: str) -> Json:
    status = job.get("status")
    if status == "succeeded":
        return job
    if status == "cancelled":
        raise TriskelError(None, "job_cancelled", "%s %s was cancelled" % (noun, job.get("id")), job)
    error = job.get("error") or {}
    if not error and isinstance(job.get("counts"), dict):
        message = "%s %s failed: %d of %d points failed" % (noun, job.get("id"), job["counts"].get("failed", 0), job.get("pointCount", 0))
    else:
        message = "%s %s failed: %s" % (noun, job.get("id"), error.get("message") or error.get("code") or "no reason given")
    raise TriskelError(None, "job_failed", message, job)


def _error_of(e: "urllib.error.HTTPError") -> TriskelError:
    try:
        text = e.read().decode("utf-8", "replace")
    except OSError:
        text = ""
    try:
        err = json.loads(text)["error"]
        return TriskelError(e.code, err.get("code", "http_%d" % e.code), err.get("message", text), err.get("details"))
    except (ValueError, KeyError, TypeError):
        return TriskelError(e.code, "http_%d" % e.code, "HTTP %d %s" % (e.code, e.reason))


def _retry_after(header: Optional[str], attempt: int) -> float:
    if header:
        try:
            return max(0.0, min(float(header), 60.0))
        except ValueError:
            pass
    return float(min(2**attempt, 30))


def _seg(job_id: str) -> str:
    return urllib.parse.quote(str(job_id), safe="")


def _quote(text: str) -> str:
    return text.replace("\\", "\\\\").replace('"', '\\"').replace("\r", " ").replace("\n", " ")
