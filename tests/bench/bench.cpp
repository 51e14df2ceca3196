#include "bench.hpp"

#include <algorithm>
#include <cstdio>
#include <map>
#include <vector>

namespace bench {

namespace {
std::map<std::string, Case>& registry() {
    static std::map<std::string, Case> r;
    return r;
}
}  // namespace

Register::Register(const std::string& name, Case c) { registry()[name] = std::move(c); }

double medianMillis(const std::function<void()>& f, int repeats) {
    f();
    std::vector<double> t;
    for (int i = 0; i < repeats; ++i) {
        const auto a = std::chrono::steady_clock::now();
        f();
        const auto b = std::chrono::steady_clock::now();
        t.push_back(std::chrono::duration<double, std::milli>(b - a).count());
    }
    std::sort(t.begin(), t.end());
    return t[t.size() / 2];
}

void report(const std::string& what, double ms, double targetMs) {
    std::printf("%-60s %9.1f ms  (target < %.0f ms) %s\n", what.c_str(), ms, targetMs,
                ms < targetMs ? "OK" : "SLOW");
    std::fflush(stdout);
}

}  // namespace bench

int main(int argc, char** argv) {
    const std::string filter = argc > 1 ? argv[1] : "";
    for (const auto& [name, c] : bench::registry())
        if (name.find(filter) != std::string::npos) c();
    return 0;
}
