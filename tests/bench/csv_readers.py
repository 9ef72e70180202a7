#!/usr/bin/python3
"""Times one general-purpose CSV reader on a table, in a process of its own (its peak RSS).

usage: csv_readers.py READER TABLE      READER: pandas | pyarrow | polars
Prints one line 'JSON {...}': seconds (wall, read only), cpu_seconds, peak_rss_mb, rows, or
'skipped' with the reason when the reader is not installed. pyarrow and polars use every core.
"""
import json
import resource
import sys
import time


def cpu_seconds():
    usage = resource.getrusage(resource.RUSAGE_SELF)
    return usage.ru_utime + usage.ru_stime


def read_pandas(path):
    import pandas as pd

    return len(pd.read_csv(path, engine="c"))


def read_pyarrow(path):
    from pyarrow import csv

    return csv.read_csv(path).num_rows


def read_polars(path):
    import polars as pl

    return pl.read_csv(path).height


READERS = {"pandas": read_pandas, "pyarrow": read_pyarrow, "polars": read_polars}
MODULES = {"pandas": "pandas", "pyarrow": "pyarrow.csv", "polars": "polars"}

reader, path = sys.argv[1], sys.argv[2]
try:
    __import__(MODULES[reader])  # imported before the clock starts, as a user's session would be
except ImportError as error:
    print("JSON " + json.dumps({"reader": reader, "skipped": f"not installed ({error})"}))
    sys.exit(0)
cpu0, t0 = cpu_seconds(), time.perf_counter()
rows = READERS[reader](path)
seconds, cpu = time.perf_counter() - t0, cpu_seconds() - cpu0
peak_mb = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024  # KiB on Linux
print("JSON " + json.dumps(
    {"reader": reader, "seconds": seconds, "cpu_seconds": cpu, "peak_rss_mb": peak_mb, "rows": rows}
))
