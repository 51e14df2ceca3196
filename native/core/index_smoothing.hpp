// The smoothing choices of the indexes built from period effects (INDEXHEDONIC, CHAINRS):
// whether the free period effects are replaced by a structural time series model, and which.
// Mixed into HedonicOptions and RepeatSalesOptions; the model and its estimation are in
// structural_smoother.hpp, the path from sales to the smoothed index in smoothed_index.hpp.
#pragma once

#include "index_table.hpp"

namespace lintel {

enum class SmoothKind { None, Level, Trend };

struct IndexSmoothing {
    SmoothKind smooth = SmoothKind::None;  // smooth: "none" (default) free period effects;
                                           // "level" a local level; "trend" a local linear
                                           // trend (structural_smoother.hpp)
    bool seasonal = false;  // seasonal: false (default); true adds a stochastic seasonal
                            // (12 months, 4 quarters)
    bool realtime = false;  // realtime: false (default) smoothed on all data (revises);
                            // true each value from the sales up to its period (never revises)
    bool borrow = false;    // borrow: false (default); true: the index of the include mask's
                            // segment is the whole range's movement plus the segment's own
                            // smoothed deviation

    bool smoothed() const { return smooth != SmoothKind::None; }
    // seasonal, realtime and borrow need smooth; seasonal needs freq M or Q. Throws
    // InputError.
    void validateSmoothing(const IndexOptions& index) const;
};

}  // namespace lintel
