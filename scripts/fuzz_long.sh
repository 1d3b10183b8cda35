#!/bin/sh
STATEWRIGHT_FUZZ_EXAMPLES=100000 python -m pytest tests/test_fuzz.py -q
