"""Expected nested-model F tests for comptrail's check of its premium-fade test.

Fits ordinary least squares with statsmodels (a general-purpose statistics library) on the
public Longley data kept beside the checks and prints, for each pair of nested models, the F
statistic, its degrees of freedom and p-value (statsmodels' `compare_f_test`), and the
coefficients of a model with an interaction (product) column. Run from this folder:

    python3 f_test_reference.py > f_test_reference.txt

Data: longley.csv (NIST StRD, Longley 1967): y, then x1..x6.
"""
import csv

import numpy as np
import statsmodels
import statsmodels.api as sm


def read(name):
    with open(f"../{name}") as f:
        rows = list(csv.reader(f))
    return np.array([[float(v) for v in r] for r in rows[1:] if r])


longley = read("longley.csv")
y, x = longley[:, 0], longley[:, 1:]
x1, x2, x3, x4, x5, x6 = (x[:, k] for k in range(6))
# Scaled so the product column is well conditioned: GNP in thousands, population in thousands.
inter = (x2 / 1000.0) * (x5 / 1000.0)

models = {
    "reduced": sm.add_constant(np.column_stack([x2, x3, x5])),
    "full": sm.add_constant(np.column_stack([x2, x3, x5, x6])),
    "interaction": sm.add_constant(np.column_stack([x2, x3, x5, inter])),
}
fits = {name: sm.OLS(y, design).fit() for name, design in models.items()}
print(f"# statsmodels {statsmodels.__version__}, numpy {np.__version__}")
for full in ["full", "interaction"]:
    f, p, df = fits[full].compare_f_test(fits["reduced"])
    print(f"{full}_vs_reduced f={f:.12e} p={p:.12e} df1={int(df)} df2={int(fits[full].df_resid)}")
print("interaction_coefficients " + " ".join(f"{b:.12e}" for b in fits["interaction"].params))
