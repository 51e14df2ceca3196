// What an estimator reports besides its numbers: rows used, rows dropped with reasons,
// warnings. Modelled on Ceres Solver's Solver::Summary: one shape for every estimator, and a
// one-line summary a cell can show.
#pragma once

#include <cstddef>
#include <stdexcept>
#include <string>
#include <utility>
#include <vector>

namespace lintel {

// An input the estimator cannot work with. The message says what is wrong and where, in the
// user's terms ("base 2019-05-01 lies outside the data (2020-01 .. 2024-12)"); the add-in
// shows it in the cell as "Lintel: <message>".
class InputError : public std::runtime_error {
public:
    using std::runtime_error::runtime_error;
};

struct Diagnostics {
    std::size_t rowsIn = 0;    // rows offered (after a header row, if any)
    std::size_t rowsUsed = 0;  // rows that entered the estimate
    // Dropped rows by reason, in the order the reasons first occurred.
    std::vector<std::pair<std::string, std::size_t>> dropped;
    std::vector<std::string> warnings;

    void drop(const std::string& reason, std::size_t n = 1);
    void warn(std::string text) { warnings.push_back(std::move(text)); }
    std::size_t rowsDropped() const;
    std::size_t droppedFor(const std::string& reason) const;
    // "4987 of 5000 rows used; dropped: 10 blank or non-date date, 3 non-positive price"
    std::string summary() const;
};

// "; dropped: 10 blank price, 3 excluded by include" (empty when there is nothing).
std::string droppedText(const std::vector<std::pair<std::string, std::size_t>>& dropped);

// Reasons shared by every estimator that reads a sales table (add more beside the estimator
// that needs them).
namespace reason {
inline const std::string kBadDate = "blank or non-date date";
inline const std::string kBadPrice = "blank or non-numeric price";
inline const std::string kNonPositivePrice = "non-positive price";
inline const std::string kExcluded = "excluded by include";
inline const std::string kEmptyRow = "empty row";
}  // namespace reason

}  // namespace lintel
