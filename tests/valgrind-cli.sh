#!/bin/sh
# valgrind-cli.sh - stands in for the synodic program during
# `make check-valgrind VALGRIND_CLI=1`: runs the real program
# ($SYNODIC_REAL_BIN) under valgrind memcheck with $VALGRIND_FLAGS.  A
# memcheck error exits with 99, which no test expects.  A libtool build
# keeps the real binary in .libs/; it is run directly (with its library
# path) rather than through libtool, which would re-split the arguments.
real=${SYNODIC_REAL_BIN:?SYNODIC_REAL_BIN is not set}
dir=$(dirname "$real")
base=$(basename "$real")
if test -x "$dir/.libs/$base"; then
    LD_LIBRARY_PATH="$dir/.libs${LD_LIBRARY_PATH:+:$LD_LIBRARY_PATH}"
    export LD_LIBRARY_PATH
    real="$dir/.libs/$base"
fi
# shellcheck disable=SC2086
exec valgrind $VALGRIND_FLAGS --error-exitcode=99 -q "$real" "$@"
