"""Expected BIC values for comptrail's check of its information criterion.

Fits ordinary least squares with statsmodels (a general-purpose statistics library) on two
public data sets kept beside the checks, and prints each model's BIC (statsmodels' `bic`:
-2 log-likelihood + k log n, k counting the coefficients). Run from this folder:

    python3 bic_reference.py > bic_reference.txt

Data: toluca.csv (Kutner et al., Applied Linear Statistical Models, 5th ed., Table 1.1) and
longley.csv (NIST StRD, Longley 1967).
"""
import csv

import numpy as np
import statsmodels
import statsmodels.api as sm


def read(name):
    with open(f"../{name}") as f:
        rows = list(csv.reader(f))
    header, data = rows[0], np.array([[float(v) for v in r] for r in rows[1:] if r])
    return header, data


_, toluca = read("toluca.csv")
lot, hours = toluca[:, 0], toluca[:, 1]
_, longley = read("longley.csv")
y, x = longley[:, 0], longley[:, 1:]

models = {
    "toluca_linear": (hours, sm.add_constant(np.column_stack([lot]))),
    "toluca_quadratic": (hours, sm.add_constant(np.column_stack([lot, lot**2]))),
    "longley_full": (y, sm.add_constant(x)),
}
print(f"# statsmodels {statsmodels.__version__}, numpy {np.__version__}")
for name, (response, design) in models.items():
    fit = sm.OLS(response, design).fit()
    print(f"{name} n={int(fit.nobs)} k={design.shape[1]} bic={fit.bic:.10f} aic={fit.aic:.10f}")
