#!/bin/sh
# The long fuzz profile: 5,000 examples for each of the 20 fast fuzz tests and 1,250 for
# each of the 6 slow ones (exact arithmetic, dask graphs), about 107,500 examples in all,
# plus the two fixed-input checks. Run from the project root after `pip install '.[test]'`.
# Prints hypothesis's per-test statistics; exits non-zero on any failure or hang.
set -e
STATEWRIGHT_FUZZ_EXAMPLES=5000 exec python -m pytest tests/*/test_fuzz_*.py -q -p no:cacheprovider --hypothesis-show-statistics "$@"
