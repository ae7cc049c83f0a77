#!/usr/bin/python3
"""Opens an undertow snapshot file with h5py alone, as a user would (docs/snapshot-format.md),
and checks its shapes, units and provenance. Usage: check_snapshot.py FILE N_TRACERS N_SNAPSHOTS"""
import sys

import h5py
import numpy as np

path, n, nsnap = sys.argv[1], int(sys.argv[2]), int(sys.argv[3])
with h5py.File(path, "r") as f:
    assert f.attrs["undertow_format"] == "snapshots", f.attrs["undertow_format"]
    assert f.attrs["complete"] == 1
    for key in ("tool_version", "git_revision", "created_utc", "scenario", "seed"):
        assert key in f.attrs, key
    assert "[integration]" in f.attrs["scenario"]
    names = sorted(f["snapshots"])
    assert len(names) == nsnap, names
    times = [f["snapshots"][k].attrs["time_myr"] for k in names]
    assert all(b > a for a, b in zip(times, times[1:])), times
    for k in names:
        g = f["snapshots"][k]
        assert g["position"].shape == (n, 3) and g["velocity"].shape == (n, 3)
        assert g["id"].shape == (n,) and g["flags"].shape == (n,)
        assert g["position"].attrs["units"] == "kpc"
        assert g["velocity"].attrs["units"] == "km/s"
        assert g["birth_time"].attrs["units"] == "Myr"
        assert g["position"].compression == "gzip"
        assert np.array_equal(g["id"][:], f["snapshots"][names[0]]["id"][:])
    r = np.hypot(*f["snapshots"][names[-1]]["position"][:, :2].T)
    assert 0.5 < np.median(r) < 30, np.median(r)
    comps = [f["model"][c].attrs["kind"] for c in f["model"] if c.startswith("component")]
    assert "miyamoto-nagai" in comps, comps
print(f"h5py: {path}: {nsnap} snapshots of {n} tracers, units and provenance present")
