#!/usr/bin/python3
"""Reference table for the heliocentric -> Galactocentric transformation, made with astropy's
Galactocentric frame (Debian python3-astropy), offline, configured to the Hipparcos definition of
the Galactic frame that undertow uses: the x axis toward the ICRS direction of (l, b) = (0, 0) and
the roll chosen so that the Hipparcos north Galactic pole lies in the x-z plane (both from pyerfa's
g2icrs, the same matrix as ERFA's eraIcrs2g). astropy's own Galactic frame (through FK5) differs
from the Hipparcos matrix by about 20 mas, and its default Galactocentric orientation by about
1e-3 km/s at these speeds; configured like this the two agree to rounding.

Usage: make_astropy_reference.py OUT.csv
"""
import sys
import warnings

from astropy.utils import iers
from astropy.utils.data import conf as data_conf

iers.conf.auto_download = False
data_conf.allow_internet = False

import astropy.coordinates as coord  # noqa: E402
import astropy.units as u  # noqa: E402
import erfa  # noqa: E402
import numpy as np  # noqa: E402

warnings.simplefilter("error")  # any astropy warning (e.g. a download attempt) fails the script


def hipparcos_galactocentric(r0, zsun, vsun):
    ra_gc, dec_gc = erfa.g2icrs(0.0, 0.0)
    ra_p, dec_p = erfa.g2icrs(0.0, np.pi / 2)
    gc = coord.SkyCoord(ra=ra_gc * u.rad, dec=dec_gc * u.rad, frame="icrs")
    pole = coord.SkyCoord(ra=ra_p * u.rad, dec=dec_p * u.rad, distance=1 * u.kpc, frame="icrs")
    roll = 0.0
    for _ in range(4):  # find the roll that puts the pole in the x-z plane
        f = coord.Galactocentric(galcen_coord=gc, galcen_distance=r0 * u.kpc, z_sun=0 * u.pc,
                                 roll=roll * u.rad,
                                 galcen_v_sun=coord.CartesianDifferential(vsun * u.km / u.s))
        p = pole.transform_to(f)
        roll += np.arctan2(p.y.to_value(u.kpc), p.z.to_value(u.kpc))
    return coord.Galactocentric(galcen_coord=gc, galcen_distance=r0 * u.kpc, z_sun=zsun * u.kpc,
                                roll=roll * u.rad,
                                galcen_v_sun=coord.CartesianDifferential(vsun * u.km / u.s))


def main(out):
    rng = np.random.default_rng(20261201)
    frames = [(8.0, 0.0, [11.1, 232.24, 7.25]), (8.15, 0.0208, [10.0, 250.0, 8.0]),
              (8.5, -0.01, [12.0, 230.0, 6.0])]
    rows = []
    for r0, zsun, vsun in frames:
        f = hipparcos_galactocentric(r0, zsun, vsun)
        n = 40
        ra = rng.uniform(0, 360, n)
        dec = np.degrees(np.arcsin(rng.uniform(-0.99, 0.99, n)))
        d = rng.uniform(0.1, 15, n)
        pmra, pmdec = rng.uniform(-8, 8, n), rng.uniform(-8, 8, n)
        rv = rng.uniform(-80, 80, n)
        c = coord.SkyCoord(ra=ra * u.deg, dec=dec * u.deg, distance=d * u.kpc,
                           pm_ra_cosdec=pmra * u.mas / u.yr, pm_dec=pmdec * u.mas / u.yr,
                           radial_velocity=rv * u.km / u.s, frame="icrs")
        g = c.transform_to(f)
        for i in range(n):
            rows.append([r0, zsun, *vsun, ra[i], dec[i], d[i], pmra[i], pmdec[i], rv[i],
                         g.x[i].to_value(u.kpc), g.y[i].to_value(u.kpc), g.z[i].to_value(u.kpc),
                         g.v_x[i].to_value(u.km / u.s), g.v_y[i].to_value(u.km / u.s),
                         g.v_z[i].to_value(u.km / u.s)])
    with open(out, "w") as fh:
        fh.write("# made by tests/sky/make_astropy_reference.py with astropy "
                 f"{coord.__name__ and __import__('astropy').__version__}\n")
        fh.write("r0_kpc,z_sun_kpc,vx_sun_kms,vy_sun_kms,vz_sun_kms,ra_deg,dec_deg,distance_kpc,"
                 "pmra_masyr,pmdec_masyr,vhelio_kms,x_kpc,y_kpc,z_kpc,vx_kms,vy_kms,vz_kms\n")
        for r in rows:
            fh.write(",".join(f"{v:.17g}" for v in r) + "\n")


if __name__ == "__main__":
    main(sys.argv[1])
