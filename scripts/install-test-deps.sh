#!/usr/bin/env bash
# System packages used by the test suite (open datasets, a headless browser). Safe to run twice.
# dict-gcide (GCIDE, Webster 1913 text) and wordnet-base (WordNet 3.0): the embed, audit and merge-test real-text tests.
# dict-foldoc (Free On-line Dictionary of Computing): the second corpus of the tagger accuracy test.
set -euo pipefail
pkgs=(dict-gcide dict-foldoc wordnet-base chromium)
[ ${#pkgs[@]} -eq 0 ] && exit 0
if [ "$(id -u)" -ne 0 ]; then sudo=sudo; else sudo=; fi
$sudo apt-get update -qq
DEBIAN_FRONTEND=noninteractive $sudo apt-get install -y -qq --no-install-recommends "${pkgs[@]}"
