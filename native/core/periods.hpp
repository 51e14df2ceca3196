// Periods: spreadsheet date serials, civil dates and the month / quarter / year buckets an
// index is reported in.
//
// A serial counts days from 1899-12-30 (day 0), as LibreOffice Calc and ODF do by default;
// the fractional part (time of day) is ignored. Civil-date arithmetic is the proleptic
// Gregorian calendar, after H. Hinnant, "chrono-Compatible Low-Level Date Algorithms"
// (public domain), so century rules (1900 not leap, 2000 leap) come out right.
#pragma once

#include <optional>
#include <string>
#include <string_view>

namespace lintel {

enum class Frequency { Month, Quarter, Year };

struct CivilDate {
    int year = 1900;
    int month = 1;  // 1..12
    int day = 1;    // 1..31
};

// Days since 1970-01-01 of a proleptic Gregorian date (Hinnant's days_from_civil).
long long daysFromCivil(int year, int month, int day);
CivilDate civilFromDays(long long days);

// Serial day numbers (Calc / ODF, day 0 = 1899-12-30).
double serialFromCivil(const CivilDate& d);
CivilDate civilFromSerial(double serial);

// "2024-03-15" for a serial.
std::string isoDate(double serial);

// A serial we accept as a sale date: finite and within years 1583..9999.
bool isUsableSerial(double serial);

// "M", "Q", "Y" (also "month", "quarter", "year", any case). Empty text gives nullopt.
std::optional<Frequency> parseFrequency(std::string_view text);
const char* frequencyCode(Frequency f);  // "M", "Q", "Y"
int periodsPerYear(Frequency f);          // 12, 4, 1
int monthsPerPeriod(Frequency f);         // 1, 3, 12

// A period key numbers periods consecutively: months as year*12 + month-1, quarters as
// year*4 + quarter-1, years as the year. Consecutive keys are consecutive periods.
long periodKey(double serial, Frequency f);
long periodKey(const CivilDate& d, Frequency f);     // the same from a converted date
long yearOfKey(long key, Frequency f);               // calendar year of a period key
double periodStartOfKey(long key, Frequency f);      // serial of the first day
double periodStartOf(double serial, Frequency f);    // = PERIODOF
bool isPeriodStart(double serial, Frequency f);      // a usable serial on a period's first day
std::string periodLabel(long key, Frequency f);      // "2024-03", "2024-Q1", "2024"

// The consecutive run of periods an index is reported on: from the first to the last period
// with a usable sale; periods with no sales stay in the run.
struct PeriodAxis {
    Frequency freq = Frequency::Month;
    long firstKey = 0;
    int count = 0;

    static PeriodAxis spanning(long minKey, long maxKey, Frequency f);
    double start(int i) const { return periodStartOfKey(firstKey + i, freq); }
    std::string label(int i) const { return periodLabel(firstKey + i, freq); }
    // Position of the period that contains the serial, or -1 when it lies outside the axis.
    int positionOf(double serial) const;
    std::string rangeText() const;  // "2020-01 .. 2024-12"
};

// Infer the frequency of a column of period start dates (as written by the index
// functions): returns nullopt when the dates are not period starts of one frequency.
std::optional<Frequency> inferFrequency(const double* starts, std::size_t n);

}  // namespace lintel
