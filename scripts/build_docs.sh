#!/usr/bin/env bash
# Builds the documentation site (docs/) with Sphinx, warnings as errors: the API reference
# from the docstrings (numpydoc), the user guide and the demo notebooks, all executed during
# the build (myst-nb). Needs the docs extra: pip install '.[docs]'. Output: docs/_build/html.
set -euo pipefail
cd "$(dirname "$0")/.."
python -m sphinx -W --keep-going -q -b html docs docs/_build/html "$@"
echo "documentation built: docs/_build/html/index.html"
