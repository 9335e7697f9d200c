"""Load the invented demo campaign (``demo_runs/``, shipped as ``scaleup.demo_runs``)."""

from __future__ import annotations

import csv
import io
import json
from importlib import resources

from scaleup.errors import InputError


def _text(name: str) -> str:
    return (resources.files("scaleup.demo_runs") / name).read_text("utf-8")


def load_demo(campaign) -> dict:
    """Add the demo vessels, media, runs, curves and flux tests in one transaction, then
    analyse the curves so that every run carries a kLa."""
    import numpy as np

    if campaign.summary()["runs"]:
        raise InputError(f"{campaign.path} already holds runs; build the demo in a new file "
                         "(scaleup demo --db demo.db)", "demo")
    vessels = json.loads(_text("vessels.json"))
    media = json.loads(_text("media.json"))
    with campaign.transaction():
        for v in vessels:
            values = {k: v[k] for k in v if k not in ("impellers", "sparger", "probe_tau_s")}
            campaign.add_vessel(values, v["impellers"], v["sparger"])
        for m in media:
            campaign.add_medium({k: m[k] for k in m if k != "salts"},
                                {salt: f"{c} mol/m3" for salt, c in m["salts"].items()})
        by_ref = {}
        reader = csv.DictReader(io.StringIO(_text("runs.csv")))
        for row in reader:
            values = {"ref": row["ref"], "vessel": row["vessel"], "medium": row["medium"],
                      "date": row["date"], "speed": f"{row['speed [rpm]']} rpm",
                      "gas flow": f"{row['gas flow [NL/min]']} NL/min",
                      "o2 fraction": row["o2 fraction"],
                      "temperature": f"{row['temperature [degC]']} degC",
                      "notes": row["notes"]}
            if row["kla [1/h]"]:
                values["kla"] = f"{row['kla [1/h]']} 1/h"
                values["kla stderr"] = f"{row['kla stderr [1/h]']} 1/h"
                values["kla method"] = row["kla method"]
            by_ref[row["ref"]] = campaign.add_run(values)
        samples: dict[str, list] = {}
        taus = {}
        for row in csv.DictReader(io.StringIO(_text("curves.csv"))):
            samples.setdefault(row["run"], []).append((float(row["t [s]"]), float(row["DO [%]"])))
            taus[row["run"]] = float(row["probe tau [s]"])
        for ref, points in samples.items():
            data = np.array(points)
            campaign.add_curve(by_ref[ref], data[:, 0], data[:, 1], "%", probe_tau_s=taus[ref],
                               notes="demo gassing-out curve")
        n_flux = 0
        for row in csv.DictReader(io.StringIO(_text("fluxes.csv"))):
            campaign.add_flux({k.split(" [")[0]: (f"{v} {k.split('[')[1][:-1]}"
                                                  if "[" in k and v else v)
                               for k, v in row.items()})
            n_flux += 1
    # the lab analysed its curves: every run with a curve gets its kLa from it
    analysed = campaign.analyse_curves()
    return {"vessels": len(vessels), "media": len(media), "runs": len(by_ref),
            "curves": len(samples), "fluxes": n_flux,
            "curves_analysed": sum(1 for a in analysed if a.get("kla_per_s") is not None)}
