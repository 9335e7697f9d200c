"""A large campaign against plain sqlite3 / pandas doing the same reads, side by side.

100,000 runs and 10,000 DO curves of 3,000 samples (the sizes of issue 10; smaller with
``--runs/--curves/--samples``): create, open and show the first page, filter, page, fit,
analyse curves, export; and the terminal workbench's first page and paging. Every step runs in
a fresh process, so its time and its peak memory (the process's maximum resident set, which
counts SQLite's cache and numpy alike) are its own; the baseline of each step runs the same way.

The baselines do the same reads without what the tool adds (validation, units, audit log,
the read-only guard): plain ``sqlite3`` for paged reads, ``pandas.read_sql`` where a simple
program would load the whole table.

Run: ``python tests/benchmarks/bench_store.py [--runs 100000] [--curves 10000]
[--samples 3000] [--keep FOLDER]``.

Measured here (2 shared cores; step seconds, peak MB), before and after units learnt per
unit string, cells read once per distinct text, batched audited inserts, the one-query
export and the column-wise fit data (before: commit e07b432, same machine and file):

=========================  ==================  ==================  ==================
step                       before              after               baseline
=========================  ==================  ==================  ==================
create runs (import file)  64.9 s, 236 MB      7.8 s, 218 MB       pandas 0.52 s
fit kLa correlation        4.2 s, 448 MB       1.6 s, 219 MB       numpy 0.34 s
export runs CSV            11.1 s, 269 MB      2.2 s, 250 MB       pandas 2.0 s
=========================  ==================  ==================  ==================
"""

from __future__ import annotations

import argparse
import json
import os
import shutil
import subprocess
import sys
import tempfile
import time
from pathlib import Path

# name, tank diameter, liquid height, lowest and highest speed [rpm] (similar P/V across sizes)
VESSELS = [("P-20", "0.29 m", "0.29 m", 300, 900), ("P-300", "0.7 m", "0.8 m", 150, 450),
           ("P-3000", "1.5 m", "1.7 m", 80, 240), ("F-20000", "2.6 m", "3.8 m", 45, 140)]
MEDIA = [("water", "coalescing"), ("salt broth", "non-coalescing"), ("glucose", "viscous")]
PAGE = 200
WHERE = "vessel = 'P-300' and speed > 300 rpm and temperature >= 30 degC"
WHERE_SQL = "vessel = ? AND speed_rps > ? AND temperature_k >= ?"
WHERE_PARAMS = ("P-300", 5.0, 303.15)


# ---- the steps (each runs in its own process) ------------------------------------------------
def _campaign(db):
    from scaleup.campaign import Campaign

    return Campaign(db)


def step_make_csv(db: str, runs: int, **_):
    """The runs file a lab would import (written once, not timed against anything)."""
    path = Path(db).with_name("runs.csv")
    with open(path, "w", encoding="utf-8") as fh:
        fh.write("vessel,medium,date,speed [rpm],gas flow [NL/min],temperature [degC],"
                 "kla [1/h],notes\n")
        for i in range(runs):
            vessel, t, _, low, high = VESSELS[i % len(VESSELS)]
            medium = MEDIA[(i // 4) % len(MEDIA)][0]
            day, minute = divmod(i // 12, 1440)
            speed = low + (high - low) * ((i * 7) % 100) / 100
            vvm = 0.3 + 1.2 * ((i * 3) % 100) / 100
            volume_l = 785 * float(t.split()[0]) ** 3  # about pi/4 T^3 in litres
            fh.write(f"{vessel},{medium},2026-{1 + day // 28 % 12:02d}-{1 + day % 28:02d}T"
                     f"{minute // 60:02d}:{minute % 60:02d}:{i % 12:02d},{speed:.1f},"
                     f"{vvm * volume_l:.4g},{25 + i % 15},{20 + (i * 11) % 300},run {i}\n")
    return {"file_mb": round(path.stat().st_size / 2**20, 1)}


def step_create_runs(db: str, **_):
    from scaleup.campaign import Campaign

    with Campaign.create(db) as c:
        for name, t, h, _, _ in VESSELS:
            c.add_vessel({"name": name, "tank diameter": t, "liquid height": h},
                         [{"impeller type": "disc-turbine", "impeller diameter":
                           f"{float(t.split()[0]) / 3:.3f} m", "clearance":
                           f"{float(t.split()[0]) / 3:.3f} m"}])
        for name, coalescence in MEDIA:
            c.add_medium({"name": name, "coalescence": coalescence})
        result = c.import_runs(Path(db).with_name("runs.csv"))
    return {"runs_added": result["added"]}


def step_create_runs_baseline(db: str, **_):
    """pandas reads the same file and writes it to a plain table: no checks, no audit."""
    import sqlite3

    import pandas as pd

    frame = pd.read_csv(Path(db).with_name("runs.csv"))
    frame["speed_rps"] = frame.pop("speed [rpm]") / 60
    frame["temperature_k"] = frame.pop("temperature [degC]") + 273.15
    conn = sqlite3.connect(Path(db).with_name("baseline.db"))
    frame.to_sql("run", conn, if_exists="replace", index=False, chunksize=10_000)
    conn.close()
    return {"rows": len(frame)}


def _curve(i: int, n: int):
    import numpy as np

    t = np.linspace(0.0, 600.0, n)
    kla = 0.005 + 0.045 * ((i * 37) % 100) / 100
    rng = np.random.default_rng(i)
    return t, 100 - 95 * np.exp(-kla * t) + rng.normal(0, 0.5, n)


def step_create_curves(db: str, curves: int, samples: int, **_):
    with _campaign(db) as c, c.transaction():
        for i in range(curves):
            t, do = _curve(i, samples)
            c.add_curve(i + 1, t, do, "%", probe_tau_s=5.0, gas_on_s=0.0)
    return {"curves": curves}


def step_create_curves_baseline(db: str, curves: int, samples: int, **_):
    import sqlite3

    conn = sqlite3.connect(Path(db).with_name("baseline.db"))
    conn.execute("CREATE TABLE IF NOT EXISTS curve (run_id INTEGER, t BLOB, c BLOB)")
    with conn:
        conn.executemany("INSERT INTO curve VALUES (?, ?, ?)",
                         ((i + 1, *(a.tobytes() for a in _curve(i, samples)))
                          for i in range(curves)))
    conn.close()
    return {"curves": curves}


def step_open_first_page(db: str, **_):
    start = time.perf_counter()
    with _campaign(db) as c:
        opened = time.perf_counter() - start
        total = c.count_runs()
        rows = c.runs(limit=PAGE)
    return {"open_s": opened, "total": total, "rows": len(rows)}


def step_open_first_page_sqlite(db: str, **_):
    import sqlite3

    conn = sqlite3.connect(db)
    total = conn.execute("SELECT count(*) FROM run_view").fetchone()[0]
    rows = conn.execute("SELECT * FROM run_view ORDER BY id LIMIT ?", (PAGE,)).fetchall()
    conn.close()
    return {"total": total, "rows": len(rows)}


def step_open_all_pandas(db: str, **_):
    """What a simple program does: load the whole runs view into a data frame."""
    import sqlite3

    import pandas as pd

    conn = sqlite3.connect(db)
    frame = pd.read_sql("SELECT * FROM run_view ORDER BY id", conn)
    conn.close()
    return {"rows": len(frame)}


def step_filter(db: str, **_):
    with _campaign(db) as c:
        total = c.count_runs(WHERE)
        rows = c.runs(WHERE, limit=PAGE)
    return {"matching": total, "rows": len(rows)}


def step_filter_sqlite(db: str, **_):
    import sqlite3

    conn = sqlite3.connect(db)
    total = conn.execute(f"SELECT count(*) FROM run_view WHERE {WHERE_SQL}",
                         WHERE_PARAMS).fetchone()[0]
    rows = conn.execute(f"SELECT * FROM run_view WHERE {WHERE_SQL} ORDER BY id LIMIT ?",
                        (*WHERE_PARAMS, PAGE)).fetchall()
    conn.close()
    return {"matching": total, "rows": len(rows)}


def step_filter_pandas(db: str, **_):
    import sqlite3

    import pandas as pd

    conn = sqlite3.connect(db)
    frame = pd.read_sql("SELECT * FROM run_view", conn)
    conn.close()
    hit = frame[(frame.vessel == "P-300") & (frame.speed_rps > 5.0)
                & (frame.temperature_k >= 303.15)]
    return {"matching": len(hit)}


def step_page(db: str, runs: int, **_):
    times = {}
    with _campaign(db) as c:
        for offset in (0, runs // 2, max(0, runs - PAGE)):
            start = time.perf_counter()
            c.runs(limit=PAGE, offset=offset)
            times[f"offset_{offset}_s"] = time.perf_counter() - start
        start = time.perf_counter()
        c.runs(order_by="kla", descending=True, limit=PAGE)
        times["sorted_by_kla_s"] = time.perf_counter() - start
    return times


def step_page_sqlite(db: str, runs: int, **_):
    import sqlite3

    times = {}
    conn = sqlite3.connect(db)
    for offset in (0, runs // 2, max(0, runs - PAGE)):
        start = time.perf_counter()
        conn.execute("SELECT * FROM run_view ORDER BY id LIMIT ? OFFSET ?",
                     (PAGE, offset)).fetchall()
        times[f"offset_{offset}_s"] = time.perf_counter() - start
    start = time.perf_counter()
    conn.execute("SELECT * FROM run_view ORDER BY kla_per_s DESC, id LIMIT ?",
                 (PAGE,)).fetchall()
    times["sorted_by_kla_s"] = time.perf_counter() - start
    conn.close()
    return times


def step_tui(db: str, **_):
    """The workbench on the big campaign: first page, then End, PageDown, Home."""
    import asyncio

    from scaleup.tui.app import Settings, make_app
    from scaleup.tui.widgets.run_table import RunTable

    async def main():
        out = {}
        with _campaign(db) as c:
            settings = Settings()
            app = make_app(c, settings)
            start = time.perf_counter()
            async with app.run_test(size=(160, 48)) as pilot:
                table = None
                while table is None or not table.page_rows:
                    await pilot.pause(0.005)
                    found = app.screen.query(RunTable)
                    table = found.first() if found else None
                out["first_page_s"] = time.perf_counter() - start
                held = [len(table.page_rows)]
                for key in ("end", "pagedown", "home", "pagedown", "pagedown"):
                    before, offset = time.perf_counter(), table.page_offset
                    await pilot.press(key)
                    await pilot.pause()
                    await app.workers.wait_for_complete()
                    await pilot.pause()
                    out[f"{key}_s"] = max(out.get(f"{key}_s", 0.0), time.perf_counter() - before)
                    held.append(len(table.page_rows))
                    out.setdefault("offsets", []).append((offset, table.page_offset))
                out["rows_held_max"] = max(held)
                out["page_size"] = settings.page_size
                out["total"] = table.total
        return out

    return asyncio.run(main())


def step_fit(db: str, **_):
    with _campaign(db) as c:
        report = c.fit_kla(power_basis="gassed")
    return {"n": len(report.data.response)}


def step_fit_baseline(db: str, **_):
    """pandas reads the same runs, numpy fits log kLa on log speed and log gas flow."""
    import sqlite3

    import numpy as np
    import pandas as pd

    conn = sqlite3.connect(db)
    frame = pd.read_sql("SELECT speed_rps, gas_flow_mol_s, kla_per_s FROM run_view WHERE "
                        "kla_per_s IS NOT NULL", conn)
    conn.close()
    x = np.column_stack([np.ones(len(frame)), np.log(frame.speed_rps),
                         np.log(frame.gas_flow_mol_s)])
    np.linalg.lstsq(x, np.log(frame.kla_per_s), rcond=None)
    return {"n": len(frame)}


def step_analyse(db: str, **_):
    with _campaign(db) as c:
        results = c.analyse_curves()
    return {"analysed": len(results)}


def step_analyse_read_floor(db: str, **_):
    """The floor under curve analysis: read every curve's samples with sqlite3 and numpy."""
    import sqlite3

    import numpy as np

    conn = sqlite3.connect(db)
    n = 0
    for t, c in conn.execute("SELECT time_s, do_values FROM curve"):
        np.frombuffer(t), np.frombuffer(c)
        n += 1
    conn.close()
    return {"read": n}


def step_export(db: str, **_):
    with _campaign(db) as c:
        n = c.export_runs(Path(db).with_name("export.csv"))
    return {"rows": n}


def step_export_pandas(db: str, **_):
    import sqlite3

    import pandas as pd

    conn = sqlite3.connect(db)
    frame = pd.read_sql("SELECT * FROM run_view", conn)
    conn.close()
    frame.to_csv(Path(db).with_name("export-pandas.csv"), index=False)
    return {"rows": len(frame)}


STEPS = {name[5:]: fn for name, fn in globals().items() if name.startswith("step_")}


# ---- the driver ----------------------------------------------------------------------------------
def run_step(name: str, db: Path, options: dict) -> dict:
    """Run one step in a fresh process; its wall time, peak resident memory and details."""
    args = [sys.executable, __file__, "--step", name, "--db", str(db),
            "--options", json.dumps(options)]
    start = time.perf_counter()
    proc = subprocess.Popen(args, stdout=subprocess.PIPE, text=True)
    _, status, usage = os.wait4(proc.pid, 0)
    elapsed = time.perf_counter() - start
    out = proc.stdout.read()
    proc.stdout.close()
    if os.waitstatus_to_exitcode(status) != 0:
        raise SystemExit(f"step {name} failed")
    inner = json.loads(out.strip().splitlines()[-1])
    return {"process_s": elapsed, "peak_mb": usage.ru_maxrss / 1024, **inner}


def main() -> None:
    parser = argparse.ArgumentParser()
    parser.add_argument("--runs", type=int, default=100_000)
    parser.add_argument("--curves", type=int, default=10_000)
    parser.add_argument("--samples", type=int, default=3_000)
    parser.add_argument("--keep", type=Path, default=None)
    parser.add_argument("--step")
    parser.add_argument("--db")
    parser.add_argument("--options", default="{}")
    args = parser.parse_args()
    if args.step:  # a child: do one step, print one JSON line
        start = time.perf_counter()
        detail = STEPS[args.step](args.db, **json.loads(args.options))
        print(json.dumps({"step_s": time.perf_counter() - start, **detail}))
        return

    folder = args.keep or Path(tempfile.mkdtemp(prefix="bench_store_"))
    folder.mkdir(parents=True, exist_ok=True)
    db = folder / "big.db"
    for p in folder.glob("big.db*"):
        p.unlink()
    options = {"runs": args.runs, "curves": min(args.curves, args.runs),
               "samples": args.samples}
    print(f"campaign of {args.runs:,} runs and {options['curves']:,} curves of "
          f"{args.samples:,} samples in {folder}")
    pairs = [
        ("create runs (import file)", "create_runs", ["create_runs_baseline"]),
        ("create curves", "create_curves", ["create_curves_baseline"]),
        ("open + first page", "open_first_page", ["open_first_page_sqlite",
                                                  "open_all_pandas"]),
        ("filter", "filter", ["filter_sqlite", "filter_pandas"]),
        ("page (3 offsets + sort)", "page", ["page_sqlite"]),
        ("workbench first page", "tui", []),
        ("fit kLa correlation", "fit", ["fit_baseline"]),
        ("analyse all curves", "analyse", ["analyse_read_floor"]),
        ("export runs CSV", "export", ["export_pandas"]),
    ]
    run_step("make_csv", db, options)
    results = {}
    print(f"\n{'step':28s} {'what':24s} {'step s':>8s} {'process s':>9s} {'peak MB':>8s}"
          f"  detail")
    for label, mine, baselines in pairs:
        for name in [mine, *baselines]:
            r = results[name] = run_step(name, db, options)
            detail = {k: (round(v, 4) if isinstance(v, float) else v) for k, v in r.items()
                      if k not in ("process_s", "peak_mb", "step_s")}
            who = "scaleup" if name == mine else name
            print(f"{label if name == mine else '':28s} {who:24s} {r['step_s']:8.3f} "
                  f"{r['process_s']:9.2f} {r['peak_mb']:8.0f}  {detail}", flush=True)
        for name in baselines:
            a, b = results[mine], results[name]
            print(f"{'':28s} {'ratio to ' + name:24s} {a['step_s'] / b['step_s']:8.2f}x "
                  f"{'':9s} {a['peak_mb'] / b['peak_mb']:7.2f}x")
    size = db.stat().st_size / 2**20
    print(f"\ncampaign file {size:,.0f} MB")
    if args.keep is None:
        shutil.rmtree(folder)


if __name__ == "__main__":
    main()
