"""HEDONICCOEFS / REFHOMEVALUE core on the HousePrices data of r-cran-aer (Anglin & Gencay
1996, J. Applied Econometrics 11: 546 sales of Windsor, Canada, 1987, a cross-section) against
R's lm() (run through /usr/bin/Rscript) and against Verbeek, A Guide to Modern Econometrics
(2nd ed., 2004), Table 3.1.

All sales get the same date, so the data are a single period: the period dummy is the
intercept and the fit is R's lm(log(price) ~ ...). No data are generated here.
"""
import os
import subprocess
import tempfile

import numpy as np
import pandas as pd
from scipy import stats as sps

from refcommon import Checks, parse_args, run_refcli

args = parse_args()
checks = Checks("hedonic vs R lm on HousePrices")

R_SCRIPT = r"""
suppressMessages(library(AER))
data("HousePrices", package = "AER")
out <- commandArgs(trailingOnly = TRUE)[1]
d <- HousePrices
write.csv(d, file.path(out, "houseprices.csv"), row.names = FALSE)
tab <- function(m, name) {
  s <- summary(m)
  cf <- as.data.frame(s$coefficients[, 1:3])
  names(cf) <- c("coefficient", "std_error", "t")
  cf$term <- rownames(cf)
  cf$hc1 <- sqrt(diag(sandwich::vcovHC(m, type = "HC1")))[rownames(cf)]
  write.csv(cf, file.path(out, paste0(name, "_coef.csv")), row.names = FALSE)
  st <- data.frame(r_squared = s$r.squared, adj_r_squared = s$adj.r.squared,
                   residual_se = s$sigma, df_residual = m$df.residual, n = nobs(m))
  write.csv(st, file.path(out, paste0(name, "_stat.csv")), row.names = FALSE)
  al <- names(coef(m))[is.na(coef(m))]
  write.csv(data.frame(term = al), file.path(out, paste0(name, "_aliased.csv")), row.names = FALSE)
}
# Verbeek (2004) Table 3.1.
m1 <- lm(log(price) ~ log(lotsize) + bedrooms + bathrooms + aircon, data = d)
tab(m1, "verbeek")
home <- data.frame(lotsize = 5000, bedrooms = 3, bathrooms = 2,
                   aircon = factor("yes", levels = levels(d$aircon)))
typical <- data.frame(lotsize = median(d$lotsize), bedrooms = median(d$bedrooms),
                      bathrooms = median(d$bathrooms),
                      aircon = factor(names(which.max(table(d$aircon))), levels = levels(d$aircon)))
q <- qt(0.975, m1$df.residual)
pr <- function(nd) {
  p <- predict(m1, newdata = nd, se.fit = TRUE)
  c(fit = unname(p$fit), se = unname(p$se.fit))
}
pp <- rbind(given = pr(home), typical = pr(typical))
write.csv(data.frame(which = rownames(pp), pp, smear = mean(exp(residuals(m1))),
                     lognormal = exp(summary(m1)$sigma^2 / 2), q = q,
                     lotsize = typical$lotsize, bedrooms = typical$bedrooms,
                     bathrooms = typical$bathrooms),
          file.path(out, "verbeek_pred.csv"), row.names = FALSE)
# All eleven characteristics; each yes/no factor and factor(stories) with its most frequent
# level as the reference (the rule of the core).
mf <- function(f) relevel(factor(f), ref = names(which.max(table(f))))
e <- d
for (v in c("driveway", "recreation", "fullbase", "gasheat", "aircon", "prefer")) e[[v]] <- mf(e[[v]])
e$stories <- mf(e$stories)
m2 <- lm(log(price) ~ log(lotsize) + bedrooms + bathrooms + stories + driveway + recreation +
           fullbase + gasheat + aircon + garage + prefer, data = e)
tab(m2, "full")
# Aliased terms: rooms = bedrooms + bathrooms, and a constant column.
d$rooms <- d$bedrooms + d$bathrooms
d$one <- 7
m3 <- lm(log(price) ~ log(lotsize) + bedrooms + bathrooms + rooms + one + aircon, data = d)
tab(m3, "aliased")
"""

tmp = tempfile.mkdtemp()
script = os.path.join(tmp, "export.R")
with open(script, "w") as f:
    f.write(R_SCRIPT)
r = subprocess.run(["/usr/bin/Rscript", script, tmp], capture_output=True, text=True)
if r.returncode != 0:
    raise RuntimeError("Rscript failed: " + r.stderr)


def rcsv(name):
    return pd.read_csv(os.path.join(tmp, name), keep_default_na=False, na_values=["NA"])


hp = rcsv("houseprices.csv")
hp.insert(0, "date", 31900.0)  # 1987-05-03: one month for every sale
yes_no = ["driveway", "recreation", "fullbase", "gasheat", "aircon", "prefer"]


def core_terms(out):
    return out[out.kind.isin(["intercept", "characteristic", "period"])].reset_index(drop=True)


def r_name(term):
    """Our term names -> R's: aircon=yes -> airconyes, stories=2 -> stories2."""
    if "=" in term:
        a, b = term.split("=", 1)
        return a + b
    return term


def compare(label, got, coef, stat, hc1=None):
    terms = core_terms(got)
    names = [r_name(t) for t in terms.term]
    coef = coef.set_index("term")
    checks.true(f"{label}: same terms as R", sorted(names) == sorted(coef.index), f"{names}")
    c = coef.loc[names]
    checks.close(f"{label}: coefficients", terms.coefficient, c.coefficient, source="R lm()")
    se = c.hc1 if hc1 else c.std_error
    checks.close(f"{label}: std errors{' (HC1)' if hc1 else ''}", terms.std_error, se,
                 source="R sandwich::vcovHC(type='HC1')" if hc1 else "R summary.lm()")
    checks.close(f"{label}: t values", terms.t, c.coefficient / se, source="R")
    s = got[got.kind == "stat"].set_index("term").coefficient
    checks.close(f"{label}: R^2, adj R^2, s, df, n",
                 [s.r_squared, s.adj_r_squared, s.residual_se, s.df_residual, s.observations],
                 stat.iloc[0][["r_squared", "adj_r_squared", "residual_se", "df_residual", "n"]].astype(float),
                 source="R summary.lm()")


# ---- Verbeek's Table 3.1 model --------------------------------------------------------
v_in = hp[["date", "price", "lotsize", "bedrooms", "bathrooms", "aircon"]]
got = run_refcli(args.refcli, "hedonic_coefs", v_in, log=1)
compare("Verbeek model", got, rcsv("verbeek_coef.csv"), rcsv("verbeek_stat.csv"))
got_hc = run_refcli(args.refcli, "hedonic_coefs", v_in, log=1, se="hc1")
compare("Verbeek model HC1", got_hc, rcsv("verbeek_coef.csv"), rcsv("verbeek_stat.csv"), hc1=True)

# Verbeek (2004), Table 3.1, figures from memory (../shared/notes/methods.md): coefficients
# (standard errors) to 3 decimals, s to 4, R^2 to 4. Checked to half a unit of the last digit.
terms = core_terms(got)
checks.close("Verbeek Table 3.1 coefficients (from memory)", terms.coefficient,
             [7.094, 0.400, 0.078, 0.216, 0.212], rel=0, abs_=0.0005, source="Verbeek 2004 Table 3.1")
checks.close("Verbeek Table 3.1 standard errors (from memory)", terms.std_error,
             [0.232, 0.028, 0.015, 0.023, 0.024], rel=0, abs_=0.0005 + 1e-12, source="Verbeek 2004 Table 3.1")
s = got[got.kind == "stat"].set_index("term").coefficient
checks.close("Verbeek Table 3.1 s and R^2 (from memory)", [s.residual_se, s.r_squared], [0.2456, 0.5674],
             rel=0, abs_=0.00005, source="Verbeek 2004 Table 3.1")
checks.true("single period: no period terms, intercept = the one period's level",
            (got.kind == "period").sum() == 0 and (got.kind == "intercept").sum() == 1)

# ---- all eleven characteristics: text yes/no columns and categorical stories -----------
full_in = hp[["date", "price", "lotsize", "bedrooms", "bathrooms", "stories"] + yes_no[:4]
             + ["aircon", "garage", "prefer"]]
got = run_refcli(args.refcli, "hedonic_coefs", full_in, log=1, categorical=4)
compare("full model (categorical stories, text yes/no)", got, rcsv("full_coef.csv"), rcsv("full_stat.csv"))
got = run_refcli(args.refcli, "hedonic_coefs", full_in, log=1, categorical=4, se="hc1")
compare("full model HC1", got, rcsv("full_coef.csv"), rcsv("full_stat.csv"), hc1=True)

# ---- aliased terms, as R reports them (NA coefficients) ---------------------------------
a_in = v_in.copy()
a_in.insert(5, "rooms", hp.bedrooms + hp.bathrooms)
a_in.insert(6, "one", 7.0)
got = run_refcli(args.refcli, "hedonic_coefs", a_in, log=1)
aliased = rcsv("aliased_aliased.csv").term.tolist()
dropped = got[got.kind == "dropped"]
checks.true("aliased: dropped terms are R's NA coefficients", sorted(dropped.term) == sorted(aliased),
            f"core {list(dropped.term)} ({list(dropped.note)}), R {aliased}")
rc = rcsv("aliased_coef.csv")
compare("aliased model (rest of the fit)", got, rc, rcsv("aliased_stat.csv"))

# ---- reference home: given and typical, both retransformations ---------------------------
pred = rcsv("verbeek_pred.csv").set_index("which")
for which, home in [("given", "5000|3|2|yes"), ("typical", "")]:
    for rt in ["smearing", "lognormal"]:
        with tempfile.TemporaryDirectory() as d:
            hout = os.path.join(d, "home.csv")
            got = run_refcli(args.refcli, "hedonic_home", v_in, log=1, home=home, retransform=rt, homeout=hout)
            used = pd.read_csv(hout, keep_default_na=False)
        p = pred.loc[which]
        f = p.smear if rt == "smearing" else p.lognormal
        want = f * np.exp([p.fit, p.fit - p.q * p.se, p.fit + p.q * p.se])
        checks.close(f"home {which}, {rt}: value, lower, upper", got[["value", "lower", "upper"]].values[0], want,
                     source=f"R predict.lm(se.fit=TRUE) x {'mean(exp(residuals))' if rt == 'smearing' else 'exp(sigma^2/2)'}")
        factor = float(used[used.column == "#factor"].number.iloc[0])
        checks.close(f"home {which}, {rt}: factor", factor, f, source="R")
        if which == "typical":
            u = used[used.column != "#factor"].set_index("column")
            checks.close("typical home: medians of the numeric columns",
                         u.loc[["lotsize", "bedrooms", "bathrooms"], "number"].astype(float),
                         [p.lotsize, p.bedrooms, p.bathrooms], rel=0, source="R median()")
            checks.true("typical home: most frequent aircon level", u.loc["aircon", "level"] == "no"
                        and u.typical.astype(int).eq(1).all(), "R which.max(table())")

checks.finish()
