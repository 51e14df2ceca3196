// The smoothing options of INDEXHEDONIC and CHAINRS (smooth, seasonal, realtime, borrow; bound
// to IndexSmoothing, which both Options structs carry) and the notes rows of a smoothed index.
// The method: native/core/smoothed_index.hpp, docs/methods/smoothing.md.
#pragma once

#include <string>
#include <utility>
#include <vector>

#include "bind.hpp"
#include "call.hpp"
#include "function_table.hpp"
#include "smoothed_index.hpp"

namespace lintel::addin {

namespace smoothing_detail {
std::string smoothText();
std::string seasonalText();
std::string realtimeText(const std::string& plainAlternative);
std::string borrowText();
}  // namespace smoothing_detail

// smooth, seasonal, realtime, borrow for an Options struct O deriving from IndexSmoothing.
// plainAlternative names the function's own unsmoothed way to values that never revise.
template <class O>
std::vector<OptionSpec> smoothingOptions(const std::string& plainAlternative) {
    using namespace smoothing_detail;
    return {option("smooth",
                   choice<O>(&O::smooth, std::vector<std::pair<std::string, SmoothKind>>{
                                             {"none", SmoothKind::None},
                                             {"level", SmoothKind::Level},
                                             {"trend", SmoothKind::Trend}}),
                   smoothText()),
            option("seasonal", flag<O>(&O::seasonal), seasonalText()),
            option("realtime", flag<O>(&O::realtime), realtimeText(plainAlternative)),
            option("borrow", flag<O>(&O::borrow), borrowText())};
}

// notes: the shared description plus what a smoothed index adds.
OptionSpec smoothingNotesOption();

// The index table of a smoothed index with, under notes=1, the diagnostics and then the
// model: its form, the estimated variances, the signal-to-noise ratio, the log-likelihood,
// how the variances were found, the periods it filled in (and, for CHAINRS, the pairs).
OutTable smoothedIndexCells(const SmoothedIndexResult& r, const Call& call, bool pairs);

}  // namespace lintel::addin
