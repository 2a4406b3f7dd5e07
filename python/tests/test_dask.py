"""The sweep on a Dask LocalCluster of two worker processes is the single-process
sweep and the command line's --shard outputs concatenated, number for number."""

import json

import numpy as np
import pandas as pd
import pytest

import lamella
from conftest import SCENES

distributed = pytest.importorskip("dask.distributed")

PATH = SCENES / "teal_label_foil.json"
OPTIONS = dict(samples=2000, seed=7, target_lab=(60, 20, -30))


@pytest.fixture(scope="module")
def client():
    cluster = distributed.LocalCluster(n_workers=2, threads_per_worker=1, processes=True,
                                       dashboard_address=None)
    with distributed.Client(cluster) as c:
        yield c
    cluster.close()


def test_dask_sweep_is_the_local_sweep_and_the_cli_shards(client, cli):
    scene = lamella.Scene.load(PATH)
    local = lamella.sweep(scene, **OPTIONS)
    remote = lamella.sweep(scene, **OPTIONS, client=client, shards=5)
    pd.testing.assert_frame_equal(remote, local, check_exact=True)
    assert len(client.nthreads()) == 2
    # The CLI's --shard I/5 outputs concatenated in order.
    lines = []
    for i in range(1, 6):
        run = cli("sweep", PATH, "--samples", "2000", "--seed", "7", "--target-lab", "60,20,-30",
                  "--shard", f"{i}/5")
        assert run.code == 0, run.stderr
        lines += [json.loads(l) for l in run.stdout.splitlines()]
    assert remote["index"].tolist() == [l["index"] for l in lines]
    pointers = [v["pointer"] for v in scene.variables]
    assert remote[pointers].to_numpy().tolist() == [l["thicknesses_nm"] for l in lines]
    for k in ("L", "a", "b", "delta_e00"):
        assert remote[k].tolist() == [l[k] for l in lines]
    assert remote["hex"].tolist() == [l["hex"] for l in lines]
    assert remote[["srgb_r", "srgb_g", "srgb_b"]].to_numpy().tolist() == [l["srgb"] for l in lines]


def test_lazy_dask_dataframe_computes_to_the_same_table(client):
    scene = lamella.Scene.load(PATH)
    lazy = lamella.sweep(scene, **OPTIONS, client=client, shards=4, lazy=True)
    assert lazy.npartitions == 4
    got = lazy.compute().reset_index(drop=True)
    pd.testing.assert_frame_equal(got, lamella.sweep(scene, **OPTIONS), check_exact=True)


def test_dict_form_and_bad_shards(client):
    scene = lamella.Scene.load(PATH)
    cols = lamella.sweep(scene, samples=300, client=client, as_frame=False)
    assert cols["thicknesses_nm"].shape == (300, 2)
    assert np.array_equal(cols["index"], np.arange(300))
    with pytest.raises(lamella.SceneError, match="shards"):
        lamella.sweep(scene, samples=300, client=client, shards=0)
    with pytest.raises(lamella.SceneError, match="samples"):
        lamella.sweep(scene, samples=0, client=client)
