"""The other side of comptrail's Parquet checks: a general-purpose analytical engine (DuckDB,
installed from PyPI by .ci/run) writes a market partitioned by make and model, and reads back
what `comptrail convert` wrote.

    python3 duckdb_lake.py write MARKET.csv OUT_DIR   # COPY ... (FORMAT PARQUET, PARTITION_BY)
    python3 duckdb_lake.py sums MARKET.csv|DIR        # rows and column sums, as JSON

`sums` reads a CSV with DuckDB's own CSV reader, or a folder with hive partitioning on, so the
same numbers can be compared across the two.
"""

import json
import sys

import duckdb


def write(csv_path: str, out_dir: str) -> None:
    con = duckdb.connect()
    con.execute(
        f"COPY (SELECT * FROM read_csv_auto('{csv_path}')) "
        f"TO '{out_dir}' (FORMAT PARQUET, PARTITION_BY (make, model))"
    )


def sums(path: str) -> None:
    con = duckdb.connect()
    if path.endswith(".csv"):
        source = f"read_csv_auto('{path}')"
    else:
        source = f"read_parquet('{path}/**/*.parquet', hive_partitioning = true)"
    rows, price, miles, years = con.execute(
        f"SELECT count(*), sum(asking_price), sum(miles), sum(model_year) FROM {source}"
    ).fetchone()
    by_model = con.execute(
        f"SELECT make, model, count(*) FROM {source} GROUP BY ALL ORDER BY ALL"
    ).fetchall()
    print(
        json.dumps(
            {
                "engine": "duckdb " + duckdb.__version__,
                "rows": rows,
                "sum_asking_price": float(price),
                "sum_miles": float(miles),
                "sum_model_year": int(years),
                "by_model": [[m, n, c] for (m, n, c) in by_model],
            }
        )
    )


if __name__ == "__main__":
    if sys.argv[1] == "write":
        write(sys.argv[2], sys.argv[3])
    else:
        sums(sys.argv[2])
