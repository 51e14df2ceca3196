// lintel_bench: prints speed figures for the core estimators (the speed targets are checked
// by reading these figures, not by timed tests). Each area registers its cases in its own
// bench_<area>.cpp.
//
//   lintel_bench [filter]      runs every case whose name contains `filter`
#pragma once

#include <chrono>
#include <functional>
#include <string>

namespace bench {

using Case = std::function<void()>;
struct Register {
    Register(const std::string& name, Case c);
};

// Median wall time in milliseconds of `repeats` runs of f (after one warm-up run).
double medianMillis(const std::function<void()>& f, int repeats = 5);
// Prints "name: 12.3 ms (target < 50 ms) OK" style lines.
void report(const std::string& what, double ms, double targetMs);

}  // namespace bench
