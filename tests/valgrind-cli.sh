#!/bin/sh
# valgrind-cli.sh - stands in for the synodic program during
# `make check-valgrind VALGRIND_CLI=1`: runs the real program
# ($SYNODIC_REAL_BIN, through libtool when it is a wrapper script) under
# valgrind memcheck.  A memcheck error exits with 99, which no test expects.
real=${SYNODIC_REAL_BIN:?SYNODIC_REAL_BIN is not set}
dir=$(dirname "$real")
if test -x "$dir/libtool"; then lt="$dir/libtool --mode=execute"; else lt=; fi
# shellcheck disable=SC2086
exec $lt valgrind $VALGRIND_FLAGS --error-exitcode=99 -q "$real" "$@"
