#include "smoothing_options.hpp"

#include <fmt/format.h>

#include "inputs.hpp"

namespace lintel::addin {

namespace smoothing_detail {

std::string smoothText() {
    return "\"none\": free period effects (the plain index). \"level\" or \"trend\": a smoothed "
           "index for thin segments: the period effects and their standard errors are read as "
           "noisy measurements of a price level that moves as a random walk (level) or with a "
           "slowly changing slope (trend, a local linear trend); the variances of those moves are "
           "estimated by maximum likelihood and the index is the smoothed level (Kalman filter "
           "and smoother). Periods without sales get a value with a wider band. A sudden one-"
           "period jump is spread over the neighbouring periods.";
}

std::string seasonalText() {
    return "1 (with smooth): adds a seasonal pattern (12 months or 4 quarters) that may change "
           "slowly. The index keeps the season, like the plain one. Needs two years of data.";
}

std::string realtimeText(const std::string& plainAlternative) {
    return "1 (with smooth): each period's value uses only the sales dated up to that period "
           "(the first two years are published together), so adding later sales never changes "
           "a published value; the cost: more noise, and turns show later. Variances are "
           "re-estimated once a year of periods. " + plainAlternative;
}

std::string borrowText() {
    return "1 (with smooth and an include mask choosing a segment, such as one district): the "
           "segment's index is the whole range's price movement plus the segment's own smoothed "
           "deviation from it, estimated in one model, for a segment too thin for an index of "
           "its own. The bands include both parts.";
}

}  // namespace smoothing_detail

OptionSpec smoothingNotesOption() {
    OptionSpec n = spec::notes();
    n.description +=
        " With smooth: then the model, its estimated variances, the signal-to-noise ratio and "
        "the log-likelihood (a variance estimated at zero is a warning).";
    return n;
}

OutTable smoothedIndexCells(const SmoothedIndexResult& r, const Call& call, bool pairs) {
    OutTable out = indexTableCells(r, call);
    if (!call.layout().notes) return out;
    const std::size_t width = call.spec().width();
    const SmootherResult& m = r.model;
    if (pairs) labelTextRow(out, "pairs", r.pairs.summary(), width);
    if (r.marketRowsUsed) labelRow(out, "whole range rows used", static_cast<double>(r.marketRowsUsed), width);
    labelTextRow(out, "smoothing model", m.model, width);
    auto variance = [&](const char* label, double v) {
        if (hasValue(v)) labelRow(out, label, v, width);
    };
    variance("level variance", m.variances.level);
    variance("slope variance", m.variances.slope);
    variance("seasonal variance", m.variances.seasonal);
    variance("segment deviation variance", m.variances.deviation);
    labelRow(out, "signal-to-noise ratio", m.signalToNoise, width);
    labelRow(out, "log-likelihood", m.logLikelihood, width);
    if (r.vintages > 0)
        labelTextRow(out, "variances",
                     fmt::format("maximum likelihood on the sales up to {} (real time)",
                                 r.table.axis.label(r.lastEstimate)),
                     width);
    else
        labelTextRow(out, "variances",
                     fmt::format("maximum likelihood ({} evaluations)", m.evaluations), width);
    labelRow(out, "periods filled in by the model", r.periodsWithoutEffect, width);
    return out;
}

}  // namespace lintel::addin
