#include "index_analytics.hpp"

#include <algorithm>
#include <cmath>

#include <fmt/format.h>

#include "hodrick_prescott.hpp"
#include "statistics.hpp"

namespace lintel {

namespace analytics {

void countValues(const std::vector<double>& index, bool positiveOnly, Diagnostics& d) {
    d.rowsIn = index.size();
    std::size_t blank = 0, nonPos = 0;
    for (double v : index) {
        if (!hasValue(v)) ++blank;
        else if (positiveOnly && v <= 0) ++nonPos;
    }
    d.rowsUsed = index.size() - blank - nonPos;
    d.drop(DropReason::BlankValue, blank);
    d.drop(DropReason::NonPositiveValue, nonPos);
}

std::string nonPositiveNote(const std::vector<double>& index) {
    for (std::size_t t = 0; t < index.size(); ++t)
        if (hasValue(index[t]) && index[t] <= 0)
            return fmt::format(" (a value of 0 or less has no log change: row {} holds {})", t + 1,
                               index[t]);
    return {};
}

std::vector<double> logChanges(const std::vector<double>& index, int lag) {
    std::vector<double> out(index.size(), kNoValue);
    if (lag < 1) return out;
    for (std::size_t t = static_cast<std::size_t>(lag); t < index.size(); ++t) {
        const double a = index[t - lag], b = index[t];
        if (hasValue(a) && hasValue(b) && a > 0 && b > 0) out[t] = 100.0 * stats::logRatio(b, a);
    }
    return out;
}

}  // namespace analytics

double snrLambda(Frequency f) {
    const double pi = 3.14159265358979323846;
    const double w = 2 * pi / (2.0 * periodsPerYear(f));
    const double g = 1 - std::cos(w);
    return 1.0 / (4 * g * g);
}

void VolatilityOptions::validate() const {
    if (lag < 1) throw InputError(fmt::format("lag must be 1 or more, got {}", lag));
}

void SnrOptions::validate() const { validateLambda(lambda); }

VolatilityResult indexVolatility(const std::vector<double>& index, const VolatilityOptions& o) {
    o.validate();
    VolatilityResult r;
    analytics::countValues(index, true, r.diag);
    const std::vector<double> ch = analytics::logChanges(index, o.lag);
    r.volatility = stats::sampleSd(ch, &r.changes);
    if (r.changes < 2)
        throw InputError(fmt::format(
            "volatility needs at least 2 changes over {} period(s); the index gives {}{}", o.lag,
            r.changes, analytics::nonPositiveNote(index)));
    if (o.annual) r.volatility *= std::sqrt(double(periodsPerYear(o.freq)) / o.lag);
    return r;
}

SnrResult indexSnr(const std::vector<double>& index, const SnrOptions& o) {
    o.validate();
    SnrResult r;
    analytics::countValues(index, true, r.diag);
    std::vector<double> x(index.size(), kNoValue);
    for (std::size_t t = 0; t < index.size(); ++t)
        if (hasValue(index[t]) && index[t] > 0) x[t] = 100.0 * std::log(index[t]);
    HpOptions hp;
    hp.freq = o.freq;
    hp.lambda = o.lambda ? *o.lambda : snrLambda(o.freq);
    const HpResult d = hodrickPrescott(x, hp);  // throws below 3 values or for a bad lambda
    r.lambda = d.lambda;
    double ss = 0, nn = 0;
    for (std::size_t t = 1; t < x.size(); ++t) {
        if (!hasValue(x[t]) || !hasValue(x[t - 1])) continue;
        const double dTrend = d.trend[t] - d.trend[t - 1];
        const double dNoise = d.cycle[t] - d.cycle[t - 1];
        ss += dTrend * dTrend;
        nn += dNoise * dNoise;
        ++r.pairs;
    }
    if (r.pairs < 2)
        throw InputError(fmt::format(
            "the signal-to-noise ratio needs at least 2 pairs of consecutive values; the index "
            "has {}", r.pairs));
    const double pairs = static_cast<double>(r.pairs);
    r.signal = std::sqrt(ss / pairs);
    r.noise = std::sqrt(nn / pairs);
    // Noise at the level of rounding (a constant index, a straight line in logs) is no
    // noise: the solver leaves ~1e-13 log points behind, real indexes have 1e-3 and more.
    double scale = 1.0;
    for (double v : x)
        if (hasValue(v)) scale = std::max(scale, std::abs(v));
    if (r.noise > 1e-10 * scale) r.snr = ss / nn;
    else r.diag.warn("no noise: the index equals its trend, the ratio is unbounded");
    return r;
}

}  // namespace lintel
