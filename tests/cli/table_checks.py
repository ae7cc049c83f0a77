#!/usr/bin/python3
"""The machine-readable tables of an output folder, as astropy reads them.

For every <stem>.ecsv under the folders given: astropy's Table.read opens it and <stem>.fits with
no options and no warning; every column with a unit in one has the same, parsed unit in the
other; the ECSV, FITS and CSV values are the same doubles, bit for bit (NaN where NaN). With
--h5 FILE:GROUP=STEM, the HDF5 group's column datasets equal the FITS table's, bit for bit.

Usage: table_checks.py FOLDER... [--h5 FILE:GROUP=STEM]...
"""
import csv
import pathlib
import sys
import warnings

import numpy as np
from astropy import units as u
from astropy.table import Table


def fail(msg):
    print(f"FAILED: {msg}", file=sys.stderr)
    sys.exit(1)


def bits(a):
    a = np.asarray(a, dtype=np.float64)
    b = a.view(np.uint64).copy()
    b[np.isnan(a)] = 0x7FF8000000000000  # any NaN is a NaN
    return b


def csv_columns(path):
    with open(path, newline="", encoding="utf-8") as f:
        rows = [r for r in csv.reader(line for line in f if not line.startswith("#"))]
    header, body = rows[0], rows[1:]
    return {name: [r[i] for r in body] for i, name in enumerate(header)}


def check_stem(stem):
    ecsv, fits, plain = (stem.with_suffix(s) for s in (".ecsv", ".fits", ".csv"))
    for p in (fits, plain):
        if not p.exists():
            fail(f"{p} missing beside {ecsv}")
    with warnings.catch_warnings():
        warnings.simplefilter("error")  # a unit astropy cannot parse warns: that fails here
        te = Table.read(ecsv)
        tf = Table.read(fits)
    if te.colnames != tf.colnames:
        fail(f"{stem}: ECSV columns {te.colnames} but FITS {tf.colnames}")
    cc = csv_columns(plain)
    if list(cc) != te.colnames:
        fail(f"{stem}: CSV columns {list(cc)} but ECSV {te.colnames}")
    for name in te.colnames:
        ce, cf = te[name], tf[name]
        if ce.dtype.kind in "US":
            # astropy masks an empty text field (its default fill values); the CSV has ''
            text = ce.filled("") if hasattr(ce, "filled") else ce
            if [str(x) for x in text] != [str(x) for x in cc[name]]:
                fail(f"{stem}: labels in '{name}' differ between ECSV and CSV")
            continue
        if ce.unit is not None or cf.unit is not None:
            if isinstance(ce.unit, u.UnrecognizedUnit) or ce.unit != cf.unit:
                fail(f"{stem}: '{name}' unit {ce.unit} (ECSV) against {cf.unit} (FITS)")
        if not np.array_equal(bits(ce), bits(cf)):
            fail(f"{stem}: '{name}' values differ between ECSV and FITS")
        from_csv = [float(x) for x in cc[name]]
        if not np.array_equal(bits(from_csv), bits(ce)):
            fail(f"{stem}: '{name}' values differ between CSV and ECSV")
    return tf


def main(argv):
    folders, h5 = [], []
    it = iter(argv)
    for a in it:
        if a == "--h5":
            h5.append(next(it))
        else:
            folders.append(pathlib.Path(a))
    tables = {}
    for folder in folders:
        for ecsv in sorted(folder.rglob("*.ecsv")):
            stem = ecsv.with_suffix("")
            tables[str(stem)] = check_stem(stem)
    if not tables:
        fail(f"no ECSV tables under {' '.join(map(str, folders))}")
    if h5:
        import h5py

        for spec in h5:
            where, stem = spec.split("=")
            file, group = where.rsplit(":", 1)
            tf = tables.get(stem) or fail(f"no table {stem}.ecsv checked")
            with h5py.File(file, "r") as f:
                g = f[group]
                for name in tf.colnames:
                    if tf[name].dtype.kind in "US":
                        continue
                    if name not in g:
                        fail(f"{file}:{group} has no dataset {name}")
                    if not np.array_equal(bits(g[name][()]), bits(tf[name])):
                        fail(f"{file}:{group}/{name} differs from {stem}.fits")
    print(f"{len(tables)} tables: ECSV, FITS and CSV read by astropy alike, every digit kept"
          + (f"; {len(h5)} HDF5 groups equal bit for bit" if h5 else ""))


if __name__ == "__main__":
    main(sys.argv[1:])
