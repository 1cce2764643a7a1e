#!/usr/bin/python3
"""Reference fixture for the engine's least-squares core and savings uncertainty.

Rerun from the repository root with the Debian packages (not a pyenv python):

    /usr/bin/python3 test/reference/make-wls-fixtures.py

It rewrites test/reference/wls-fixtures.json. The committed fixture was made
with numpy 1.24.2, statsmodels 0.13.5 and scipy 1.10.1 (Debian 12 packages
python3-numpy, python3-statsmodels, python3-scipy); the versions actually used
are also written into the fixture's "generator" field.

All data are invented: drawn from a fixed-seed generator below. Nothing is
rounded; floats are written at full double precision (Python's repr).
"""

import json
import os

import numpy as np
import scipy
import scipy.stats
import statsmodels
import statsmodels.api as sm

SEED = 20240611
HEATING_BALANCE = 55.0
COOLING_BALANCE = 68.0
CONFIDENCES = [0.68, 0.80, 0.90, 0.95]
PREDICTION_CONFIDENCES = [0.90, 0.68]

rng = np.random.default_rng(SEED)


def hinge_row(temp):
    return [1.0, max(HEATING_BALANCE - temp, 0.0), max(temp - COOLING_BALANCE, 0.0)]


def month_lengths(count, start_month=0, first_year=2021):
    lengths = [31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31]
    out = []
    for i in range(count):
        month = (start_month + i) % 12
        year = first_year + (start_month + i) // 12
        leap = month == 1 and year % 4 == 0
        out.append(lengths[month] + (1 if leap else 0))
    return out


def monthly_temps(count, start_month=0):
    # Seasonal shape (cold in January, warm in July) plus month-to-month noise.
    months = np.arange(start_month, start_month + count)
    temps = 52.5 - 30.0 * np.cos(2 * np.pi * (months % 12 + 0.5) / 12.0) + rng.normal(0.0, 3.0, count)
    return np.clip(temps, 20.0, 85.0)


def fit(name, design, y, weights, reporting, groups, df_resid=None, note=""):
    X = np.asarray(design, dtype=float)
    yv = np.asarray(y, dtype=float)
    w = np.asarray(weights, dtype=float)
    model = sm.WLS(yv, X, weights=w)
    if df_resid is not None:
        model.df_resid = float(df_resid)
    res = model.fit()
    cov = res.cov_params()
    single = []
    for i, row in enumerate(reporting):
        exog = np.asarray([row["designRow"]], dtype=float)
        entry = {"row": i, "days": row["days"]}
        for conf in PREDICTION_CONFIDENCES:
            frame = res.get_prediction(exog, weights=row["days"]).summary_frame(alpha=1.0 - conf)
            mean = float(frame["mean"].iloc[0])
            entry["mean"] = mean
            entry["obsHalfWidth%d" % round(conf * 100)] = float(frame["obs_ci_upper"].iloc[0]) - mean
            # The two-sided t quantile statsmodels uses for that interval (df = df_resid).
            entry["tCritical%d" % round(conf * 100)] = float(scipy.stats.t.ppf(1.0 - (1.0 - conf) / 2.0, res.df_resid))
        single.append(entry)
    multi = []
    for indices in groups:
        c = np.zeros(X.shape[1])
        total_days = 0.0
        for i in indices:
            c += reporting[i]["days"] * np.asarray(reporting[i]["designRow"], dtype=float)
            total_days += reporting[i]["days"]
        variance = float(c @ cov @ c) + float(res.scale) * total_days
        multi.append({"rows": list(indices), "totalDays": total_days, "variance": variance})
    return {
        "name": name,
        "note": note,
        "design": X.tolist(),
        "y": yv.tolist(),
        "weights": w.tolist(),
        "dfResidOverride": df_resid,
        "params": res.params.tolist(),
        "bse": res.bse.tolist(),
        "tvalues": res.tvalues.tolist(),
        "ssr": float(res.ssr),
        "scale": float(res.scale),
        "dfResid": float(res.df_resid),
        "normalizedCovParams": np.asarray(res.normalized_cov_params).tolist(),
        "reportingRows": reporting,
        "singlePeriodPredictions": single,
        "multiPeriodVariances": multi,
    }


datasets = []

# (a) 36 monthly baseline periods, heating/cooling hinge model, weights = days.
days_a = month_lengths(36)
temps_a = monthly_temps(36)
design_a = [hinge_row(t) for t in temps_a]
noise_a = rng.normal(0.0, 25.0, 36)
y_a = [410.0 + 11.5 * r[1] + 17.0 * r[2] + e for r, e in zip(design_a, noise_a)]
rep_days_a = month_lengths(12, start_month=0, first_year=2024)
rep_temps_a = monthly_temps(12)
reporting_a = [{"days": d, "designRow": hinge_row(t)} for d, t in zip(rep_days_a, rep_temps_a)]
groups_a = [[0, 1, 2], list(range(12)), [5, 6, 7, 8]]
datasets.append(fit("monthly-hinge", design_a, y_a, days_a, reporting_a, groups_a,
                    note="36 months, design [1, max(55-x,0), max(x-68,0)], weights = days"))
# Same data with two changepoints counted as parameters: df = n - 5.
datasets.append(fit("monthly-hinge-cp-dof", design_a, y_a, days_a, reporting_a, groups_a, df_resid=36 - 5,
                    note="as monthly-hinge, residual df overridden to n - 5"))

# (b) straight line, 24 periods, weights = days.
days_b = month_lengths(24, start_month=3)
x_b = rng.uniform(5.0, 95.0, 24)
design_b = [[1.0, float(x)] for x in x_b]
y_b = [120.0 + 2.75 * float(x) + e for x, e in zip(x_b, rng.normal(0.0, 9.0, 24))]
reporting_b = [{"days": d, "designRow": [1.0, float(x)]}
               for d, x in zip(month_lengths(6, start_month=3, first_year=2023), rng.uniform(0.0, 110.0, 6))]
groups_b = [[0, 1], list(range(6))]
datasets.append(fit("monthly-line", design_b, y_b, days_b, reporting_b, groups_b,
                    note="24 periods, design [1, x], weights = days"))

# (c) 365 daily periods, weights 1, hinge design.
day_index = np.arange(365)
temps_c = np.clip(52.5 - 28.0 * np.cos(2 * np.pi * (day_index + 0.5) / 365.0) + rng.normal(0.0, 6.0, 365),
                  -5.0, 100.0)
design_c = [hinge_row(float(t)) for t in temps_c]
y_c = [380.0 + 10.0 * r[1] + 15.5 * r[2] + e for r, e in zip(design_c, rng.normal(0.0, 60.0, 365))]
rep_temps_c = np.clip(70.0 + rng.normal(0.0, 8.0, 30), -5.0, 100.0)
reporting_c = [{"days": 1, "designRow": hinge_row(float(t))} for t in rep_temps_c]
groups_c = [list(range(7)), list(range(30))]
datasets.append(fit("daily-hinge", design_c, y_c, [1.0] * 365, reporting_c, groups_c,
                    note="365 days, design [1, max(55-x,0), max(x-68,0)], weights 1"))

t_dofs = [1, 2, 3, 4, 5, 7, 10, 15, 20, 24, 30, 31, 33, 34, 60, 100, 120, 362, 1000]
t_quantiles = [
    {"confidence": c, "dof": d, "value": float(scipy.stats.t.ppf((1.0 + c) / 2.0, d))}
    for c in CONFIDENCES for d in t_dofs
]
f_cases = [(0.05, 1, 10), (0.05, 2, 30), (0.05, 3, 33), (0.05, 1, 360), (0.05, 4, 20),
           (0.01, 2, 30), (0.10, 3, 100), (0.05, 5, 1000)]
f_quantiles = [
    {"level": lv, "df1": a, "df2": b, "value": float(scipy.stats.f.ppf(1.0 - lv, a, b))}
    for lv, a, b in f_cases
]

out = {
    "generator": {
        "script": "test/reference/make-wls-fixtures.py",
        "seed": SEED,
        "numpy": np.__version__,
        "statsmodels": statsmodels.__version__,
        "scipy": scipy.__version__,
    },
    "datasets": datasets,
    "tQuantiles": t_quantiles,
    "fQuantiles": f_quantiles,
}

path = os.path.join(os.path.dirname(os.path.abspath(__file__)), "wls-fixtures.json")
with open(path, "w", encoding="utf-8") as handle:
    json.dump(out, handle, indent=1)
    handle.write("\n")
print("wrote", path, os.path.getsize(path), "bytes")


# ---------------------------------------------------------------------------
# Changepoint models with independent variables (variables-fixtures.json).
# Own generator (seed below), so the datasets above are unchanged. The
# changepoints are found here by a plain search (every interval between
# sorted temperatures, scipy's bounded scalar minimiser inside it, and every
# data point; for two changepoints, every pair of intervals with Nelder–Mead
# from its centre plus the data-point edges); statsmodels WLS then gives the
# coefficients, standard errors and t at those changepoints, and the partial
# F-test of each variable (compare_f_test, changepoints held).
import scipy.optimize

VAR_SEED = 20261202
vrng = np.random.default_rng(VAR_SEED)


def hinge_h(x, c):
    return np.maximum(c - x, 0.0)


def hinge_c(x, c):
    return np.maximum(x - c, 0.0)


def shape_columns(shape, x, ch, cc):
    ones = np.ones_like(x)
    if shape == "3PH":
        return [ones, hinge_h(x, ch)]
    if shape == "3PC":
        return [ones, hinge_c(x, cc)]
    return [ones, hinge_h(x, ch), hinge_c(x, cc)]


def wls_sse(shape, x, z, y, w, ch, cc):
    X = np.column_stack(shape_columns(shape, x, ch, cc) + list(z))
    res = sm.WLS(y, X, weights=w).fit()
    return float(res.ssr)


def search_one(shape, x, z, y, w, k):
    xs = np.unique(x)
    best = (np.inf, None)
    def feasible(c):
        return np.sum(x <= c) >= k and np.sum(x >= c) >= k
    for c in xs:
        if feasible(c):
            s = wls_sse(shape, x, z, y, w, c, c)
            if s < best[0]:
                best = (s, float(c))
    for lo, hi in zip(xs[:-1], xs[1:]):
        mid = 0.5 * (lo + hi)
        if not (np.sum(x <= lo) >= k and np.sum(x >= hi) >= k):
            continue
        r = scipy.optimize.minimize_scalar(lambda c: wls_sse(shape, x, z, y, w, c, c), bounds=(lo, hi),
                                           method="bounded", options={"xatol": 1e-11})
        if r.fun < best[0]:
            best = (float(r.fun), float(r.x))
    return best


def search_five(x, z, y, w, k):
    xs = np.unique(x)
    best = (np.inf, None, None)
    def ok(ch, cc):
        return ch <= cc and np.sum(x <= ch) >= k and np.sum((x >= ch) & (x <= cc)) >= k and np.sum(x >= cc) >= k
    # Edges: one changepoint on a data point, the other searched on each interval or on a point.
    for a in xs:
        for b in xs:
            if ok(a, b):
                s = wls_sse("5P", x, z, y, w, a, b)
                if s < best[0]:
                    best = (s, float(a), float(b))
    for a in xs:
        for lo, hi in zip(xs[:-1], xs[1:]):
            if ok(a, 0.5 * (lo + hi)) and ok(a, lo) and ok(a, hi):
                r = scipy.optimize.minimize_scalar(lambda c: wls_sse("5P", x, z, y, w, a, c), bounds=(lo, hi),
                                                   method="bounded", options={"xatol": 1e-11})
                if r.fun < best[0]:
                    best = (float(r.fun), float(a), float(r.x))
            if ok(0.5 * (lo + hi), a) and ok(lo, a) and ok(hi, a):
                r = scipy.optimize.minimize_scalar(lambda c: wls_sse("5P", x, z, y, w, c, a), bounds=(lo, hi),
                                                   method="bounded", options={"xatol": 1e-11})
                if r.fun < best[0]:
                    best = (float(r.fun), float(r.x), float(a))
    # Interiors of pairs of intervals.
    gaps = list(zip(xs[:-1], xs[1:]))
    for i, (l1, h1) in enumerate(gaps):
        for (l2, h2) in gaps[i + 1:]:
            if not ok(0.5 * (l1 + h1), 0.5 * (l2 + h2)):
                continue
            def f(v):
                a, b = v
                if not (l1 <= a <= h1 and l2 <= b <= h2):
                    return 1e300
                return wls_sse("5P", x, z, y, w, a, b)
            r = scipy.optimize.minimize(f, [0.5 * (l1 + h1), 0.5 * (l2 + h2)], method="Nelder-Mead",
                                        options={"xatol": 1e-10, "fatol": 1e-12, "maxiter": 4000})
            if r.fun < best[0]:
                best = (float(r.fun), float(r.x[0]), float(r.x[1]))
    return best


def variable_case(name, shape, x, z, znames, y, w, k, note):
    x = np.asarray(x, dtype=float)
    y = np.asarray(y, dtype=float)
    w = np.asarray(w, dtype=float)
    z = [np.asarray(v, dtype=float) for v in z]
    if shape == "5P":
        sse, ch, cc = search_five(x, z, y, w, k)
    else:
        sse, c = search_one(shape, x, z, y, w, k)
        ch = c if shape == "3PH" else None
        cc = c if shape == "3PC" else None
    X = np.column_stack(shape_columns(shape, x, ch if ch is not None else 0.0, cc if cc is not None else 0.0) + z)
    p = X.shape[1] + (2 if shape == "5P" else 1)
    model = sm.WLS(y, X, weights=w)
    model.df_resid = float(len(y) - p)
    res = model.fit()
    partial = []
    for j, zn in enumerate(znames):
        keep = [c for c in range(X.shape[1]) if c != X.shape[1] - len(znames) + j]
        reduced = sm.WLS(y, X[:, keep], weights=w)
        reduced.df_resid = float(len(y) - p + 1)
        rres = reduced.fit()
        f_value, p_value, df_diff = res.compare_f_test(rres)
        partial.append({"variable": zn, "f": float(f_value), "pValue": float(p_value), "dfDiff": float(df_diff)})
    return {
        "name": name,
        "note": note,
        "shape": shape,
        "minPoints": k,
        "temps": x.tolist(),
        "usePerDay": y.tolist(),
        "days": w.tolist(),
        "variables": {zn: v.tolist() for zn, v in zip(znames, z)},
        "heatingChangepoint": ch,
        "coolingChangepoint": cc,
        "sse": float(res.ssr),
        "searchSse": sse,
        "p": p,
        "params": res.params.tolist(),
        "bse": res.bse.tolist(),
        "tvalues": res.tvalues.tolist(),
        "partialF": partial,
    }


vcases = []
# (v1) 36 monthly bills, heating only, occupancy share and production.
days_v = month_lengths(36)
temps_v = monthly_temps(36)
occ_v = np.clip(0.70 - 0.45 * (((np.arange(36) % 12) == 6) | ((np.arange(36) % 12) == 7)) + vrng.normal(0, 0.04, 36), 0, 1)
prod_v = vrng.uniform(80.0, 140.0, 36)
y_v = 300.0 + 9.0 * hinge_h(temps_v, 56.0) + 220.0 * occ_v + 1.6 * prod_v + vrng.normal(0, 14.0, 36)
vcases.append(variable_case("monthly-3PH-two-variables", "3PH", temps_v, [occ_v, prod_v], ["occupied", "production"],
                            y_v, days_v, 3, "36 bills at their mean temperature; use = 300 + 9(56-T)+ + 220 occ + 1.6 prod + noise"))
# (v3) 120 days, 3PC with two day-type indicators (weekend, holiday), weights 1.
day_v = np.arange(120)
temps_d = np.clip(62.0 + 14.0 * np.sin(2 * np.pi * day_v / 120.0) + vrng.normal(0, 4.0, 120), 30.0, 100.0)
weekend = ((day_v % 7) >= 5).astype(float)
holiday = np.zeros(120)
holiday[[10, 45, 46, 90]] = 1.0
holiday = holiday * (1.0 - weekend)
y_d = 500.0 + 21.0 * hinge_c(temps_d, 65.0) - 180.0 * weekend - 150.0 * holiday + vrng.normal(0, 25.0, 120)
vcases.append(variable_case("daily-3PC-day-types", "3PC", temps_d, [weekend, holiday], ["weekend", "holiday"],
                            y_d, np.ones(120), 3, "120 days; use = 500 + 21(T-65)+ - 180 weekend - 150 holiday + noise"))

vout = {
    "generator": {
        "script": "test/reference/make-wls-fixtures.py",
        "seed": VAR_SEED,
        "numpy": np.__version__,
        "statsmodels": statsmodels.__version__,
        "scipy": scipy.__version__,
    },
    "cases": vcases,
}
vpath = os.path.join(os.path.dirname(os.path.abspath(__file__)), "variables-fixtures.json")
with open(vpath, "w", encoding="utf-8") as handle:
    json.dump(vout, handle, indent=1)
    handle.write("\n")
print("wrote", vpath, os.path.getsize(vpath), "bytes")
