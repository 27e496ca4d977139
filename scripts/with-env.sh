#!/usr/bin/env bash
# Runs a command with the profile's environment (ports, data folder, credentials).
. "$(dirname "$0")/env.sh"
exec "$@"
