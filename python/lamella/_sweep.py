"""Sweeps of a design space, in this process or split into shards on a Dask cluster."""

from __future__ import annotations

import numpy as np

from . import _lamella


def _table(columns, as_frame):
    """The columns of ``_lamella._sweep`` as a DataFrame or a dict of arrays."""
    if not as_frame:
        return columns
    import pandas as pd

    data = {"index": columns["index"]}
    for j, pointer in enumerate(columns["pointers"]):
        data[pointer] = columns["thicknesses_nm"][:, j]
    for key in ("L", "a", "b"):
        data[key] = columns[key]
    for j, key in enumerate(("srgb_r", "srgb_g", "srgb_b")):
        data[key] = columns["srgb"][:, j]
    data["hex"] = columns["hex"]
    if "delta_e00" in columns:
        data["delta_e00"] = columns["delta_e00"]
    frame = pd.DataFrame(data)
    frame.attrs["materials"] = dict(zip(columns["pointers"], columns["materials"]))
    return frame


def _shard(scene, index, count, options):
    """One shard's columns (runs on a Dask worker)."""
    return _lamella._sweep(scene, shard=(index, count), **options)


def _shard_frame(scene, index, count, options):
    return _table(_shard(scene, index, count, options), True)


def _concat(parts):
    """Shards' column dicts, in order, as one."""
    first = parts[0]
    out = {}
    for key, value in first.items():
        if key in ("pointers", "materials", "total"):
            out[key] = value
        elif isinstance(value, list):
            out[key] = [x for p in parts for x in p[key]]
        else:
            out[key] = np.concatenate([p[key] for p in parts])
    return out


def sweep(
    scene,
    samples=None,
    grid=None,
    seed=1,
    target_lab=None,
    target_hex=None,
    angle=0.0,
    shard=None,
    illuminant=None,
    observer=None,
    side="reflect",
    polarization="unpolarized",
    gamut="clip",
    analyzer=None,
    client=None,
    shards=None,
    lazy=False,
    as_frame=True,
):
    """Evaluate many designs over the scene's ``vary_nm`` ranges, as ``lamella sweep``.

    Designs are ``samples`` uniform random ones from a seeded stream (``seed``), or a
    full ``grid`` of that many points per variable (bounds included, the last
    variable fastest). Design *i* is the same in every run, so a sweep can be split.

    Parameters
    ----------
    scene : Scene
    samples, grid : int
        Give exactly one.
    seed : int
        Seed of the random designs.
    target_lab : (L*, a*, b*), optional; target_hex : "#RRGGBB", optional
        Adds the CIEDE2000 ``delta_e00`` to the target.
    angle : float
        Angle of incidence in degrees.
    shard : (I, N), optional
        Evaluate only share I of N (1 ≤ I ≤ N), as ``--shard I/N``.
    illuminant, observer, side, polarization, gamut, analyzer
        As for ``Scene.color`` (``analyzer="left"``: through a circular analyser).
    client : dask.distributed.Client, optional
        Split the sweep into ``shards`` (default: two per worker thread) and run
        them on the cluster's workers; the result is identical number for number
        to the single-process sweep.
    lazy : bool
        With a client: return a dask DataFrame whose partitions are the shards
        (for sweeps too big for memory) instead of computing it.
    as_frame : bool
        Return a pandas DataFrame (default) or a dict of numpy arrays.

    Returns
    -------
    pandas.DataFrame (or dict of arrays, or dask DataFrame)
        One row per design: ``index``; one column per variable named by its layer
        pointer (thickness in nm; ``Scene.with_thicknesses`` takes a row's values);
        ``L, a, b`` (CIELAB), ``srgb_r, srgb_g, srgb_b`` (encoded sRGB 0–1), ``hex``,
        and ``delta_e00`` with a target. The dict form has ``thicknesses_nm``
        (N, V), ``srgb`` (N, 3), ``pointers`` and ``materials``.
    """
    options = dict(
        samples=samples,
        grid=grid,
        seed=seed,
        target_lab=None if target_lab is None else tuple(float(x) for x in target_lab),
        target_hex=target_hex,
        angle=angle,
        illuminant=illuminant,
        observer=observer,
        side=side,
        polarization=polarization,
        gamut=gamut,
        analyzer=analyzer,
    )
    if client is None:
        if lazy:
            raise _lamella.SceneError("lazy: needs a Dask client")
        return _table(_lamella._sweep(scene, shard=shard, **options), as_frame)
    if shard is not None:
        raise _lamella.SceneError("shard: give shard or client, not both")
    # Refuse bad options here, before any task is sent.
    total = _lamella._sweep_size(scene, samples=samples, grid=grid)
    _lamella._sweep(scene, shard=(1, max(total, 1)), **options)
    if shards is None:
        threads = sum(client.nthreads().values()) or 1
        shards = 2 * threads
    shards = int(shards)
    if shards < 1:
        raise _lamella.SceneError(f"shards = {shards}: must be at least 1")
    shards = min(shards, max(total, 1))
    if lazy:
        import dask
        import dask.dataframe as dd

        meta = _shard_frame(scene, 1, max(total, 1), options).iloc[:0]
        parts = [
            dask.delayed(_shard_frame)(scene, i, shards, options) for i in range(1, shards + 1)
        ]
        return dd.from_delayed(parts, meta=meta, verify_meta=False)
    remote = client.scatter(scene, broadcast=True)
    futures = [
        client.submit(_shard, remote, i, shards, options, pure=False) for i in range(1, shards + 1)
    ]
    parts = client.gather(futures)
    return _table(_concat(parts), as_frame)
