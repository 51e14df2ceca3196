#include "periods.hpp"

#include <algorithm>
#include <cctype>
#include <cmath>

#include <fmt/format.h>

namespace lintel {

namespace {
// Days from 1970-01-01 back to the serial epoch 1899-12-30.
constexpr long long kSerialEpochDays = -25569;

long floorDiv(long a, long b) { return a / b - ((a % b != 0) && ((a < 0) != (b < 0))); }
}  // namespace

long long daysFromCivil(int y, int m, int d) {
    y -= m <= 2;
    const long long era = (y >= 0 ? y : y - 399) / 400;
    const unsigned yoe = static_cast<unsigned>(y - era * 400);
    const unsigned doy = (153u * static_cast<unsigned>(m + (m > 2 ? -3 : 9)) + 2u) / 5u +
                         static_cast<unsigned>(d) - 1u;
    const unsigned doe = yoe * 365u + yoe / 4u - yoe / 100u + doy;
    return era * 146097 + static_cast<long long>(doe) - 719468;
}

CivilDate civilFromDays(long long z) {
    z += 719468;
    const long long era = (z >= 0 ? z : z - 146096) / 146097;
    const unsigned doe = static_cast<unsigned>(z - era * 146097);
    const unsigned yoe = (doe - doe / 1460 + doe / 36524 - doe / 146096) / 365;
    const long long y = static_cast<long long>(yoe) + era * 400;
    const unsigned doy = doe - (365 * yoe + yoe / 4 - yoe / 100);
    const unsigned mp = (5 * doy + 2) / 153;
    const unsigned d = doy - (153 * mp + 2) / 5 + 1;
    const unsigned m = mp < 10 ? mp + 3 : mp - 9;
    return CivilDate{static_cast<int>(y + (m <= 2)), static_cast<int>(m), static_cast<int>(d)};
}

double serialFromCivil(const CivilDate& d) {
    return static_cast<double>(daysFromCivil(d.year, d.month, d.day) - kSerialEpochDays);
}

CivilDate civilFromSerial(double serial) {
    return civilFromDays(static_cast<long long>(std::floor(serial)) + kSerialEpochDays);
}

std::string isoDate(double serial) {
    const CivilDate d = civilFromSerial(serial);
    return fmt::format("{:04d}-{:02d}-{:02d}", d.year, d.month, d.day);
}

bool isUsableSerial(double serial) {
    // 1583-01-01 is serial -115859; 9999-12-31 is serial 2958465.
    return std::isfinite(serial) && serial >= -115859.0 && serial < 2958466.0;
}

std::optional<Frequency> parseFrequency(std::string_view text) {
    std::string t;
    for (char c : text)
        if (!std::isspace(static_cast<unsigned char>(c)))
            t += static_cast<char>(std::tolower(static_cast<unsigned char>(c)));
    if (t == "m" || t == "month" || t == "monthly") return Frequency::Month;
    if (t == "q" || t == "quarter" || t == "quarterly") return Frequency::Quarter;
    if (t == "y" || t == "year" || t == "yearly" || t == "a" || t == "annual")
        return Frequency::Year;
    return std::nullopt;
}

const char* frequencyCode(Frequency f) {
    switch (f) {
        case Frequency::Month: return "M";
        case Frequency::Quarter: return "Q";
        case Frequency::Year: return "Y";
    }
    return "M";
}

int periodsPerYear(Frequency f) { return 12 / monthsPerPeriod(f); }

int monthsPerPeriod(Frequency f) {
    switch (f) {
        case Frequency::Month: return 1;
        case Frequency::Quarter: return 3;
        case Frequency::Year: return 12;
    }
    return 1;
}

long periodKey(double serial, Frequency f) { return periodKey(civilFromSerial(serial), f); }

long periodKey(const CivilDate& d, Frequency f) {
    switch (f) {
        case Frequency::Month: return static_cast<long>(d.year) * 12 + (d.month - 1);
        case Frequency::Quarter: return static_cast<long>(d.year) * 4 + (d.month - 1) / 3;
        case Frequency::Year: return d.year;
    }
    return 0;
}

long yearOfKey(long key, Frequency f) { return floorDiv(key, periodsPerYear(f)); }

double periodStartOfKey(long key, Frequency f) {
    switch (f) {
        case Frequency::Month: {
            const long y = floorDiv(key, 12);
            return serialFromCivil({static_cast<int>(y), static_cast<int>(key - y * 12) + 1, 1});
        }
        case Frequency::Quarter: {
            const long y = floorDiv(key, 4);
            return serialFromCivil(
                {static_cast<int>(y), static_cast<int>(key - y * 4) * 3 + 1, 1});
        }
        case Frequency::Year: return serialFromCivil({static_cast<int>(key), 1, 1});
    }
    return 0.0;
}

double periodStartOf(double serial, Frequency f) {
    return periodStartOfKey(periodKey(serial, f), f);
}

bool isPeriodStart(double serial, Frequency f) {
    return isUsableSerial(serial) && periodStartOf(serial, f) == std::floor(serial);
}

std::string periodLabel(long key, Frequency f) {
    switch (f) {
        case Frequency::Month: {
            const long y = floorDiv(key, 12);
            return fmt::format("{:04d}-{:02d}", y, key - y * 12 + 1);
        }
        case Frequency::Quarter: {
            const long y = floorDiv(key, 4);
            return fmt::format("{:04d}-Q{}", y, key - y * 4 + 1);
        }
        case Frequency::Year: return fmt::format("{:04d}", key);
    }
    return {};
}

PeriodAxis PeriodAxis::spanning(long minKey, long maxKey, Frequency f) {
    PeriodAxis a;
    a.freq = f;
    a.firstKey = minKey;
    a.count = maxKey >= minKey ? static_cast<int>(maxKey - minKey + 1) : 0;
    return a;
}

int PeriodAxis::positionOf(double serial) const {
    if (!isUsableSerial(serial)) return -1;
    const long k = periodKey(serial, freq) - firstKey;
    return (k >= 0 && k < count) ? static_cast<int>(k) : -1;
}

std::string PeriodAxis::rangeText() const {
    if (count == 0) return "no periods";
    return fmt::format("{} .. {}", label(0), label(count - 1));
}

std::optional<Frequency> inferFrequency(const double* starts, std::size_t n) {
    // Try the finest frequency first: every date must be a period start of it, and the
    // keys must increase. Monthly dates that are all January 1st are ambiguous; the
    // spacing decides (a step of one key at the coarser frequency wins).
    std::optional<Frequency> found;
    for (Frequency f : {Frequency::Year, Frequency::Quarter, Frequency::Month}) {
        bool ok = n > 0;
        long prev = 0;
        bool unitStep = false;
        for (std::size_t i = 0; i < n && ok; ++i) {
            if (!isPeriodStart(starts[i], f)) {
                ok = false;
                break;
            }
            const long k = periodKey(starts[i], f);
            if (i > 0) {
                if (k <= prev) ok = false;
                if (k == prev + 1) unitStep = true;
            }
            prev = k;
        }
        if (ok && (unitStep || n == 1)) return f;
        if (ok && !found) found = f;
    }
    return found;
}

}  // namespace lintel
