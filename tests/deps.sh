#!/bin/sh
# Install what the tests need when it is missing. As root this runs apt-get;
# otherwise it prints the exact command and stops.
PKGS="libcmocka-dev doxygen python3-mpmath python3-scipy python3-numpy gfortran clang g++ pkgconf python3-setuptools python3-pip"
missing=""
for p in $PKGS; do
    dpkg-query -W -f='${Status}' "$p" 2>/dev/null | grep -q "install ok installed" || missing="$missing $p"
done
[ -z "$missing" ] && exit 0
if command -v apt-get >/dev/null 2>&1 && [ "$(id -u)" = 0 ]; then
    echo "deps: installing$missing"
    apt-get update -qq >/dev/null && \
    DEBIAN_FRONTEND=noninteractive apt-get install -y -qq $missing >/dev/null || {
        echo "deps: apt-get failed; run: apt-get update && apt-get install -y$missing"; exit 1; }
else
    echo "deps: missing packages:$missing"
    echo "deps: run as root: apt-get update && apt-get install -y$missing"
    exit 1
fi
