#!/bin/sh
# Installs what rigcal needs to build, test and demo on Debian 12 (bookworm).
# Idempotent: when every package is present it prints nothing and exits 0.
# Needs root (or sudo) only when something is missing.
#
#   tools/setup.sh            build + test + demo dependencies
#   tools/setup.sh --minimal  only what building the daemon and tools needs
set -eu

build_packages="build-essential cmake pkg-config
  libboost-dev libboost-program-options-dev libeigen3-dev libspdlog-dev libfmt-dev
  libyaml-cpp-dev nlohmann-json3-dev libsystemd-dev libssl-dev catch2"
# Reference libraries the tests compare against, the fuzzing/sanitizer toolchain,
# the browser that renders reports in the tests, and small tools the fault tests use:
# valgrind (leak check of a daemon life), systemd (systemd-analyze scores the unit offline),
# openssl (test certificates and s_client), util-linux (mount for the disk-full tmpfs).
test_packages="python3 python3-numpy python3-scipy python3-statsmodels python3-pytest
  clang libclang-rt-14-dev chromium openssl util-linux procps valgrind systemd"

wanted="$build_packages"
[ "${1:-}" = "--minimal" ] || wanted="$wanted $test_packages"

missing=""
for p in $wanted; do
  if ! dpkg-query -W -f='${Status}' "$p" 2>/dev/null | grep -q "install ok installed"; then
    missing="$missing $p"
  fi
done
[ -z "$missing" ] && exit 0

echo "setup: installing:$missing"
if [ "$(id -u)" -eq 0 ]; then sudo=""; else sudo="sudo"; fi
export DEBIAN_FRONTEND=noninteractive
$sudo apt-get update -qq
# shellcheck disable=SC2086
$sudo apt-get install -y -qq --no-install-recommends $missing >/dev/null
echo "setup: done"
