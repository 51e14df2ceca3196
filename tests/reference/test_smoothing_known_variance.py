"""Structural time series smoother with known, period-varying sampling variances h_t (the
case of index period effects), with a shared sampling error, and the borrowing-strength model,
against statsmodels' general state space model.

Reference: statsmodels.tsa.statespace.mlemodel.MLEModel (python3-statsmodels) with a
time-varying observation covariance array obs_cov[:, :, t] = H_t (+ the irregular variance),
the same transition as UnobservedComponents (local level / local linear trend, dummy
seasonal of period 12), exact diffuse initialisation of the trend and seasonal states
(Initialization 'diffuse'), and ssm.tolerance = 0 (no steady-state switch; see
test_smoothing_statsmodels.py). A shared sampling error x_t' xi, xi ~ N(0, Sigma), is k extra
constant states with a known initial distribution N(0, Sigma) (Initialization 'known'), which
is the textbook way to put it into a state space model; Lintel carries it by augmentation
instead. Borrowing strength: two observed series (market, segment) with a 2 x 2 H_t per
period.

Checks: (a) at given variances: log-likelihood, smoothed and filtered states and variances
(filtered from statsmodels' nobs_diffuse on), to about 1e-8; (b) maximum likelihood: our
log-likelihood >= the best of statsmodels' fits - 1e-6, statsmodels' loglike at our variances
equals ours, variances within 2e-3 relative (+ 1e-6 of the mean h) (the tolerance is argued in
test_smoothing_statsmodels.py).

Generated data (seed 20260414): a thin segment, monthly, 120 periods; n_t sales a month
uniform on 10..25 and none in periods 5, 40, 41, 100; true log level a local linear trend
(level sd 0.004, slope sd 0.0004, start 0 and slope 0.003) plus a dummy seasonal of period 12
(start pattern 0.015 sin(2 pi j / 12), disturbance sd 0.001); period effect y_t = truth_t +
N(0, h_t), h_t = 0.2^2 / n_t. Shared error: k = 3, x_t = (1, u_t, u_t^2 - 1/3) with u_t uniform
on (-1, 1) and Sigma = 1e-4 * [[1, .3, 0], [.3, 2, .1], [0, .1, .5]]; y_t gets x_t' xi with one
draw xi ~ N(0, Sigma). Market (borrowing): 8 times the sales, h^m = h / 8, the same truth;
segment = truth + a local-level deviation (start 0.05, sd 0.002) + its noise; the two errors
have covariance h^m_t (the segment's sales are part of the market).
"""
import warnings

import numpy as np
import pandas as pd
import statsmodels.api as sm
from statsmodels.tools.sm_exceptions import ConvergenceWarning
from statsmodels.tsa.statespace.initialization import Initialization

from refcommon import Checks, parse_args, run_refcli

warnings.simplefilter("ignore", ConvergenceWarning)  # the best of several fits is the reference
args = parse_args()
checks = Checks("smoother with known variances vs statsmodels MLEModel")

rng = np.random.default_rng(20260414)
n = 120
sales = rng.integers(10, 26, n).astype(float)
sales[[5, 40, 41, 100]] = 0
level, slope = 0.0, 0.003
gamma = list(0.015 * np.sin(2 * np.pi * np.arange(11) / 12))
truth = np.empty(n)
for t in range(n):
    truth[t] = level + gamma[0]
    level, slope = level + slope + rng.normal(0, 0.004), slope + rng.normal(0, 0.0004)
    gamma = [-sum(gamma[:11]) + rng.normal(0, 0.001)] + gamma[:10]
h = np.where(sales > 0, 0.04 / np.maximum(sales, 1), np.nan)
y = truth + rng.normal(0, 1, n) * np.sqrt(np.nan_to_num(h, nan=1.0))
y[sales == 0] = np.nan
u = rng.uniform(-1, 1, n)
X = np.column_stack([np.ones(n), u, u ** 2 - 1 / 3])
Sigma = 1e-4 * np.array([[1, .3, 0], [.3, 2, .1], [0, .1, .5]])
y_shared = y + X @ rng.multivariate_normal(np.zeros(3), Sigma)
# Borrowing strength: market and segment.
hm = h / 8
ym = truth + rng.normal(0, 1, n) * np.sqrt(np.nan_to_num(hm, nan=1.0))
dev, deviation = 0.05, np.empty(n)
for t in range(n):
    deviation[t] = dev
    dev += rng.normal(0, 0.002)
# Segment error = market error + independent part, so that cov = h^m and var = h.
ys = truth + deviation + (ym - truth) + rng.normal(0, 1, n) * np.sqrt(np.nan_to_num(h - hm, nan=1.0))
ym[sales == 0] = np.nan
ys[sales == 0] = np.nan
ys[[20, 21, 22, 60]] = np.nan  # segment periods without sales where the market has some


class KnownNoise(sm.tsa.statespace.MLEModel):
    """Local level / linear trend (+ seasonal 12) with known H_t, optional irregular, shared
    error states, and one or two series (the second one adds a local-level deviation)."""

    def __init__(self, endog, H, trend, seasonal, irregular=False, loadings=None, factor_cov=None):
        endog = np.asarray(endog, dtype=float)
        if endog.ndim == 1:
            endog = endog[:, None]
        nobs, p = endog.shape
        self.p, self.trend, self.seasonal, self.irregular = p, trend, seasonal, irregular
        m = 1 + trend + (11 if seasonal else 0) + (1 if p == 2 else 0)
        k = 0 if loadings is None else loadings.shape[1]
        super().__init__(endog, k_states=m + k, k_posdef=m + k)
        Z = np.zeros((p, m + k, nobs))
        Z[:, 0, :] = 1
        if seasonal:
            Z[:, 1 + trend, :] = 1
        if p == 2:
            Z[1, m - 1, :] = 1
        if k:
            Z[0, m:, :] = loadings.T
        self["design"] = Z
        T = np.eye(m + k)
        if trend:
            T[0, 1] = 1
        if seasonal:
            s0 = 1 + trend
            T[s0, s0:s0 + 11] = -1
            for j in range(1, 11):
                T[s0 + j, s0 + j] = 0
                T[s0 + j, s0 + j - 1] = 1
        self["transition"] = T
        self["selection"] = np.eye(m + k)
        self.H = np.nan_to_num(H, nan=1.0)
        self.m, self.k = m, k
        init = Initialization(m + k)
        init.set((0, m), "diffuse")
        if k:
            init.set((m, m + k), "known", constant=np.zeros(k), stationary_cov=factor_cov)
        self.ssm.initialization = init
        self.ssm.tolerance = 0

    @property
    def param_names(self):
        names = ["level"] + (["slope"] if self.trend else []) + (["seasonal"] if self.seasonal else [])
        names += ["deviation"] if self.p == 2 else []
        if self.irregular:
            names += ["irregular"] if self.p == 1 else ["irregular.m", "irregular.s"]
        return names

    @property
    def start_params(self):
        return np.full(len(self.param_names), np.nanmean(self.H[0, 0]) * 0.1)

    def transform_params(self, unconstrained):
        return np.asarray(unconstrained) ** 2

    def untransform_params(self, constrained):
        return np.sqrt(constrained)

    def update(self, params, **kwargs):
        params = super().update(params, **kwargs)
        q = np.zeros(self.m + self.k, dtype=params.dtype)  # complex during complex-step derivatives
        i = 0
        q[0] = params[i]; i += 1
        if self.trend:
            q[1] = params[i]; i += 1
        if self.seasonal:
            q[1 + self.trend] = params[i]; i += 1
        if self.p == 2:
            q[self.m - 1] = params[i]; i += 1
        self["state_cov"] = np.diag(q)
        H = self.H.astype(params.dtype)
        if self.irregular:
            for j in range(self.p):
                H[j, j, :] += params[i + j]
        self["obs_cov"] = H


def H_single(hv):
    return np.nan_to_num(hv, nan=1.0).reshape(1, 1, -1)


def best_fit(model):
    kw = dict(disp=False, cov_type="none")
    fits = [model.fit(method="lbfgs", maxiter=3000, **kw)]
    fits.append(model.fit(start_params=fits[0].params, method="bfgs", maxiter=10000, gtol=1e-10, **kw))
    nm = model.fit(method="nm", maxiter=5000, **kw)
    fits.append(model.fit(start_params=nm.params, method="lbfgs", maxiter=3000, **kw))
    return max(fits, key=lambda r: r.llf)


def states(got, prefix, m):
    return np.array([got[f"{prefix}{i}"].to_numpy() for i in range(m)])


def compare_given(name, got, ref, m):
    """Compares our run with statsmodels' at the same variances; m = our states."""
    checks.close(f"{name}: log-likelihood", [got.ll[0]], [ref.llf], rel=1e-10, source="statsmodels MLEModel llf")
    checks.close(f"{name}: smoothed states", states(got, "s", m), ref.smoothed_state[:m], rel=1e-8, abs_=1e-9,
                 source="statsmodels smoothed_state")
    checks.close(f"{name}: smoothed state variances", states(got, "sv", m),
                 np.array([ref.smoothed_state_cov[i, i] for i in range(m)]), rel=1e-7, abs_=1e-13,
                 source="statsmodels smoothed_state_cov")
    d = ref.nobs_diffuse
    checks.close(f"{name}: filtered states after the diffuse phase", states(got, "f", m)[:, d:],
                 ref.filtered_state[:m, d:], rel=1e-8, abs_=1e-9, source="statsmodels filtered_state")
    checks.close(f"{name}: filtered state variances after the diffuse phase", states(got, "fv", m)[:, d:],
                 np.array([ref.filtered_state_cov[i, i] for i in range(m)])[:, d:], rel=1e-7, abs_=1e-13,
                 source="statsmodels filtered_state_cov")


def compare_ml(name, got, model, ours, scale):
    best = best_fit(model)
    checks.true(f"{name}: ML log-likelihood >= statsmodels' - 1e-6", got.ll[0] >= best.llf - 1e-6,
                f"ours {got.ll[0]:.10f}, statsmodels {best.llf:.10f} (diff {got.ll[0] - best.llf:.3g})")
    checks.close(f"{name}: statsmodels loglike at our variances", [got.ll[0]], [model.loglike(ours)], rel=1e-10,
                 source="statsmodels MLEModel.loglike")
    theirs = np.asarray(best.params)
    tol = 2e-3 * np.maximum(ours, theirs) + 1e-6 * scale
    checks.true(f"{name}: ML variances close to statsmodels'", np.all(np.abs(ours - theirs) <= tol),
                f"ours {np.array2string(ours, precision=6)}, statsmodels {np.array2string(theirs, precision=6)}")


KEYS = {"level": "v_level", "slope": "v_slope", "seasonal": "v_seasonal", "deviation": "v_deviation",
        "irregular": "v_irregular", "irregular.m": "v_irregular", "irregular.s": "v_irrseg"}


def given(model, values):
    return {KEYS[nm]: v for nm, v in zip(model.param_names, values)}


def ours_from(got, model):
    return np.array([got[KEYS[nm]][0] for nm in model.param_names])


hbar = np.nanmean(h)
frame = pd.DataFrame({"value": y, "variance": np.nan_to_num(h, nan=0.0)})
true_vars = {"level": 0.004 ** 2, "slope": 0.0004 ** 2, "seasonal": 0.001 ** 2, "deviation": 0.002 ** 2,
             "irregular": 1e-4, "irregular.m": 1e-4, "irregular.s": 2e-4}

# --- One series with known h_t.
for trend in (False, True):
    for seasonal in (False, True):
        for irregular in ((False, True) if trend and seasonal else (False,)):
            name = ("trend" if trend else "level") + (" + seasonal" if seasonal else "") + (" + irregular" if irregular else "")
            model = KnownNoise(y, H_single(h), trend, seasonal, irregular)
            m = model.m
            values = [true_vars[nm] for nm in model.param_names]
            opts = dict(trend="trend" if trend else "level", seasonal=int(seasonal), irregular=int(irregular))
            got = run_refcli(args.refcli, "smooth", frame, **opts, **given(model, values))
            compare_given(f"known h, {name}, given variances", got, model.smooth(values, cov_type='none'), m)
            got = run_refcli(args.refcli, "smooth", frame, **opts)
            compare_ml(f"known h, {name}", got, model, ours_from(got, model), hbar)

# --- Shared sampling error (local linear trend + seasonal).
frame_shared = pd.DataFrame({"value": y_shared, "variance": np.nan_to_num(h, nan=0.0)})
for j in range(3):
    frame_shared[f"x{j + 1}"] = X[:, j]
    frame_shared[f"c{j + 1}"] = np.r_[Sigma[:, j], np.full(n - 3, np.nan)]
model = KnownNoise(y_shared, H_single(h), True, True, loadings=X, factor_cov=Sigma)
values = [true_vars[nm] for nm in model.param_names]
got = run_refcli(args.refcli, "smooth", frame_shared, trend="trend", seasonal=1, **given(model, values))
compare_given("shared error, trend + seasonal, given variances", got, model.smooth(values, cov_type='none'), model.m)
got = run_refcli(args.refcli, "smooth", frame_shared, trend="trend", seasonal=1)
compare_ml("shared error, trend + seasonal", got, model, ours_from(got, model), hbar)

# --- Borrowing strength: market and segment, covariance h^m_t (the default assumption).
Hb = np.zeros((2, 2, n))
Hb[0, 0], Hb[1, 1], Hb[0, 1], Hb[1, 0] = (np.nan_to_num(v, nan=1.0) for v in (hm, h, hm, hm))
frame_b = pd.DataFrame({"mvalue": ym, "mvariance": np.nan_to_num(hm, nan=0.0),
                        "svalue": ys, "svariance": np.nan_to_num(h, nan=0.0)})
for seasonal in (False, True):
    for irregular in ((False, True) if not seasonal else (False,)):
        name = "borrow, trend" + (" + seasonal" if seasonal else "") + (" + irregulars" if irregular else "")
        model = KnownNoise(np.column_stack([ym, ys]), Hb, True, seasonal, irregular)
        values = [true_vars[nm] for nm in model.param_names]
        opts = dict(trend="trend", seasonal=int(seasonal), irregular=int(irregular))
        got = run_refcli(args.refcli, "borrow", frame_b, **opts, **given(model, values))
        ref = model.smooth(values, cov_type='none')
        compare_given(f"{name}, given variances", got, ref, model.m)
        # The segment's level mu + gamma + delta and its variance.
        c = np.zeros(model.m)
        c[0] = 1
        c[model.m - 1] = 1
        if seasonal:
            c[2] = 1
        checks.close(f"{name}: segment level", got.level, c @ ref.smoothed_state, rel=1e-8, abs_=1e-9,
                     source="statsmodels smoothed_state")
        checks.close(f"{name}: segment level variance", got.levelvar,
                     np.einsum("i,ijt,j->t", c, ref.smoothed_state_cov, c), rel=1e-7, abs_=1e-13,
                     source="statsmodels smoothed_state_cov")
        got = run_refcli(args.refcli, "borrow", frame_b, **opts)
        compare_ml(name, got, model, ours_from(got, model), hbar)
# An explicit covariance column gives the same as the default when it holds h^m.
got_default = run_refcli(args.refcli, "borrow", frame_b, trend="trend", v_level=1e-5, v_slope=1e-7, v_deviation=1e-5)
got_cov = run_refcli(args.refcli, "borrow", frame_b.assign(cov=np.nan_to_num(hm, nan=0.0)), trend="trend",
                     v_level=1e-5, v_slope=1e-7, v_deviation=1e-5)
checks.close("borrow: explicit covariance h^m = default", got_cov.level, got_default.level, rel=1e-14, abs_=1e-15)

checks.finish()
