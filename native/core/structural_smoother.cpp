#include "structural_smoother.hpp"

#include <algorithm>
#include <cctype>
#include <cmath>
#include <limits>

#include <boost/math/distributions/normal.hpp>
#include <fmt/format.h>
#include <nlopt.h>

#include "state_space.hpp"

namespace lintel {

namespace {

using Eigen::Index;
using Eigen::MatrixXd;
using Eigen::VectorXd;
using statespace::Transition;

std::size_t at(int i) { return static_cast<std::size_t>(i); }

// Where each component sits in the state vector. State order: level, slope, seasonal
// (s - 1 states), deviation; series 0 is the target (or the market), series 1 the segment.
struct Layout {
    int states = 0;
    int level = 0;
    int slope = -1;
    int seasonal = -1;
    int season = 0;
    int deviation = -1;
    int series = 1;
};

Layout layoutFor(const SmootherOptions& o, bool borrow) {
    Layout L;
    int next = 1;
    if (o.trend == TrendKind::Trend) L.slope = next++;
    L.season = o.seasonLength();
    if (L.season > 0) {
        L.seasonal = next;
        next += L.season - 1;
    }
    if (borrow) {
        L.deviation = next++;
        L.series = 2;
    }
    L.states = next;
    return L;
}

std::string modelText(const Layout& L) {
    std::string s = L.slope >= 0 ? "local linear trend" : "local level";
    if (L.season > 0) s += fmt::format(" + seasonal ({})", L.season);
    if (L.deviation >= 0) s += " + segment deviation";
    return s;
}

statespace::Model buildModel(const Layout& L, const SmootherVariances& v) {
    statespace::Model M;
    M.states = L.states;
    auto add = [&](int r, int c, double x) { M.transition.push_back({r, c, x}); };
    add(L.level, L.level, 1);
    if (L.slope >= 0) {
        add(L.level, L.slope, 1);
        add(L.slope, L.slope, 1);
    }
    if (L.season > 0) {
        for (int j = 0; j < L.season - 1; ++j) add(L.seasonal, L.seasonal + j, -1);
        for (int j = 1; j < L.season - 1; ++j) add(L.seasonal + j, L.seasonal + j - 1, 1);
    }
    if (L.deviation >= 0) add(L.deviation, L.deviation, 1);
    M.design = MatrixXd::Zero(L.series, L.states);
    M.disturbance = VectorXd::Zero(L.states);
    M.irregular = VectorXd::Zero(L.series);
    for (int i = 0; i < L.series; ++i) {
        M.design(i, L.level) = 1;
        if (L.season > 0) M.design(i, L.seasonal) = 1;
    }
    if (L.deviation >= 0) M.design(1, L.deviation) = 1;
    auto var = [](double x) { return hasValue(x) ? x : 0.0; };
    M.disturbance(L.level) = var(v.level);
    if (L.slope >= 0) M.disturbance(L.slope) = var(v.slope);
    if (L.season > 0) M.disturbance(L.seasonal) = var(v.seasonal);
    if (L.deviation >= 0) M.disturbance(L.deviation) = var(v.deviation);
    M.irregular(0) = var(v.irregular);
    if (L.series > 1) M.irregular(1) = var(v.irregularSegment);
    return M;
}

// The variances a model has, with their names as the warnings use them.
struct Slot {
    double SmootherVariances::*field;
    const char* name;
};

std::vector<Slot> slotsFor(const Layout& L, bool irregular) {
    std::vector<Slot> s{{&SmootherVariances::level, "level"}};
    if (L.slope >= 0) s.push_back({&SmootherVariances::slope, "slope"});
    if (L.season > 0) s.push_back({&SmootherVariances::seasonal, "seasonal"});
    if (L.deviation >= 0) s.push_back({&SmootherVariances::deviation, "segment deviation"});
    if (irregular) {
        s.push_back({&SmootherVariances::irregular, L.series > 1 ? "market irregular" : "irregular"});
        if (L.series > 1) s.push_back({&SmootherVariances::irregularSegment, "segment irregular"});
    }
    return s;
}

// Checks one series of period effects and copies it into column `col` of the observations.
void loadSeries(const PeriodEffects& in, const char* what, int col, bool irregular,
                statespace::Observations& obs) {
    const std::size_t n = static_cast<std::size_t>(obs.y.rows());
    if (in.value.size() != n || in.variance.size() != n)
        throw InputError(fmt::format("{}: {} period effects but {} variances (and {} periods)",
                                     what, in.value.size(), in.variance.size(), n));
    for (std::size_t t = 0; t < n; ++t) {
        const double y = in.value[t], h = in.variance[t];
        if (!hasValue(y)) continue;
        if (!std::isfinite(h) || h < 0)
            throw InputError(fmt::format("{}: period {} has a period effect but no usable "
                                         "sampling variance ({})", what, t + 1, h));
        if (h == 0 && !irregular)
            throw InputError(fmt::format("{}: period {} has a sampling variance of 0; give its "
                                         "variance or estimate an irregular", what, t + 1));
        obs.y(Index(t), col) = y;
        obs.variance(Index(t), col) = h;
    }
}

struct Problem {
    Layout layout;
    statespace::Observations obs;
    std::vector<Slot> slots;
    int diffuse = 0;        // diffuse initial states
    int observations = 0;   // observed values over all series
    double scale = 1;       // typical measurement variance: the grid's and bounds' unit
};

// Shared factor loadings of one or two series, stacked as the engine wants them.
void loadShared(const std::vector<const PeriodEffects*>& series, statespace::Observations& obs) {
    const Index n = obs.y.rows(), p = static_cast<Index>(series.size());
    Index k = 0;
    for (const PeriodEffects* s : series) {
        if (s->loadings.size() == 0 && s->sharedCov.size() == 0) continue;
        if (s->loadings.rows() != n || s->sharedCov.rows() != s->loadings.cols() ||
            s->sharedCov.cols() != s->loadings.cols())
            throw InputError(fmt::format("the shared sampling error needs {} rows of loadings and "
                                         "a square covariance of their width", n));
        if (!s->loadings.allFinite() || !s->sharedCov.allFinite())
            throw InputError("the shared sampling error has a blank or non-numeric entry");
        k += s->loadings.cols();
    }
    if (k == 0) return;
    obs.loadings = MatrixXd::Zero(n * p, k);
    obs.factorCov = MatrixXd::Zero(k, k);
    Index off = 0;
    for (Index i = 0; i < p; ++i) {
        const PeriodEffects& s = *series[at(static_cast<int>(i))];
        const Index w = s.loadings.cols();
        if (w == 0) continue;
        for (Index t = 0; t < n; ++t) obs.loadings.block(t * p + i, off, 1, w) = s.loadings.row(t);
        obs.factorCov.block(off, off, w, w) = 0.5 * (s.sharedCov + s.sharedCov.transpose());
        off += w;
    }
    Eigen::LLT<MatrixXd> llt(obs.factorCov);
    if (llt.info() == Eigen::Success) return;
    // Positive semi-definite (e.g. zero rows for terms the hedonic fit dropped): write
    // X Sigma X' = (X U L^1/2)(X U L^1/2)' over the eigenvalues L above rounding, with an
    // identity covariance for the remaining factors. A clearly negative eigenvalue is an error.
    Eigen::SelfAdjointEigenSolver<MatrixXd> es(obs.factorCov);
    const VectorXd& ev = es.eigenvalues();
    const double top = std::max(ev.maxCoeff(), 0.0);
    if (!(top > 0) || ev.minCoeff() < -1e-10 * top)
        throw InputError("the covariance of the shared sampling error is not positive semi-definite");
    std::vector<Index> keep;
    for (Index i = 0; i < ev.size(); ++i)
        if (ev(i) > 1e-12 * top) keep.push_back(i);
    MatrixXd B(obs.factorCov.rows(), static_cast<Index>(keep.size()));
    for (std::size_t j = 0; j < keep.size(); ++j)
        B.col(static_cast<Index>(j)) = es.eigenvectors().col(keep[j]) * std::sqrt(ev(keep[j]));
    obs.loadings = obs.loadings * B;
    obs.factorCov = MatrixXd::Identity(B.cols(), B.cols());
}

void finishProblem(Problem& pr, const SmootherOptions& o) {
    pr.slots = slotsFor(pr.layout, o.irregular);
    pr.diffuse = pr.layout.states;
    double hsum = 0;
    int hn = 0;
    for (Index t = 0; t < pr.obs.y.rows(); ++t)
        for (Index i = 0; i < pr.obs.y.cols(); ++i)
            if (std::isfinite(pr.obs.y(t, i))) {
                ++pr.observations;
                hsum += pr.obs.variance(t, i);
                ++hn;
            }
    if (pr.observations == 0) throw InputError("no period has a period effect to smooth");
    pr.scale = hn > 0 ? hsum / hn : 0;
    if (!(pr.scale > 0)) {
        // No sampling variances (all 0, irregular on): half the mean squared change between
        // consecutive observed values of the first series.
        double ss = 0;
        int nn = 0;
        double prev = kNoValue;
        for (Index t = 0; t < pr.obs.y.rows(); ++t) {
            const double y = pr.obs.y(t, 0);
            if (!std::isfinite(y)) continue;
            if (hasValue(prev)) {
                ss += (y - prev) * (y - prev);
                ++nn;
            }
            prev = y;
        }
        pr.scale = nn > 0 ? ss / (2.0 * nn) : 0;
        if (!(pr.scale > 0)) pr.scale = 1e-8;
    }
}

// The optimiser works on the standard deviations relative to the scale, x = sqrt(var / scale),
// within [0, 1000]. Not on log variances: a variance whose maximum is at zero (common: a
// fixed slope or seasonal, no irregular) lies at minus infinity there, and a bounded search
// crawls towards it for hundreds of evaluations; in x the likelihood is smooth and flat at 0
// (as in statsmodels, which optimises square roots of variances too). A variance below 1e-6
// of the scale (x < 1e-3) is reported as zero (at the boundary).
constexpr double kUpperX = 1000, kZeroX = 1e-3;

struct Objective {
    const Problem* pr;
    int evaluations = 0;
    double best = -std::numeric_limits<double>::infinity();
    std::vector<double> bestX;
};

SmootherVariances variancesAt(const Problem& pr, const double* x) {
    SmootherVariances v;
    for (std::size_t j = 0; j < pr.slots.size(); ++j) v.*(pr.slots[j].field) = pr.scale * x[j] * x[j];
    return v;
}

double evaluate(const Problem& pr, const SmootherVariances& v) {
    double ll = 0;
    statespace::logLikelihood(buildModel(pr.layout, v), pr.obs, ll);
    return std::isfinite(ll) ? ll : -1e300;
}

double nloptObjective(unsigned n, const double* x, double* grad, void* data) {
    (void)grad;  // derivative-free
    auto* ob = static_cast<Objective*>(data);
    ++ob->evaluations;
    const double ll = evaluate(*ob->pr, variancesAt(*ob->pr, x));
    if (ll > ob->best) {
        ob->best = ll;
        ob->bestX.assign(x, x + n);
    }
    return ll;
}

// Maximum likelihood: the best point of a small grid, then BOBYQA (Powell's bounded
// quadratic-model method, NLopt) restarted from its optimum until it stops gaining.
struct Fit {
    SmootherVariances variances;
    int evaluations = 0;
    bool converged = true;
    std::vector<std::string> atBound;
};

Fit maximiseLikelihood(const Problem& pr, int maxEvaluations) {
    const unsigned p = static_cast<unsigned>(pr.slots.size());
    Objective ob{&pr, 0, -std::numeric_limits<double>::infinity(), {}};
    // Grid: each standard deviation at a few multiples of sqrt(scale), all combinations (three
    // levels up to four variances, two beyond).
    const std::vector<double> levels = p <= 4 ? std::vector<double>{0.01, 0.1, 1}
                                              : std::vector<double>{0.03, 0.3};
    std::vector<double> x(p);
    std::vector<std::size_t> idx(p, 0);
    for (;;) {
        for (unsigned j = 0; j < p; ++j) x[j] = levels[idx[j]];
        nloptObjective(p, x.data(), nullptr, &ob);
        unsigned j = 0;
        while (j < p && ++idx[j] == levels.size()) idx[j++] = 0;
        if (j == p) break;
    }
    if (!std::isfinite(ob.best) || ob.best <= -1e299)
        throw InputError("the model's likelihood cannot be computed for these period effects");

    Fit fit;
    nlopt_opt opt = nlopt_create(NLOPT_LN_BOBYQA, p);
    if (!opt) throw InputError("the optimiser could not be started");
    struct Guard {
        nlopt_opt o;
        ~Guard() { nlopt_destroy(o); }
    } guard{opt};
    std::vector<double> lb(p, 0.0), ub(p, kUpperX), step(p);
    nlopt_set_lower_bounds(opt, lb.data());
    nlopt_set_upper_bounds(opt, ub.data());
    nlopt_set_max_objective(opt, nloptObjective, &ob);
    nlopt_set_xtol_abs1(opt, 1e-6);
    nlopt_set_ftol_abs(opt, 1e-9);
    double previous = ob.best;
    for (int round = 0; round < 4; ++round) {
        x = ob.bestX;
        // NLopt scales BOBYQA's trust region by these steps: half of each start value.
        for (unsigned j = 0; j < p; ++j) step[j] = std::max(0.5 * x[j], 0.005);
        nlopt_set_initial_step(opt, step.data());
        const int left = maxEvaluations - ob.evaluations;
        if (left <= 0) {
            fit.converged = false;
            break;
        }
        nlopt_set_maxeval(opt, left);
        double f = 0;
        const nlopt_result res = nlopt_optimize(opt, x.data(), &f);
        if (res == NLOPT_MAXEVAL_REACHED) {
            fit.converged = false;
            break;
        }
        if (res < 0 && res != NLOPT_ROUNDOFF_LIMITED) fit.converged = false;
        if (round > 0 && ob.best - previous < 1e-7) break;
        previous = ob.best;
    }
    // A standard deviation the optimiser left just above zero: take exactly zero when that
    // does not lower the likelihood.
    for (unsigned j = 0; j < p; ++j) {
        if (ob.bestX[j] >= kZeroX || ob.bestX[j] == 0) continue;
        x = ob.bestX;
        x[j] = 0;
        nloptObjective(p, x.data(), nullptr, &ob);
    }
    fit.evaluations = ob.evaluations;
    fit.variances = variancesAt(pr, ob.bestX.data());
    for (unsigned j = 0; j < p; ++j) {
        if (ob.bestX[j] < kZeroX) fit.atBound.push_back(pr.slots[j].name);
        else if (ob.bestX[j] > 0.99 * kUpperX)
            fit.atBound.push_back(std::string(pr.slots[j].name) + " (upper)");
    }
    return fit;
}

std::string boundaryText(const std::string& name, const Layout& L) {
    if (name.size() > 8 && name.compare(name.size() - 8, 8, " (upper)") == 0)
        return fmt::format("the {} variance reached the upper limit of the search: the "
                           "smoothed index follows the period effects almost unsmoothed",
                           name.substr(0, name.size() - 8));
    if (name == "level")
        return L.slope >= 0 ? "the level variance is estimated at zero: all movement of the "
                              "index goes through its slope (a smooth trend)"
                            : "the level variance is estimated at zero: the smoothed index is "
                              "flat (no movement stands out from the sampling noise)";
    if (name == "slope") return "the slope variance is estimated at zero: the trend's slope is "
                                "the same over the whole period";
    if (name == "seasonal") return "the seasonal variance is estimated at zero: the seasonal "
                                   "pattern is the same every year";
    if (name == "segment deviation") return "the segment deviation variance is estimated at "
                                            "zero: the segment keeps a constant distance to "
                                            "the market";
    return fmt::format("the {} variance is estimated at zero: the sampling variances explain "
                       "the noise", name);
}

// The variances: given, or by maximum likelihood with the boundary warnings.
void chooseVariances(const Problem& pr, const SmootherOptions& o, SmootherResult& r) {
    if (o.variances) {
        r.variances = *o.variances;
        r.estimated = false;
    } else {
        const Fit fit = maximiseLikelihood(pr, o.maxEvaluations);
        r.variances = fit.variances;
        r.estimated = true;
        r.evaluations = fit.evaluations;
        for (const std::string& name : fit.atBound) {
            r.boundary = true;
            r.diag.warn(boundaryText(name, pr.layout));
        }
        if (!fit.converged)
            r.diag.warn(fmt::format("the optimiser stopped after {} likelihood evaluations "
                                    "without converging: the variances may not be the best",
                                    fit.evaluations));
    }
    // Keep only the variances the model has (given ones may carry extra entries).
    SmootherVariances kept;
    for (const Slot& s : slotsFor(pr.layout, o.irregular)) kept.*(s.field) = r.variances.*(s.field);
    r.variances = kept;
}

// Levels, components and the signal-to-noise ratio from the final run.
void readRun(const Problem& pr, const statespace::Model& M, SmootherResult& r) {
    const int target = pr.layout.series - 1;
    r.signal = M.design.row(target).transpose();
    const statespace::Moments sm = r.run->smoothed(r.signal);
    r.level = sm.mean;
    r.levelVariance = sm.variance;
    const statespace::Moments fm = r.run->filtered(r.signal);
    r.filtered = fm.mean;
    r.filteredVariance = fm.variance;
    auto component = [&](int state) {
        VectorXd e = VectorXd::Zero(pr.layout.states);
        e(state) = 1;
        return r.run->smoothed(e).mean;
    };
    r.trend = component(pr.layout.level);
    if (pr.layout.slope >= 0) r.slope = component(pr.layout.slope);
    if (pr.layout.seasonal >= 0) r.seasonal = component(pr.layout.seasonal);
    if (pr.layout.deviation >= 0) r.deviation = component(pr.layout.deviation);
    for (auto* v : {&r.levelVariance, &r.filteredVariance})
        for (double& x : *v)
            if (hasValue(x)) x = std::max(x, 0.0);

    double hsum = 0;
    int hn = 0;
    const double irr = target == 0 ? r.variances.irregular : r.variances.irregularSegment;
    for (Index t = 0; t < pr.obs.y.rows(); ++t)
        if (std::isfinite(pr.obs.y(t, target))) {
            hsum += pr.obs.variance(t, target) + (hasValue(irr) ? irr : 0.0);
            ++hn;
        }
    if (hn > 0) r.noiseVariance = hsum / hn;
    const double signal = r.variances.level + (hasValue(r.variances.slope) ? r.variances.slope : 0.0);
    if (hasValue(r.noiseVariance) && r.noiseVariance > 0) r.signalToNoise = signal / r.noiseVariance;
}

SmootherResult solve(const Problem& pr, const SmootherOptions& o) {
    const int n = static_cast<int>(pr.obs.y.rows());
    const int needed = pr.diffuse + static_cast<int>(pr.slots.size());
    if (!o.variances && pr.observations < needed)
        throw InputError(fmt::format(
            "a {} needs at least {} period effects to estimate its variances; the data have {}",
            modelText(pr.layout), needed, pr.observations));

    SmootherResult r;
    r.periods = n;
    r.model = modelText(pr.layout);
    r.realtime = o.realtime;
    r.diag.rowsIn = at(n);
    for (Index t = 0; t < pr.obs.y.rows(); ++t)
        if (std::isfinite(pr.obs.y(t, pr.layout.series - 1))) ++r.diag.rowsUsed;
    chooseVariances(pr, o, r);

    const statespace::Model M = buildModel(pr.layout, r.variances);
    r.run = statespace::Run::run(M, pr.obs);
    switch (r.run->failure()) {
        case statespace::Failure::None: break;
        case statespace::Failure::NotPositive:
            throw InputError("the smoothing model cannot be computed: a measurement variance is "
                             "zero (give sampling variances or estimate an irregular)");
        case statespace::Failure::NotIdentified:
            throw InputError(fmt::format("too few period effects for a {} ({} values, at least "
                                         "{} needed)", r.model, pr.observations, pr.diffuse));
    }
    r.logLikelihood = r.run->logLikelihood();
    readRun(pr, M, r);
    return r;
}

void checkGiven(const SmootherOptions& o, const Layout& L) {
    if (!o.variances) return;
    for (const Slot& s : slotsFor(L, o.irregular)) {
        const double v = (*o.variances).*(s.field);
        if (!std::isfinite(v) || v < 0)
            throw InputError(fmt::format("the given {} variance must be a number >= 0", s.name));
    }
}

std::string lower(std::string s) {
    for (char& c : s) c = static_cast<char>(std::tolower(static_cast<unsigned char>(c)));
    return s;
}

}  // namespace

std::optional<TrendKind> parseTrendKind(const std::string& text) {
    const std::string t = lower(text);
    if (t == "level") return TrendKind::Level;
    if (t == "trend") return TrendKind::Trend;
    return std::nullopt;
}

const char* trendKindCode(TrendKind k) { return k == TrendKind::Level ? "level" : "trend"; }

int SmootherOptions::seasonLength() const {
    if (!seasonal) return 0;
    if (seasonPeriods) return *seasonPeriods;
    return freq == Frequency::Month ? 12 : freq == Frequency::Quarter ? 4 : 0;
}

void SmootherOptions::validate() const {
    if (seasonal) {
        if (seasonPeriods) {
            if (*seasonPeriods < 2 || *seasonPeriods > 53)
                throw InputError(fmt::format("the season length must lie between 2 and 53, got {}",
                                             *seasonPeriods));
        } else if (freq == Frequency::Year) {
            throw InputError("seasonal needs monthly or quarterly periods (freq M or Q)");
        }
    }
    if (maxEvaluations < 10)
        throw InputError(fmt::format("the optimiser needs at least 10 evaluations, got {}",
                                     maxEvaluations));
}

std::string SmootherResult::summary() const {
    auto show = [](const char* name, double v) -> std::string {
        if (!hasValue(v)) return "";
        return fmt::format("; {} {:.3g}", name, v);
    };
    std::string s = model;
    s += show("level var", variances.level) + show("slope var", variances.slope) +
         show("seasonal var", variances.seasonal) + show("deviation var", variances.deviation) +
         show("irregular var", variances.irregular) +
         show("segment irregular var", variances.irregularSegment);
    s += fmt::format("; q {:.3g}; log-likelihood {:.6g}", signalToNoise, logLikelihood);
    s += estimated ? fmt::format(" (maximum likelihood, {} evaluations)", evaluations)
                   : std::string(" (given variances)");
    return s;
}

std::vector<double> SmootherResult::levelCovarianceWith(int base) const {
    if (!run || base < 0 || base >= periods)
        throw InputError(fmt::format("base position {} outside the {} periods", base, periods));
    return run->smoothedCovarianceWith(signal, base);
}

SmootherResult smoothPeriodEffects(const PeriodEffects& in, const SmootherOptions& o) {
    o.validate();
    Problem pr;
    pr.layout = layoutFor(o, false);
    checkGiven(o, pr.layout);
    const Index n = static_cast<Index>(in.value.size());
    if (n == 0) throw InputError("no periods to smooth");
    pr.obs.y = MatrixXd::Constant(n, 1, kNoValue);
    pr.obs.variance = MatrixXd::Zero(n, 1);
    loadSeries(in, "period effects", 0, o.irregular, pr.obs);
    loadShared({&in}, pr.obs);
    finishProblem(pr, o);
    return solve(pr, o);
}

SmootherResult borrowStrength(const BorrowInput& in, const SmootherOptions& o) {
    o.validate();
    Problem pr;
    pr.layout = layoutFor(o, true);
    checkGiven(o, pr.layout);
    const Index n = static_cast<Index>(in.market.value.size());
    if (n == 0) throw InputError("no periods to smooth");
    pr.obs.y = MatrixXd::Constant(n, 2, kNoValue);
    pr.obs.variance = MatrixXd::Zero(n, 2);
    loadSeries(in.market, "market period effects", 0, o.irregular, pr.obs);
    loadSeries(in.segment, "segment period effects", 1, o.irregular, pr.obs);
    pr.obs.covariance = VectorXd::Zero(n);
    if (!in.covariance.empty() && in.covariance.size() != static_cast<std::size_t>(n))
        throw InputError(fmt::format("{} covariances for {} periods", in.covariance.size(), n));
    for (Index t = 0; t < n; ++t) {
        if (!std::isfinite(pr.obs.y(t, 0)) || !std::isfinite(pr.obs.y(t, 1))) continue;
        const double hm = pr.obs.variance(t, 0), hs = pr.obs.variance(t, 1);
        const double cap = 0.99 * std::sqrt(hm * hs);
        double c = in.covariance.empty() ? std::min(hm, cap) : in.covariance[at(static_cast<int>(t))];
        if (!std::isfinite(c))
            throw InputError(fmt::format("period {}: the covariance is blank or not a number", t + 1));
        if (c * c >= hm * hs && !o.irregular)
            throw InputError(fmt::format("period {}: the covariance {} implies a correlation of 1 "
                                         "or more", t + 1, c));
        pr.obs.covariance(t) = c;
    }
    if (in.market.loadings.size() || in.segment.loadings.size())
        loadShared({&in.market, &in.segment}, pr.obs);
    finishProblem(pr, o);
    int segmentValues = 0;
    for (Index t = 0; t < n; ++t) segmentValues += std::isfinite(pr.obs.y(t, 1)) ? 1 : 0;
    if (segmentValues == 0) throw InputError("the segment has no period effect");
    return solve(pr, o);
}

IndexResult smoothedIndex(const SmootherResult& r, const PeriodAxis& axis,
                          const std::vector<std::size_t>& counts, const IndexOptions& o) {
    o.validate();
    if (axis.count != r.periods || counts.size() != at(r.periods))
        throw InputError(fmt::format("the smoothed series has {} periods, the axis {} and the "
                                     "counts {}", r.periods, axis.count, counts.size()));
    const std::vector<double>& L = r.realtime ? r.filtered : r.level;
    IndexResult out;
    out.diag = r.diag;
    IndexTable& t = out.table;
    t.axis = axis;
    t.count = counts;
    if (r.realtime && o.baseDate) {
        const int want = axis.positionOf(*o.baseDate);
        if (want >= 0 && !hasValue(L[at(want)]))
            throw InputError(fmt::format("the base period {} has no real-time value: the model "
                                         "needs more periods with sales before it",
                                         axis.label(want)));
    }
    const int b = resolveBase(axis, L, o);
    t.basePosition = b;
    const double z =
        boost::math::quantile(boost::math::normal_distribution<double>(), 0.5 + 0.5 * o.level);
    std::vector<double> var(at(r.periods), kNoValue);
    if (r.realtime) {
        const std::vector<double> cov = r.run->filteredCovarianceWith(r.signal, b);
        for (int i = 0; i < r.periods; ++i)
            if (hasValue(r.filteredVariance[at(i)]) && hasValue(cov[at(i)]))
                var[at(i)] = std::max(0.0, r.filteredVariance[at(i)] + r.filteredVariance[at(b)] -
                                               2 * cov[at(i)]);
        var[at(b)] = 0;
    } else {
        const std::vector<double> cov = r.levelCovarianceWith(b);
        for (int i = 0; i < r.periods; ++i)
            var[at(i)] = std::max(0.0, r.levelVariance[at(i)] + r.levelVariance[at(b)] - 2 * cov[at(i)]);
        var[at(b)] = 0;
    }
    t.index.assign(at(r.periods), kNoValue);
    t.lower.assign(at(r.periods), kNoValue);
    t.upper.assign(at(r.periods), kNoValue);
    for (int i = 0; i < r.periods; ++i) {
        if (!hasValue(L[at(i)])) continue;
        const double d = L[at(i)] - L[at(b)];
        t.index[at(i)] = 100.0 * std::exp(d);
        if (hasValue(var[at(i)])) {
            const double sd = std::sqrt(var[at(i)]);
            t.lower[at(i)] = 100.0 * std::exp(d - z * sd);
            t.upper[at(i)] = 100.0 * std::exp(d + z * sd);
        }
    }
    return out;
}

}  // namespace lintel
