// Robustness: every function of the table, called with many random arguments (shapes,
// numbers, text, blanks, option strings with random values), returns a table or a
// "Lintel: ..." message and never crashes or throws. Deterministic (fixed seed). Run it in a
// build with -fsanitize=address,undefined to catch memory errors too (CONTRIBUTING.md).
#include <boost/test/unit_test.hpp>

#include <cstdlib>
#include <random>

#include "addin_test_cells.hpp"
#include "function_table.hpp"

using namespace lintel::addin;

namespace {

class Fuzzer {
public:
    explicit Fuzzer(unsigned seed) : rng_(seed) {}

    int pick(int n) { return std::uniform_int_distribution<int>(0, n - 1)(rng_); }

    Cell cell() {
        switch (pick(10)) {
            case 0: return Cell{};
            case 1: return Cell::str(pick(2) ? "North" : "2024-02-30");
            case 2: return Cell::str("x");
            case 3: return Cell::num(-pick(1000));
            case 4: return Cell::num(0);
            case 5: return Cell::num(1e300);
            case 6: return Cell::num(pick(3));
            default:  // dates around 2018 .. 2024, or prices
                return Cell::num(pick(2) ? 43100 + pick(2500) : 50000 + pick(900000));
        }
    }

    Arg range(std::size_t rows, std::size_t cols) {
        Range r;
        r.rows = rows;
        r.cols = cols;
        for (std::size_t i = 0; i < rows * cols; ++i) r.cells.push_back(cell());
        r.scalar = rows * cols == 1;
        return r;
    }

    std::string optionValue() {
        static const char* values[] = {"0", "1", "2", "-1", "3,4", "x", "", "0.5", "1e12",
                                       "kennedy", "hc1", "bmn", "cs2", "mean", "value", "carry",
                                       "bootstrap", "table", "adjusted", "detail", "lognormal",
                                       "Q", "Y", "2020-01-01", "99999999999"};
        return values[pick(static_cast<int>(sizeof values / sizeof *values))];
    }

    Arg options(const FunctionSpec& f) {
        if (f.options.empty() || pick(4) == 0) return std::nullopt;
        std::string text;
        const int n = 1 + pick(4);
        for (int i = 0; i < n; ++i) {
            const std::string key = pick(12) == 0 ? "bogus" : f.options[pick(static_cast<int>(f.options.size()))].key;
            text += key + "=" + optionValue() + "; ";
        }
        return addin_test::text(text);
    }

    std::vector<Arg> args(const FunctionSpec& f) {
        const std::size_t rows = 1 + pick(40);
        std::vector<Arg> a;
        for (const auto& spec : f.args) {
            if (spec.name == "options") { a.push_back(options(f)); continue; }
            if (spec.kind == ArgKind::Optional && pick(3) == 0) { a.push_back(std::nullopt); continue; }
            if (spec.name == "freq") { a.push_back(addin_test::text(pick(5) ? "M" : (pick(2) ? "Q" : "W"))); continue; }
            const bool block = spec.name == "characteristics" || spec.name == "strata" || spec.name == "indexes";
            const std::size_t r = pick(8) == 0 ? 1 + pick(40) : rows;  // sometimes misaligned
            const std::size_t c = block ? 1 + pick(4) : (pick(15) == 0 ? 2 : 1);
            a.push_back(pick(10) == 0 ? range(1, 1) : range(r, c));
        }
        return a;
    }

private:
    std::mt19937 rng_;
};

}  // namespace

BOOST_AUTO_TEST_SUITE(addin_robustness)

BOOST_AUTO_TEST_CASE(random_arguments_never_escape) {
    // LINTEL_FUZZ_ROUNDS raises the rounds per function (and LINTEL_FUZZ_SEED the seed) for a
    // longer run under the sanitizers; the default keeps the unit tests fast.
    const char* roundsEnv = std::getenv("LINTEL_FUZZ_ROUNDS");
    const char* seedEnv = std::getenv("LINTEL_FUZZ_SEED");
    const int rounds = roundsEnv ? std::atoi(roundsEnv) : 300;
    Fuzzer fz(seedEnv ? static_cast<unsigned>(std::atol(seedEnv)) : 20261201u);
    std::size_t messages = 0, tables = 0;
    for (const auto& f : functionTable()) {
        for (int i = 0; i < rounds; ++i) {
            const OutTable t = callFunction(f, fz.args(f), {});
            BOOST_REQUIRE(!t.rows.empty());
            const bool message = t.scalar && t.rows.size() == 1 && t.rows[0].size() == 1 &&
                                 t.rows[0][0].kind == OutCell::Kind::Text &&
                                 t.rows[0][0].text.rfind("Lintel: ", 0) == 0;
            if (message) {
                ++messages;
                // An internal fault is a bug, not bad input (it also catches an option the
                // implementation never reads: Call::checkEverythingRead).
                BOOST_TEST_CONTEXT(f.name << ": " << t.rows[0][0].text)
                BOOST_TEST(t.rows[0][0].text.rfind(kInternalFault, 0) == std::string::npos);
            } else {
                ++tables;
            }
        }
    }
    BOOST_TEST_MESSAGE(messages << " messages, " << tables << " tables");
    // Both kinds occur: the generator reaches the estimators, not only the argument checks.
    BOOST_TEST(messages > 0u);
    BOOST_TEST(tables > 0u);
}

BOOST_AUTO_TEST_SUITE_END()
