#!/usr/bin/env bash
# System packages used by the test suite (open datasets, a headless browser). Safe to run twice.
set -euo pipefail
pkgs=(chromium)
[ ${#pkgs[@]} -eq 0 ] && exit 0
if [ "$(id -u)" -ne 0 ]; then sudo=sudo; else sudo=; fi
$sudo apt-get update -qq
DEBIAN_FRONTEND=noninteractive $sudo apt-get install -y -qq --no-install-recommends "${pkgs[@]}"
