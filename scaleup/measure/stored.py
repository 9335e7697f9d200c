"""Analyse curves as the store keeps them, and say what to write back (no SQLite here).

The service layer reads curve rows (samples as little-endian float64 blobs), calls
:func:`analyse_stored`, and writes the returned column values with the curve; :func:`run_kla`
turns a run's analysed curves into the run's kLa. Probe-step curves of a run give the probe
time constant for that run's other curves when they have none of their own.
"""

from __future__ import annotations

import datetime as _dt
import json
import math
from collections.abc import Callable

import numpy as np

from scaleup.measure.curves import (
    DEFAULT_WINDOW,
    CurveRejected,
    Rejected,
    analyse_curves,
    fit_probe_step,
)
from scaleup.measure.dynamic import fit_dynamic
from scaleup.measure.replicates import combine_replicates

KLA_KINDS = ("gassing-out", "dynamic")
_MAX_RUN_KLA = 10.0  # 1/s, the store's physical bound for a run's kLa


def _samples(row: dict) -> tuple[np.ndarray, np.ndarray]:
    t, c = row["time_s"], row["do_values"]
    if isinstance(t, (bytes, bytearray, memoryview)):
        t, c = np.frombuffer(t, dtype="<f8"), np.frombuffer(c, dtype="<f8")
    return np.asarray(t, dtype=float), np.asarray(c, dtype=float)


def _finite(x) -> float | None:
    return float(x) if x is not None and math.isfinite(x) else None


def analyse_stored(rows: list[dict], *, window: tuple[float, float] | None = None,
                   tau_p_s: float | None = None, method: str = "nonlinear",
                   progress: Callable[[int, int], None] | None = None
                   ) -> tuple[list[dict], dict[int, dict]]:
    """Analyse stored curve rows; return a result per curve and the columns to store.

    Parameters
    ----------
    rows : list of dict
        Curve rows with ``id``, ``run_id``, ``kind``, ``time_s`` [s] and ``do_values`` (blobs
        or arrays), ``do_unit``, ``probe_tau_s`` [s], ``gas_on_s`` [s], ``window_low``,
        ``window_high``.
    window : (float, float), optional
        Fractions of the rise [-]; default the curve's stored window, else 0.2 to 0.98.
    tau_p_s : float, optional
        Probe time constant [s] for every curve, overriding what is stored.
    method : str
        ``"nonlinear"`` or ``"log-linear"``.
    progress : callable, optional
        ``progress(done, total)`` as curves are analysed.

    Returns
    -------
    (list of dict, dict)
        Per curve: curve_id, run_id, kind, method, kla_per_s, kla_stderr_per_s,
        kla_ci95_per_s, rejected (reason or None), warnings; and {curve id: column values}.
    """
    now = _dt.datetime.now(_dt.UTC).strftime("%Y-%m-%dT%H:%M:%S.%fZ")[:-4] + "Z"
    results: dict[int, dict] = {}
    changes: dict[int, dict] = {}
    total, done = len(rows), 0
    run_tau: dict[int, float] = {}
    for row in (r for r in rows if r["kind"] == "probe-step"):
        t, c = _samples(row)
        try:
            step = fit_probe_step(t, c, start_s=row["gas_on_s"])
        except CurveRejected as exc:
            results[row["id"]], changes[row["id"]] = _rejected(row, exc.reason, exc.code, now)
        else:
            run_tau[row["run_id"]] = step.tau_p_s
            summary = {"tau_p_s": step.tau_p_s, "tau_p_stderr_s": step.tau_p_stderr_s,
                       "n_points": step.n_points, "warnings": list(step.warnings)}
            results[row["id"]] = {**_head(row, "probe-step"), "kla_per_s": None,
                                  "kla_stderr_per_s": None, **summary, "rejected": None}
            changes[row["id"]] = {"fit_method": "probe-step", "kla_per_s": None,
                                  "kla_stderr_per_s": None, "c_inf": None, "c0": None,
                                  "analysed_at": now, "analysis_json": json.dumps(summary)}
        done += 1
    groups: dict[tuple[float, float], list[dict]] = {}
    for row in (r for r in rows if r["kind"] == "gassing-out"):
        stored = (row["window_low"], row["window_high"])
        key = window or (stored if None not in stored else DEFAULT_WINDOW)
        groups.setdefault(tuple(key), []).append(row)
    for key, group in groups.items():
        taus = [tau_p_s if tau_p_s is not None else
                (r["probe_tau_s"] if r["probe_tau_s"] is not None
                 else run_tau.get(r["run_id"], 0.0)) for r in group]
        base = done
        outcome = analyse_curves(
            [_samples(r) for r in group], tau_p_s=taus, window=key,
            start_s=[r["gas_on_s"] for r in group], method=method,
            c_star=[100.0 if r["do_unit"] == "%" else None for r in group],
            progress=None if progress is None else (
                lambda d, _t, base=base: progress(base + d, total)))
        for row, res in zip(group, outcome, strict=True):
            if isinstance(res, Rejected):
                results[row["id"]], changes[row["id"]] = _rejected(row, res.reason, res.code,
                                                                    now)
                continue
            summary = res.summary()
            results[row["id"]] = {**_head(row, method), **summary, "rejected": None}
            changes[row["id"]] = _columns(summary, key, method, now)
        done += len(group)
    for row in (r for r in rows if r["kind"] == "dynamic"):
        t, c = _samples(row)
        tau = tau_p_s if tau_p_s is not None else (row["probe_tau_s"] or run_tau.get(
            row["run_id"], 0.0))
        key = window or DEFAULT_WINDOW
        try:
            d = fit_dynamic(t, c, gas_on_s=row["gas_on_s"], tau_p_s=tau, window=key)
        except CurveRejected as exc:
            results[row["id"]], changes[row["id"]] = _rejected(row, exc.reason, exc.code, now)
        else:
            summary = {**d.reoxygenation.summary(), "our_per_s": d.our_per_s,
                       "our_stderr_per_s": d.our_stderr_per_s, "c_star": d.c_star,
                       "gas_off_s": d.gas_off_s, "gas_on_s": d.gas_on_s,
                       "warnings": list(d.warnings)}
            results[row["id"]] = {**_head(row, "dynamic"), **summary, "rejected": None}
            changes[row["id"]] = _columns(summary, key, "dynamic", now)
        done += 1
        if progress is not None:
            progress(done, total)
    return [results[r["id"]] for r in rows if r["id"] in results], changes


def _head(row: dict, method: str) -> dict:
    return {"curve_id": row["id"], "run_id": row["run_id"], "kind": row["kind"],
            "method": method}


def _columns(summary: dict, window, method: str, now: str) -> dict:
    return {"window_low": float(window[0]), "window_high": float(window[1]),
            "fit_method": method, "kla_per_s": _finite(summary["kla_per_s"]),
            "kla_stderr_per_s": _finite(summary["kla_stderr_per_s"]),
            "c_inf": _finite(summary["c_inf"]), "c0": _finite(summary["c0"]),
            "analysed_at": now, "analysis_json": json.dumps(summary, default=_plain)}


def _plain(value):
    if isinstance(value, np.generic):
        return value.item()
    raise TypeError(f"cannot store {type(value).__name__}")


def _rejected(row: dict, reason: str, code: str, now: str) -> tuple[dict, dict]:
    result = {**_head(row, None), "kla_per_s": None, "kla_stderr_per_s": None,
              "rejected": reason, "code": code, "warnings": []}
    columns = {"fit_method": None, "kla_per_s": None, "kla_stderr_per_s": None, "c_inf": None,
               "c0": None, "analysed_at": now,
               "analysis_json": json.dumps({"rejected": reason, "code": code})}
    return result, columns


def run_kla(curves: list[dict]) -> dict:
    """The run's kLa from its analysed curves.

    Parameters
    ----------
    curves : list of dict
        The run's live curves with ``kind``, ``kla_per_s`` [1/s] and ``kla_stderr_per_s``
        [1/s] (None when not analysed or rejected).

    Returns
    -------
    dict
        {kla_per_s [1/s], kla_stderr_per_s [1/s], kla_method}; empty when no curve of the
        run gave a kLa (the run keeps what it had). Replicates are combined by
        :func:`scaleup.measure.replicates.combine_replicates`.
    """
    usable = [c for c in curves if c["kind"] in KLA_KINDS and c["kla_per_s"] is not None]
    if not usable:
        return {}
    k, se = combine_replicates([c["kla_per_s"] for c in usable],
                               [c["kla_stderr_per_s"] if c["kla_stderr_per_s"] is not None
                                else math.nan for c in usable])
    if not (0 < k <= _MAX_RUN_KLA):
        return {}
    kinds = [c["kind"] for c in usable]
    return {"kla_per_s": k, "kla_stderr_per_s": _finite(se),
            "kla_method": max(set(kinds), key=kinds.count)}
