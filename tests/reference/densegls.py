"""A dense generalised-least-squares solution of the structural time series models, the
reference for the Kalman smoother (the same solver as in test_smoothing_gls.py, whose
docstring derives it): unknowns beta = (alpha_1, eta_1 .. eta_{n-1}) with a flat prior on the
initial state and N(0, sigma2_j) on every disturbance with a positive variance; the state of
period t is alpha_t = A_t beta; observations y = X beta + e with e ~ N(0, Sigma), Sigma the FULL
sampling covariance of the observed values (stacked period by period, then series). Returns
the posterior mean and covariance of the level c' alpha_t and the index 100 exp(L_t - L_base)
with the normal band exp(+-1.96 sd(L_t - L_base))."""
import numpy as np

Z975 = 1.959963984540054


def structure(trend, seasonal, borrow=False):
    """Transition T, design rows Z (series x m), disturbance state indices (order: level,
    slope, seasonal, deviation)."""
    m = 1 + trend + (11 if seasonal else 0) + borrow
    T = np.eye(m)
    if trend:
        T[0, 1] = 1
    if seasonal:
        s0 = 1 + trend
        T[s0, s0:s0 + 11] = -1
        for j in range(1, 11):
            T[s0 + j, s0 + j] = 0
            T[s0 + j, s0 + j - 1] = 1
    Z = np.zeros((1 + borrow, m))
    Z[:, 0] = 1
    if seasonal:
        Z[:, 1 + trend] = 1
    if borrow:
        Z[1, m - 1] = 1
    comps = [0] + ([1] if trend else []) + ([1 + trend] if seasonal else []) + ([m - 1] if borrow else [])
    return T, Z, comps


def gls(T, Z, comps, variances, y, Sigma, c, base):
    """y: (n, p) with NaN for missing; Sigma: covariance of the observed values in row order
    (t, then series). Returns L, V, index, lower, upper (NaN where not identified)."""
    n, p = y.shape
    m = T.shape[0]
    pos = [(j, v) for j, v in zip(comps, variances) if v > 0]
    dim = m + (n - 1) * len(pos)
    A = np.zeros((m, dim))
    A[:, :m] = np.eye(m)
    As = []
    for t in range(n):
        As.append(A.copy())
        A = T @ A
        for k, (j, v) in enumerate(pos):
            if t < n - 1:
                A[j, m + t * len(pos) + k] += 1
    rows, vals = [], []
    for t in range(n):
        for i in range(p):
            if np.isfinite(y[t, i]):
                rows.append(Z[i] @ As[t])
                vals.append(y[t, i])
    X = np.array(rows)
    yy = np.array(vals)
    Si = np.linalg.inv(Sigma)
    prior = np.zeros(dim)
    for t in range(n - 1):
        for k, (j, v) in enumerate(pos):
            prior[m + t * len(pos) + k] = 1 / v
    Lam = X.T @ Si @ X + np.diag(prior)
    dl = np.diag(Lam)
    Dg = 1 / np.sqrt(np.where(dl > 0, dl, 1.0))
    w, E = np.linalg.eigh(Dg[:, None] * Lam * Dg[None, :])
    keep = w > 1e-10 * w.max()
    cov = (Dg[:, None] * (E[:, keep] / w[keep]) @ E[:, keep].T) * Dg[None, :]
    null = E[:, ~keep]
    bhat = cov @ (X.T @ Si @ yy)
    C = np.array([c @ As[t] for t in range(n)])
    L = C @ bhat
    V = C @ cov @ C.T
    Cs = C * Dg[None, :]
    unidentified = np.linalg.norm(Cs @ null, axis=1) > 1e-7 * np.linalg.norm(Cs, axis=1)
    L[unidentified] = np.nan
    V[unidentified, :] = np.nan
    V[:, unidentified] = np.nan
    d = L - L[base]
    sd = np.sqrt(np.maximum(np.diag(V) + V[base, base] - 2 * V[:, base], 0))
    return L, V, 100 * np.exp(d), 100 * np.exp(d - Z975 * sd), 100 * np.exp(d + Z975 * sd)
