#!/bin/sh
# Set-up for incircuit on a Debian-like machine; safe to run again.
#   scripts/setup.sh         system library for ngspice (when root), .venv, the package
#   scripts/setup.sh --test  the same, plus the test tools and a headless browser
set -eu
cd "$(dirname "$0")/.."
TEST=0
[ "${1:-}" = "--test" ] && TEST=1

have_ngspice() {
    ldconfig -p 2>/dev/null | grep -q 'libngspice\.so'
}
PY=${PYTHON:-python3}
missing_debs=""
have_ngspice || missing_debs="libngspice0-dev"
# Debian ships venv's pip bootstrap separately
[ -x .venv/bin/python ] || "$PY" -c 'import ensurepip, venv' 2>/dev/null || missing_debs="$missing_debs python3-venv"
if [ "$TEST" = 1 ]; then
    command -v chromium >/dev/null 2>&1 || missing_debs="$missing_debs chromium"
    command -v chromedriver >/dev/null 2>&1 || missing_debs="$missing_debs chromium-driver"
fi
if [ -n "$missing_debs" ]; then
    if [ "$(id -u)" = 0 ] && command -v apt-get >/dev/null 2>&1; then
        echo "setup: installing Debian packages:$missing_debs"
        apt-get update -qq
        DEBIAN_FRONTEND=noninteractive apt-get install -y -qq $missing_debs >/dev/null
    else
        echo "setup: cannot install$missing_debs (needs root and apt-get)."
        echo "setup: without libngspice the tool runs analytic-only; without chromium the report browser test is skipped."
    fi
fi

[ -x .venv/bin/python ] || "$PY" -m venv .venv
stamp=.venv/.installed$TEST
if [ ! -f "$stamp" ] || [ pyproject.toml -nt "$stamp" ]; then
    .venv/bin/python -m pip install -q --upgrade pip
    if [ "$TEST" = 1 ]; then
        .venv/bin/python -m pip install -q -e '.[test]'
    else
        .venv/bin/python -m pip install -q -e .
    fi
    touch "$stamp"
fi
