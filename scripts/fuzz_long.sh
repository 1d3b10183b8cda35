#!/bin/sh
# The long fuzz profile: 6,000 examples for each of the 16 fast fuzz tests and 1,500 for
# each of the 5 slow ones (exact arithmetic, dask graphs), about 103,500 examples in all,
# plus the two fixed-input checks. Run from the project root after `pip install '.[test]'`.
# Prints hypothesis's per-test statistics; exits non-zero on any failure or hang.
set -e
STATEWRIGHT_FUZZ_EXAMPLES=6000 exec python -m pytest tests/test_fuzz.py -q -p no:cacheprovider --hypothesis-show-statistics "$@"
