#!/usr/bin/python3
"""Records the strings that the pandas CSV reader treats as missing by
default (pandas' documented `na_values` default, the set
pandas._libs.parsers.STR_NA_VALUES), so that a test can check tabsight's
list of missing-looking tokens against it.

Run with Debian's system python3 (python3-pandas from apt):

    /usr/bin/python3 scripts/record_missing_tokens.py

It writes fixtures/reference/missing-tokens.json.
"""
import json
from pathlib import Path

import pandas as pd
from pandas._libs.parsers import STR_NA_VALUES

OUT = Path(__file__).resolve().parent.parent / "fixtures" / "reference" / "missing-tokens.json"

OUT.write_text(json.dumps({
    "library": f"pandas {pd.__version__}",
    "source": "pandas._libs.parsers.STR_NA_VALUES (the default na_values of pandas.read_csv)",
    "tokens": sorted(STR_NA_VALUES),
}, indent=1) + "\n")
print(f"wrote {OUT}")
