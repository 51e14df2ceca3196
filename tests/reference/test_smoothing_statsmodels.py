"""Structural time series smoother (native/core/structural_smoother.*) against statsmodels'
UnobservedComponents on the same series.

Reference: statsmodels.tsa.statespace.structural.UnobservedComponents (python3-statsmodels),
level="llevel" / "lltrend", seasonal=12 or none, use_exact_diffuse=True. Our smoother
initialises every state exactly diffuse (augmented Kalman filter); statsmodels' default for
UnobservedComponents is the approximate diffuse initialisation (variance 1e6, first d
log-likelihood terms dropped), so the exact diffuse one is selected to compare like with like.
UnobservedComponents has a homoskedastic irregular, so the Lintel side runs with sampling
variances 0 and an estimated irregular (option irregular=1): the two models are then the same.
statsmodels' Kalman filter switches to a steady-state gain once the predicted state variance
stops changing by more than `ssm.tolerance` (default 1e-19); on this series (variances of
order 1e-5) that switch moved its exact diffuse log-likelihood by about 1e-4 in our runs, so
the reference runs with ssm.tolerance = 0 (no switch; the plain recursions, as a hand-written
exact diffuse filter in numpy gives the same value).

(a) At the same given variances: smoothed states and their variances, filtered states and
    their variances (from statsmodels' nobs_diffuse on, where its exact diffuse filter has left
    the diffuse phase; ours are not identified before some states are), and the log-likelihood,
    to about 1e-8.
(b) Maximum likelihood: our log-likelihood at our optimum >= statsmodels' best optimum - 1e-6
    (statsmodels fitted with L-BFGS, L-BFGS polished by BFGS with gtol 1e-10, and Nelder-Mead
    followed by L-BFGS; the best is the reference: L-BFGS alone stopped up to 1e-4 short of
    the maximum on the trend models); statsmodels' loglike evaluated at our variances equals our log-likelihood
    (so the optimum is a real value of the same function); and the variances agree within
    |ours - theirs| <= 2e-3 max(ours, theirs) + 1e-6 scale (scale: the irregular variance).
    Why this tolerance: near the optimum the likelihood is flat: both optimisers stop on a
    tolerance, and a log-likelihood within 1e-8 of the maximum still leaves relative
    differences in the small variances (slope) of order 1e-4 (observed: up to 5e-5); a
    variance whose maximum is at zero comes out at 0 here and at about 1e-10 in statsmodels.

Generated data: monthly, 144 periods, seed 20260413. True log level: local linear trend,
mu_{t+1} = mu_t + beta_t + N(0, 0.006^2), beta_{t+1} = beta_t + N(0, 0.0006^2), mu_0 = 4.6,
beta_0 = 0.003; dummy seasonal of period 12 with initial pattern 0.02 sin(2 pi j / 12) and
disturbance N(0, 0.002^2); observed y_t = mu_t + gamma_t + N(0, 0.03^2); periods 10, 11, 70
and 143 (0-based) missing.
"""
import warnings

import numpy as np
import pandas as pd
import statsmodels.api as sm
from statsmodels.tools.sm_exceptions import ConvergenceWarning

from refcommon import Checks, parse_args, run_refcli

warnings.simplefilter("ignore", ConvergenceWarning)  # the best of several fits is the reference
args = parse_args()
checks = Checks("smoother vs statsmodels UnobservedComponents")

rng = np.random.default_rng(20260413)
n = 144
mu, beta = 4.6, 0.003
gamma = list(0.02 * np.sin(2 * np.pi * np.arange(11) / 12))  # gamma_t, gamma_{t-1}, ...
y = np.empty(n)
for t in range(n):
    y[t] = mu + gamma[0] + rng.normal(0, 0.03)
    mu, beta = mu + beta + rng.normal(0, 0.006), beta + rng.normal(0, 0.0006)
    gamma = [-sum(gamma[:11]) + rng.normal(0, 0.002)] + gamma[:10]
y[[10, 11, 70, 143]] = np.nan
frame = pd.DataFrame({"value": y, "variance": np.zeros(n)})


def state_columns(got, prefix, m):
    return np.array([got[f"{prefix}{i}"].to_numpy() for i in range(m)])


def lintel_options(trend, seasonal, params=None):
    o = dict(trend="trend" if trend else "level", seasonal=int(seasonal), irregular=1, freq="M")
    if params is not None:
        names = ["v_irregular", "v_level"] + (["v_slope"] if trend else []) + (["v_seasonal"] if seasonal else [])
        o.update(dict(zip(names, params)))
    return o


def lintel_params(got, trend, seasonal):
    p = [got.v_irregular[0], got.v_level[0]]
    if trend:
        p.append(got.v_slope[0])
    if seasonal:
        p.append(got.v_seasonal[0])
    return np.array(p)


for trend in (False, True):
    for seasonal in (False, True):
        name = ("local linear trend" if trend else "local level") + (" + seasonal(12)" if seasonal else "")
        kw = dict(level="lltrend" if trend else "llevel", use_exact_diffuse=True)
        if seasonal:
            kw["seasonal"] = 12
        model = sm.tsa.UnobservedComponents(y, **kw)
        model.ssm.tolerance = 0
        # (a) same given variances: irregular, level, [slope], [seasonal]
        params = np.array([0.03 ** 2, 0.006 ** 2] + ([0.0006 ** 2] if trend else []) + ([0.002 ** 2] if seasonal else []))
        ref = model.smooth(params)
        got = run_refcli(args.refcli, "smooth", frame, **lintel_options(trend, seasonal, params))
        m = ref.smoothed_state.shape[0]
        checks.close(f"{name}: log-likelihood at given variances", [got.ll[0]], [ref.llf], rel=1e-10,
                     source="statsmodels UnobservedComponents exact diffuse llf")
        checks.close(f"{name}: smoothed states", state_columns(got, "s", m), ref.smoothed_state,
                     rel=1e-8, abs_=1e-9, source="statsmodels smoothed_state")
        checks.close(f"{name}: smoothed state variances", state_columns(got, "sv", m),
                     np.array([ref.smoothed_state_cov[i, i] for i in range(m)]), rel=1e-7, abs_=1e-12,
                     source="statsmodels smoothed_state_cov")
        d = ref.nobs_diffuse
        checks.close(f"{name}: filtered states after the diffuse phase", state_columns(got, "f", m)[:, d:],
                     ref.filtered_state[:, d:], rel=1e-8, abs_=1e-9, source="statsmodels filtered_state")
        checks.close(f"{name}: filtered state variances after the diffuse phase", state_columns(got, "fv", m)[:, d:],
                     np.array([ref.filtered_state_cov[i, i] for i in range(m)])[:, d:], rel=1e-7, abs_=1e-12,
                     source="statsmodels filtered_state_cov")
        signal = got.level.to_numpy()
        ref_signal = ref.smoothed_state[0] + (ref.smoothed_state[1 + trend] if seasonal else 0)
        checks.close(f"{name}: smoothed level (trend + seasonal)", signal, ref_signal, rel=1e-8, abs_=1e-9,
                     source="statsmodels smoothed_state")
        # Real-time (filtered) values: the level as published (trend + seasonal) is observed
        # directly, so it has a value from the first period on; all the states have one once
        # the data identify every diffuse state, which is where statsmodels' exact diffuse
        # filter leaves its diffuse phase (P_inf = 0 after period nobs_diffuse - 1). With a
        # seasonal, calendar months 10 and 11 are first observed in periods 22 and 23.
        checks.true(f"{name}: real-time level from the first period on", np.isfinite(got.filtered[0]) and
                    np.all(np.isfinite(got.filtered.to_numpy()[~np.isnan(y)])))
        f = state_columns(got, "f", m)
        first_all = int(np.argmax(np.all(np.isfinite(f), axis=0)))
        checks.true(f"{name}: every state identified from period {first_all} = statsmodels' nobs_diffuse - 1",
                    first_all == ref.nobs_diffuse - 1 and np.all(np.isfinite(f[:, first_all:])),
                    f"nobs_diffuse {ref.nobs_diffuse}")

        # (b) maximum likelihood
        fits = [model.fit(method="lbfgs", maxiter=3000, disp=False)]
        fits.append(model.fit(start_params=fits[0].params, method="bfgs", maxiter=10000, gtol=1e-10, disp=False))
        nm = model.fit(method="nm", maxiter=5000, disp=False)
        fits.append(model.fit(start_params=nm.params, method="lbfgs", maxiter=3000, disp=False))
        best = max(fits, key=lambda r: r.llf)
        got = run_refcli(args.refcli, "smooth", frame, **lintel_options(trend, seasonal))
        ours = lintel_params(got, trend, seasonal)
        checks.true(f"{name}: ML log-likelihood >= statsmodels' - 1e-6", got.ll[0] >= best.llf - 1e-6,
                    f"ours {got.ll[0]:.10f}, statsmodels {best.llf:.10f} (diff {got.ll[0] - best.llf:.3g})")
        checks.close(f"{name}: statsmodels loglike at our variances", [got.ll[0]], [model.loglike(ours)], rel=1e-10,
                     source="statsmodels UnobservedComponents.loglike")
        theirs = np.asarray(best.params)
        scale = max(ours[0], theirs[0])
        tol = 2e-3 * np.maximum(ours, theirs) + 1e-6 * scale
        checks.true(f"{name}: ML variances close to statsmodels'", np.all(np.abs(ours - theirs) <= tol),
                    f"ours {np.array2string(ours, precision=6)}, statsmodels {np.array2string(theirs, precision=6)}")

checks.finish()
