"""One study path in plain NumPy, for `cargo bench --bench path` to time
against lagfold's in the same session.

The same work as lagfold's `Worker::run_path` on the exponential default
preset: simulate the two-exponential recursion (AR(1) forecasts, returns
loading on a news state, an AR(1) common IC shock, normal noise, stationary
start); per-date Pearson lagged ICs for lags 1..L and horizon ICs for horizons
1..L (cross-date covariance matrices by BLAS, horizons by their cumulative
sums); Newey-West standard errors of the lagged ICs; the three rules (peak of
the horizon IC, peak of cumsum(lagged IC)/sqrt(n), the optimum of a decay curve
fitted by weighted least squares over four families, chosen by AIC); and the
linear tranche book of every holding length 1..L (gross return, traded
notional and their sums).

Usage: python numpy_path.py PARAMS_JSON REPEATS
Prints one JSON line: {"seconds_per_path": median over REPEATS}.
"""

import json
import sys
import time

import numpy as np


def simulate(rng, p):
    n, t = p["assets"], p["history"]
    rho, lam, alpha, beta_f = p["rho"], p["lambda"], p["alpha"], p["beta_f"]
    c = np.sqrt(1.0 - rho * rho)
    cov = c / (1.0 - rho * lam)
    resid = np.sqrt(max(1.0 / (1.0 - lam * lam) - cov * cov, 0.0))
    phi = np.empty(t - 1)
    innov = p["ic_vol"] * np.sqrt(1.0 - p["psi"] ** 2)
    shocks = rng.standard_normal(t - 1)
    phi[0] = p["ic_vol"] * shocks[0]
    for i in range(1, t - 1):
        phi[i] = p["psi"] * phi[i - 1] + innov * shocks[i]
    f = np.empty((t, n))
    r = np.empty((t - 1, n))
    f[0] = rng.standard_normal(n)
    x = cov * f[0] + resid * rng.standard_normal(n)
    for row in range(t - 1):
        z = rng.standard_normal(n)
        e = rng.standard_normal(n)
        r[row] = alpha * x + (beta_f + phi[row]) * f[row] + p["idio_sd"] * e
        f[row + 1] = rho * f[row] + c * z
        x = lam * x + z
    return f, r


def measure(f, r, l):
    """Per-date lagged ICs (dates x lags) and horizon ICs (dates x horizons)."""
    fc = f[:-1] - f[:-1].mean(axis=1, keepdims=True)
    rc = r - r.mean(axis=1, keepdims=True)
    n = f.shape[1]
    fr = fc @ rc.T / n  # cov(f_s, r_u)
    rr = rc @ rc.T / n  # cov(r_s, r_u)
    fvar = np.einsum("ij,ij->i", fc, fc) / n
    dates = f.shape[0] - 1 - l  # dates with every lag and horizon observed
    idx = np.arange(dates)
    lag_cov = np.stack([fr[idx, idx + k] for k in range(l)], axis=1)
    lagged = lag_cov / np.sqrt(fvar[idx, None] * np.stack([rr[idx + k, idx + k] for k in range(l)], axis=1))
    hcov = np.cumsum(lag_cov, axis=1)
    # var(Σ_{k<h} r_{t+k}) from the 2-D cumulative sum of rr.
    s = np.zeros((rr.shape[0] + 1, rr.shape[1] + 1))
    s[1:, 1:] = rr.cumsum(0).cumsum(1)
    hvar = np.stack([s[idx + h, idx + h] - 2 * s[idx, idx + h] + s[idx, idx] for h in range(1, l + 1)], axis=1)
    horizon = hcov / np.sqrt(fvar[idx, None] * hvar)
    return lagged, horizon


def newey_west_se(x):
    """Newey-West (1987) standard error of each column's mean, Bartlett weights."""
    t = x.shape[0]
    lags = int(np.floor(4 * (t / 100) ** (2 / 9)))
    d = x - x.mean(axis=0)
    v = (d * d).sum(axis=0) / t
    for j in range(1, lags + 1):
        v += 2 * (1 - j / (lags + 1)) * (d[j:] * d[:-j]).sum(axis=0) / t
    return np.sqrt(np.maximum(v, 0) / t)


def fit_rule(ic, se):
    """Weighted least squares of four decay families (amplitude in closed form,
    shape on a grid refined by golden section), family by AIC; returns the
    argmax of sum(curve)/sqrt(n)."""
    k = np.arange(1, len(ic) + 1, dtype=float)
    w = 1.0 / se**2

    def chi2(shape):
        a = (w * shape * ic).sum() / max((w * shape * shape).sum(), 1e-300)
        return (w * (ic - a * shape) ** 2).sum(), a

    families = {
        "exponential": (lambda h: 2.0 ** (-(k - 1) / h), np.geomspace(0.3, 200, 40), 2),
        "power": (lambda a: k ** (-a), np.linspace(0.05, 3, 40), 2),
        "linear": (lambda m: np.clip((m - k) / (m - 1), 0, None), np.linspace(2, 2 * len(ic), 40), 2),
        "hump": (lambda pk: (k / pk) ** 2 * np.exp(2 * (1 - k / pk)), np.geomspace(1, 2 * len(ic), 40), 3),
    }
    best = None
    for shape, grid, params in families.values():
        values = [chi2(shape(g))[0] for g in grid]
        i = int(np.argmin(values))
        lo, hi = grid[max(i - 1, 0)], grid[min(i + 1, len(grid) - 1)]
        g = 0.6180339887498949
        a, b = hi - g * (hi - lo), lo + g * (hi - lo)
        for _ in range(30):
            if chi2(shape(a))[0] < chi2(shape(b))[0]:
                hi, b = b, a
                a = hi - g * (hi - lo)
            else:
                lo, a = a, b
                b = lo + g * (hi - lo)
        x = 0.5 * (lo + hi)
        c2, amp = chi2(shape(x))
        aic = c2 + 2 * params
        if best is None or aic < best[0]:
            best = (aic, amp * shape(x))
    curve = best[1]
    return int(np.argmax(np.cumsum(curve) / np.sqrt(k))) + 1


def books(f, r, l):
    """The linear tranche book of every holding length: weights the mean of the
    last h demeaned forecasts at unit gross exposure; sums of gross return and
    traded notional over the dates from l on. Gross returns for every h come
    from one matrix product (the book's return is the mean of the last h
    scores' returns); the traded notional from |s_t − s_{t−h}|/h."""
    fc = f - f.mean(axis=1, keepdims=True)
    fc /= np.abs(fc).sum(axis=1, keepdims=True)
    t = r.shape[0]
    pr = r @ fc[:t].T  # pr[u, v] = s_v · r_u, the return over (u, u+1] of the scores of date v
    dates = np.arange(l + 1, t)
    sums = np.zeros((l, 6))
    gross = np.zeros(len(dates))
    for h in range(1, l + 1):
        gross += pr[dates, dates - h + 1]
        g = gross / h
        tau = np.abs(fc[dates] - fc[dates - h]).sum(axis=1) / h
        sums[h - 1] = [len(g), g.sum(), (g * g).sum(), tau.sum(), (tau * tau).sum(), (g * tau).sum()]
    return sums


def path(rng, p):
    l = p["horizons"]
    f, r = simulate(rng, p)
    lagged, horizon = measure(f, r, l)
    lag_mean, hor_mean = lagged.mean(axis=0), horizon.mean(axis=0)
    se = newey_west_se(lagged)
    peak = int(np.argmax(hor_mean)) + 1
    formula = int(np.argmax(np.cumsum(lag_mean) / np.sqrt(np.arange(1, l + 1)))) + 1
    fitted = fit_rule(lag_mean, se)
    return peak, formula, fitted, books(f, r, l)


def main():
    params = json.loads(sys.argv[1])
    repeats = int(sys.argv[2])
    rng = np.random.default_rng(7)
    path(rng, params)  # warm up
    times = []
    for _ in range(repeats):
        start = time.perf_counter()
        path(rng, params)
        times.append(time.perf_counter() - start)
    print(json.dumps({"seconds_per_path": float(np.median(times))}))


if __name__ == "__main__":
    main()
