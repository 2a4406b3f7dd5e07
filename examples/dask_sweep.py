"""A sweep on a Dask cluster: 200,000 random designs of the label foil's two
repeated layers, split into shards that run on the cluster's workers and come
back as one pandas table, identical to the single-process sweep.

Run: python examples/dask_sweep.py [SCHEDULER_ADDRESS]
Without an address it starts a LocalCluster of two worker processes.
LAMELLA_EXAMPLE_SAMPLES sets the number of designs (the test suite uses fewer).
"""

import os
import sys
from pathlib import Path

from dask.distributed import Client, LocalCluster

import lamella

HERE = Path(__file__).resolve().parent
SAMPLES = int(os.environ.get("LAMELLA_EXAMPLE_SAMPLES", 200_000))

if __name__ == "__main__":
    scene = lamella.Scene.load(HERE.parent / "scenes" / "teal_label_foil.json")
    if len(sys.argv) > 1:
        client = Client(sys.argv[1])  # e.g. "tcp://scheduler.example:8786"
    else:
        client = Client(LocalCluster(n_workers=2, threads_per_worker=1, dashboard_address=None))
    with client:
        table = lamella.sweep(scene, samples=SAMPLES, seed=7, target_lab=(60, 20, -30), client=client)
    best = table.nsmallest(3, "delta_e00")
    print(best[["index", *[v["pointer"] for v in scene.variables], "hex", "delta_e00"]].to_string(index=False))
    # The best row, back as a scene.
    row = best.iloc[0]
    chosen = scene.with_thicknesses({v["pointer"]: row[v["pointer"]] for v in scene.variables})
    print("best design at 0°:", chosen.color().hex[0])
