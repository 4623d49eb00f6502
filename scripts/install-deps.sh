#!/bin/sh
# Installs what slowscan needs to build, test and draw, if it is missing; arguments name
# further Debian packages (make memcheck passes valgrind,
# make fuzz clang and libclang-rt-NN-dev).
# On Debian (or a derivative) as root it runs apt-get; elsewhere it prints the list.
set -e
PKGS="gcc make pkg-config libopenmpi-dev openmpi-bin libfftw3-dev libgsl-dev libcsv-dev libnetcdf-dev libudunits2-dev libplplot-dev
plplot-driver-cairo python3-numpy python3-scipy python3-pandas python3-statsmodels python3-cftime python3-netcdf4 netcdf-bin
python3-cffi python3-xarray python3-pytest python3-dask $*"  # extra packages a target asks for (memcheck: valgrind)
missing=""
if command -v dpkg-query >/dev/null 2>&1; then
    for p in $PKGS; do
        st=$(dpkg-query -W -f='${Status}' "$p" 2>/dev/null || true)
        case "$st" in *"install ok installed"*) ;; *) missing="$missing $p" ;; esac
    done
else
    echo "slowscan needs (Debian package names):" $PKGS
    echo "install their equivalents, then run make again."
    exit 0
fi
[ -z "$missing" ] && exit 0
if [ "$(id -u)" = 0 ] && command -v apt-get >/dev/null 2>&1; then
    echo "installing:$missing"
    export DEBIAN_FRONTEND=noninteractive
    apt-get update -qq
    # shellcheck disable=SC2086
    apt-get install -y -qq --no-install-recommends $missing
else
    echo "missing Debian packages:$missing"
    echo "run as root: apt-get install$missing"
    exit 1
fi
