// The one rule for numbers a person reads (src/report_format.hpp). Expected strings written by
// hand from the rule: three significant figures, no trailing zeros, never -0, a power of ten only
// below 0.001 and never for zero.

#include "report_format.hpp"

#include <gtest/gtest.h>

#include <cmath>
#include <limits>

#include "detail.hpp"
#include "gutterwatt/calendar.hpp"

using gutterwatt::month_start;
using gutterwatt::detail::kDay_s;
using gutterwatt::detail::key_label;
using gutterwatt::detail::Medium;
using gutterwatt::detail::period_label;
using gutterwatt::detail::pretty;

namespace {
constexpr const char* kThin = "\xE2\x80\xAF";  // U+202F, between groups of three digits
}

TEST(ReportFormat, ZeroIsPlainZeroWhateverItsSign) {
  EXPECT_EQ(pretty(0.0), "0");
  EXPECT_EQ(pretty(-0.0), "0");
  EXPECT_EQ(pretty(0.0, Medium::svg), "0");
  EXPECT_EQ(pretty(-0.0, Medium::terminal), "0");
}

TEST(ReportFormat, ThreeSignificantFiguresWithoutTrailingZeros) {
  EXPECT_EQ(pretty(0.9), "0.9");
  EXPECT_EQ(pretty(0.900001, Medium::terminal), "0.9");
  EXPECT_EQ(pretty(17.862), "17.9");
  EXPECT_EQ(pretty(9.4512), "9.45");
  EXPECT_EQ(pretty(12.4, Medium::terminal), "12.4");
  EXPECT_EQ(pretty(0.0123), "0.0123");
  EXPECT_EQ(pretty(-0.0499), "-0.0499");
  EXPECT_EQ(pretty(0.99996), "1");
  EXPECT_EQ(pretty(9.996), "10");
  EXPECT_EQ(pretty(2.5, Medium::terminal), "2.5");
}

TEST(ReportFormat, WholeFromAHundredGroupedOnThePageOnly) {
  EXPECT_EQ(pretty(126.0), "126");
  EXPECT_EQ(pretty(100.4), "100");
  EXPECT_EQ(pretty(4776.0), std::string("4") + kThin + "776");
  EXPECT_EQ(pretty(1283.4, Medium::svg), std::string("1") + kThin + "283");
  EXPECT_EQ(pretty(1283.4, Medium::terminal), "1283");
  EXPECT_EQ(pretty(-1234567.0, Medium::terminal), "-1234567");
}

TEST(ReportFormat, PowerOfTenOnlyBelowAThousandth) {
  EXPECT_EQ(pretty(0.001), "0.001");
  EXPECT_EQ(pretty(3.2e-12, Medium::terminal), "3.2e-12");
  EXPECT_EQ(pretty(-4e-4, Medium::svg), "-4e-4");
  EXPECT_EQ(pretty(1.234e-9), "1.23&times;10<sup>-9</sup>");
  EXPECT_EQ(pretty(9.9996e-5, Medium::terminal), "1e-4");
}

TEST(ReportFormat, MissingIsADash) {
  const double nan = std::numeric_limits<double>::quiet_NaN();
  EXPECT_EQ(pretty(nan), "&ndash;");
  EXPECT_EQ(pretty(nan, Medium::terminal), "-");
}

TEST(ReportFormat, PeriodOfWholeYearsIsItsYears) {
  EXPECT_EQ(period_label(month_start(2025, 1), month_start(2026, 1)), "2025");
  EXPECT_EQ(period_label(month_start(2012, 1), month_start(2016, 1)),
            "2012\xE2\x80\x93"
            "2015");
  // Over a year and in several years: by its years, whole or not.
  EXPECT_EQ(period_label(month_start(2012, 3) + 3 * kDay_s, month_start(2015, 7)),
            "2012\xE2\x80\x93"
            "2015");
}

TEST(ReportFormat, PeriodOfWholeMonthsNamesThem) {
  EXPECT_EQ(period_label(month_start(2025, 3), month_start(2025, 4)), "Mar 2025");
  // The demo's season ends at 23:55 on its last day, as a run's last row may.
  EXPECT_EQ(period_label(month_start(2025, 3), month_start(2025, 12) - 300),
            "Mar\xE2\x80\x93Nov 2025");
  EXPECT_EQ(period_label(month_start(2024, 12), month_start(2025, 3)),
            "Dec 2024 \xE2\x80\x93 Feb 2025");
}

TEST(ReportFormat, PeriodOfPartMonthsNamesItsDays) {
  const std::int64_t mar30 = month_start(2025, 3) + 29 * kDay_s;
  EXPECT_EQ(period_label(mar30, mar30 + 3 * kDay_s), "30 Mar \xE2\x80\x93 1 Apr 2025");
  EXPECT_EQ(period_label(mar30 - 9 * kDay_s, mar30),
            "21\xE2\x80\x93"
            "29 Mar 2025");
  EXPECT_EQ(period_label(mar30, mar30 + kDay_s), "30 Mar 2025");
  EXPECT_EQ(period_label(month_start(2024, 12) + 20 * kDay_s, month_start(2025, 1) + 5 * kDay_s),
            "21 Dec 2024 \xE2\x80\x93 5 Jan 2025");
}

TEST(ReportFormat, KeyLabelsArePlainWordsWithTheirUnits) {
  // Expected strings written by hand from the key names.
  EXPECT_EQ(key_label("release.priming_flow_L_per_min"), "Release: priming flow, L/min");
  EXPECT_EQ(key_label("release.trigger_level_mm"), "Release: trigger level, mm");
  EXPECT_EQ(key_label("drop_pipe.minor_loss_k"), "Drop pipe: minor loss K");
  EXPECT_EQ(key_label("battery.min_soc"), "Battery: min state of charge");
  EXPECT_EQ(key_label("roof.lag_s"), "Roof: lag, s");
  EXPECT_EQ(key_label("energy_Wh"), "Energy, Wh");
  EXPECT_EQ(key_label("overflow_gal"), "Overflow, gal");
  EXPECT_EQ(key_label("release.trigger_level_in"), "Release: trigger level, in");
  EXPECT_EQ(key_label("cycles"), "Cycles");
  EXPECT_EQ(key_label("standing_spells_over_7_days"), "Standing spells over 7 days");
  EXPECT_EQ(key_label("energy_Wh_p90"), "Energy, Wh (P90)");
}
