#!/usr/bin/env bash
# Catalogs from elsewhere, as a user brings them: the demo's catalog converted by astropy to
# ECSV and FITS (units attached) and to other column names, each gives byte-identical residual
# tables; the tables undertow writes read back in astropy; and a FITS file without a table, a
# column map naming a missing column and an ECSV column in the wrong unit each stop with one
# line naming the file and column, exit 2, and no output.
# Usage: catalog_format_checks.sh UNDERTOW SOURCE_DIR WORK_DIR
set -euo pipefail
undertow=$(realpath "$1") src=$(realpath "$2") work=$3
rm -rf "$work"; mkdir -p "$work"; cd "$work"
fail() { echo "FAILED: $*" >&2; exit 1; }
py=/usr/bin/python3

mkdir -p csv ecsv fits renamed
cp "$src/demo/kestrel-measured.csv" csv/kestrel
"$py" - "$src/demo/kestrel-measured.csv" <<'PY'
import sys
from astropy.table import Table
t = Table.read(sys.argv[1], format="ascii.csv", comment="#")
units = {"ra_deg": "deg", "dec_deg": "deg", "parallax_mas": "mas", "parallax_err_mas": "mas",
         "pmra_masyr": "mas / yr", "pmra_err_masyr": "mas / yr", "pmdec_masyr": "mas / yr",
         "pmdec_err_masyr": "mas / yr", "vlsr_kms": "km / s", "vlsr_err_kms": "km / s"}
for c, u in units.items():
    t[c].unit = u
t["group"] = [""] * len(t)  # the demo's catalog has no groups: read back as empty labels
t.write("ecsv/kestrel", format="ascii.ecsv")
t.write("fits/kestrel", format="fits")
# an archive's spellings, and one column only a map can find
r = t.copy()
r.rename_columns(["name", "ra_deg", "parallax_mas", "parallax_err_mas", "pmra_masyr",
                  "pmra_err_masyr", "corr_pmra_pmdec"],
                 ["maser", "ra", "parallax", "parallax_error", "pmra", "pmra_error",
                  "pmra_pmdec_corr"])
r.write("renamed/kestrel", format="fits")
PY

common=(--model "$src/potentials/kestrel.toml" --r0 8.1 --draws 200 --bootstrap 200)
for d in csv ecsv fits; do
  (cd $d && "$undertow" residuals kestrel "${common[@]}" -o res > log 2>&1) || { cat $d/log; fail "residuals on the $d catalog"; }
done
(cd renamed && "$undertow" residuals kestrel "${common[@]}" -o res --columns name=maser > log 2>&1) ||
  { cat renamed/log; fail "residuals on the renamed catalog"; }
for d in ecsv fits renamed; do
  for f in res/residuals-sources.{csv,ecsv,md,tex,fits} res/residuals-summary.{csv,ecsv,md,fits}; do
    cmp -s csv/$f $d/$f || fail "$d/$f differs from the CSV catalog's"
  done
done
echo "the same catalog as CSV, ECSV, FITS and under other names: byte-identical residual tables"

"$py" "$src/tests/cli/table_checks.py" fits --h5 fits/res/residuals.h5:sources=fits/res/residuals-sources \
  --h5 fits/res/residuals.h5:summary=fits/res/residuals-summary || fail "tables read back by astropy"

# Bad input: one line naming the file and column, exit 2, nothing written.
mkdir bad && cd bad
"$py" -c "
from astropy.io import fits
fits.PrimaryHDU().writeto('image.fits')
from astropy.table import Table
t = Table.read('../ecsv/kestrel', format='ascii.ecsv')
t['parallax_mas'].unit = 'arcsec'
t.write('arcsec.ecsv', format='ascii.ecsv')
"
expect_error() { # name, pattern, command...
  local name=$1 pattern=$2; shift 2
  set +e; "$@" > out.txt 2> err.txt; local rc=$?; set -e
  [ $rc -eq 2 ] || { cat err.txt; fail "$name: exit $rc, expected 2"; }
  [ "$(wc -l < err.txt)" -eq 1 ] || { cat err.txt; fail "$name: more than one line"; }
  grep -q -- "$pattern" err.txt || { cat err.txt; fail "$name: message lacks '$pattern'"; }
  [ ! -e bad ] || fail "$name: output written"
}
expect_error "FITS without a table" "image.fits.*without a binary table" \
  "$undertow" residuals image.fits "${common[@]}" -o bad
expect_error "column map naming a missing column" "kestrel:[0-9]*: PLX: the column map" \
  "$undertow" residuals ../csv/kestrel "${common[@]}" -o bad --columns parallax_mas=PLX
expect_error "ECSV column in arcsec" "arcsec.ecsv:[0-9]*: parallax_mas: unit 'arcsec'" \
  "$undertow" residuals arcsec.ecsv "${common[@]}" -o bad
# a NUL inside a cell (read as the digits before it by a C parser), a folder for a catalog
"$py" -c "
t = open('../csv/kestrel', 'rb').read().split(b'\\n')
i = next(k for k, l in enumerate(t) if l and not l.startswith(b'#')) + 2  # the second data row
t[i] = t[i].replace(b',', b'\\x00junk,', 3)
open('nul.csv', 'wb').write(b'\\n'.join(t))
"
expect_error "NUL inside a cell" "nul.csv:[0-9]*:[0-9]*: control character 0x00 (NUL)" \
  "$undertow" residuals nul.csv "${common[@]}" -o bad
mkdir folder.csv
expect_error "a folder for a catalog" "folder.csv: is a folder, not a file" \
  "$undertow" residuals folder.csv "${common[@]}" -o bad
echo "bad catalogs: one line each naming the file and column, exit 2, nothing written"

# A UTF-8 byte-order mark, as spreadsheet programs write: read as if absent, the same tables
mkdir bom && printf '\xef\xbb\xbf' > bom/kestrel && cat ../csv/kestrel >> bom/kestrel
(cd bom && "$undertow" residuals kestrel "${common[@]}" -o res > log 2>&1) ||
  { cat bom/log; fail "a catalog with a byte-order mark"; }
for f in res/residuals-sources.{csv,ecsv,md,tex,fits} res/residuals-summary.{csv,ecsv,md,fits}; do
  cmp -s ../csv/$f bom/$f || fail "bom/$f differs from the CSV catalog's"
done
echo "a catalog with a UTF-8 byte-order mark gives the same residuals"
