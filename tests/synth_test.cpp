#include "gutterwatt/synth.hpp"

#include <gtest/gtest.h>

#include <cmath>
#include <sstream>
#include <string>
#include <vector>

#include "gutterwatt/error.hpp"
#include "gutterwatt/rain_input.hpp"
#include "gutterwatt/units.hpp"
#include "test_support.hpp"

namespace gutterwatt::synth_test {
namespace {

constexpr double kHour_s = 3600.0;
constexpr double kMmPerHour = kMetresPerMm / kSecondsPerHour;

PrpMonth month(double cells_per_day, double mean_duration_h, double mean_intensity_mm_per_h) {
  return {cells_per_day / kSecondsPerDay, mean_duration_h * kHour_s,
          mean_intensity_mm_per_h * kMmPerHour};
}

// Invented parameters with a strong seasonal swing: many long light cells in winter (4.8 mm a
// day), few short intense ones in summer (2 mm a day).
PrpParameters seasonal() {
  PrpParameters p;
  for (int i = 0; i < 12; ++i) {
    const double winter = 0.5 + 0.5 * std::cos(2.0 * kPi * i / 12.0);  // 1 in January
    p.months[i] = month(0.4 + 1.1 * winter, 1.0 + 3.0 * winter, 5.0 - 4.2 * winter);
  }
  return p;
}

// 2000-01-01T00:00Z.
// source: POSIX.1-2017 Base Definitions 4.16 (Seconds Since the Epoch), formula worked by hand.
constexpr Instant kY2000 = 946684800;

SynthSpec spec(int years, Instant step_s = 3600, std::uint64_t seed = 1) {
  SynthSpec s;
  s.start = kY2000;
  s.end = month_start(2000 + years, 1);
  s.step_s = step_s;
  s.seed = seed;
  return s;
}

TEST(Synth, GivesTheMeanDepthOfThePulsesModel) {
  // 2.4 cells a day (0.1 per hour), 2 h mean duration, 3 mm/h: 0.1 * 3 * 2 * 1 = 0.6 mm an hour.
  // source: Rodriguez-Iturbe, Cox & Isham (1987), mean lambda mu_X h / eta; value computed here
  EXPECT_DOUBLE_EQ(prp_mean_depth_m(month(2.4, 2.0, 3.0), kHour_s), 0.6e-3);
}

TEST(Synth, GivesTheWetProbabilityOfThePulsesModel) {
  // 1 - exp(-0.1 (1 + 2)) = 0.2591817793 (computed here from the formula)
  EXPECT_NEAR(prp_wet_probability(month(2.4, 2.0, 3.0), kHour_s), 0.2591817793, 1e-10);
}

TEST(Synth, GivesTheDepthVarianceOfThePulsesModel) {
  // 4 lambda mu^2 (eta h - 1 + exp(-eta h)) / eta^3 with lambda 0.1/h, mu 3 mm/h, eta 0.5/h,
  // h 1 h: 4 * 0.1 * 9 * (0.5 - 1 + exp(-0.5)) / 0.125 = 3.2817 mm^2 (computed here)
  const double expected_mm2 = 4 * 0.1 * 9 * (0.5 - 1 + std::exp(-0.5)) / 0.125;
  EXPECT_NEAR(prp_depth_variance_m2(month(2.4, 2.0, 3.0), kHour_s) * 1e6, expected_mm2, 1e-9);
}

TEST(Synth, FindsParametersFromMonthlyStatistics) {
  // A month with 2.5 mm a day on average and 40 % wet days, cells of 3 h on average.
  const PrpMonth m = prp_from_statistics(2.5e-3, 0.4, kSecondsPerDay, 3 * kHour_s);
  EXPECT_DOUBLE_EQ(m.mean_duration_s, 3 * kHour_s);
  EXPECT_NEAR(prp_mean_depth_m(m, kSecondsPerDay), 2.5e-3, 1e-15);
  EXPECT_NEAR(prp_wet_probability(m, kSecondsPerDay), 0.4, 1e-12);
}

TEST(Synth, MatchesTheMonthlyMeansAndWetFractionsOfItsParameters) {
  // 500 years of hours. Tolerances are 4 standard errors. The mean's standard error is
  // analytic: a month's total has the variance prp_depth_variance_m2 over the month, and the
  // years are independent (cells last hours), so the mean of n months has sd(total) / sqrt(n).
  // The wet fraction's standard error is the spread of the yearly fractions over sqrt(n). Cells
  // that run over from the month before shift a month's mean by about (1 / eta) / (month length),
  // under 1 %, well inside the tolerance.
  const PrpParameters p = seasonal();
  constexpr int kYears = 500;
  std::vector<double> depth_m(12, 0.0);
  std::vector<double> steps(12, 0.0);
  std::vector<std::vector<double>> wet_by_year(12, std::vector<double>(kYears, 0.0));
  std::vector<std::vector<double>> steps_by_year(12, std::vector<double>(kYears, 0.0));
  generate_prp(p, spec(kYears), [&](Instant end, double d) {
    const CivilTime c = to_civil(end - 1);
    const int i = c.month - 1;
    depth_m[i] += d;
    steps[i] += 1.0;
    wet_by_year[i][c.year - 2000] += d > 0.0 ? 1.0 : 0.0;
    steps_by_year[i][c.year - 2000] += 1.0;
  });
  for (int i = 0; i < 12; ++i) {
    const PrpMonth& m = p.months[i];
    const double month_s = steps[i] / kYears * kHour_s;
    const double mean_m = depth_m[i] / steps[i];
    const double mean_se_m =
        std::sqrt(prp_depth_variance_m2(m, month_s) / kYears) / (steps[i] / kYears);
    EXPECT_NEAR(mean_m, prp_mean_depth_m(m, kHour_s), 4 * mean_se_m) << "month " << i + 1;

    double sum = 0.0;
    double sum_sq = 0.0;
    for (int y = 0; y < kYears; ++y) {
      const double f = wet_by_year[i][y] / steps_by_year[i][y];
      sum += f;
      sum_sq += f * f;
    }
    const double wet = sum / kYears;
    const double sd = std::sqrt((sum_sq - sum * sum / kYears) / (kYears - 1));
    EXPECT_NEAR(wet, prp_wet_probability(m, kHour_s), 4 * sd / std::sqrt(kYears))
        << "month " << i + 1;
  }
}

TEST(Synth, MatchesTheDailyStatisticsItWasGiven) {
  // Parameters found from daily statistics give those statistics back at a one-day step.
  PrpParameters p;
  for (int i = 0; i < 12; ++i) {
    p.months[i] = prp_from_statistics((1.0 + i % 4) * kMetresPerMm, 0.2 + 0.05 * (i % 6),
                                      kSecondsPerDay, 2 * kHour_s);
  }
  constexpr int kYears = 400;
  std::vector<double> depth_m(12, 0.0), wet(12, 0.0), days(12, 0.0);
  generate_prp(p, spec(kYears, 86400), [&](Instant end, double d) {
    const int i = to_civil(end - 1).month - 1;
    depth_m[i] += d;
    wet[i] += d > 0.0 ? 1.0 : 0.0;
    days[i] += 1.0;
  });
  for (int i = 0; i < 12; ++i) {
    const PrpMonth& m = p.months[i];
    const double month_s = days[i] / kYears * kSecondsPerDay;
    const double mean_se_m =
        std::sqrt(prp_depth_variance_m2(m, month_s) / kYears) / (days[i] / kYears);
    EXPECT_NEAR(depth_m[i] / days[i], (1.0 + i % 4) * kMetresPerMm, 4 * mean_se_m);
    // Wet days: treated as independent trials, sd sqrt(p (1 - p) / n); days are positively
    // correlated only through cells that cross midnight, so 5 sd leaves room for that.
    const double q = 0.2 + 0.05 * (i % 6);
    EXPECT_NEAR(wet[i] / days[i], q, 5 * std::sqrt(q * (1 - q) / days[i])) << "month " << i + 1;
  }
}

TEST(Synth, RepeatsTheRecordForTheSameSeed) {
  std::ostringstream a, b, c;
  write_synth_csv(a, seasonal(), spec(1));
  write_synth_csv(b, seasonal(), spec(1));
  write_synth_csv(c, seasonal(), spec(1, 3600, 2));
  EXPECT_EQ(a.str(), b.str());
  EXPECT_NE(a.str(), c.str());
}

TEST(Synth, KeepsItsRecordFromOneVersionToTheNext) {
  // Regression values of this implementation (seed 1, one year of hours): a change here means
  // old synthetic records can no longer be made again.
  int wet = 0;
  double total_m = 0.0;
  generate_prp(seasonal(), spec(1), [&](Instant, double d) {
    wet += d > 0.0;
    total_m += d;
  });
  EXPECT_EQ(wet, 1168);
  EXPECT_NEAR(total_m, 1.56007618926, 1e-9);  // a maths library's last bit may move it by less
}

TEST(Synth, WritesARainSeriesAScenarioCanRead) {
  SynthSpec s = spec(1, 300);
  s.utc_offset_s = 3600;
  std::ostringstream out;
  write_synth_csv(out, seasonal(), s);
  const std::string text = out.str();
  EXPECT_EQ(text.substr(0, 35), "time,rain_mm\n2000-01-01T01:05+01:00");
  std::istringstream in(text);
  SeriesFormat fmt;
  fmt.zone = 3600;
  const RainSeries rain = read_rain_series(in, "synth.csv", fmt);
  EXPECT_EQ(rain.step_s, 300);
  ASSERT_EQ(rain.covered.size(), 1u);
  EXPECT_EQ(rain.covered[0].start, s.start);
  EXPECT_EQ(rain.covered[0].end, s.end);
  double total_m = 0.0;
  generate_prp(seasonal(), s, [&](Instant, double d) { total_m += d; });
  EXPECT_NEAR(rain.total_depth_m, total_m, 1e-9);  // printed to 1e-6 mm on the running total
}

TEST(Synth, WritesADryRecordForDryMonths) {
  PrpParameters dry;
  std::ostringstream out;
  SynthSpec s = spec(1, 86400);
  s.end = s.start + 2 * 86400;
  write_synth_csv(out, dry, s);
  EXPECT_EQ(out.str(), "time,rain_mm\n2000-01-02T00:00,0\n2000-01-03T00:00,0\n");
}

TEST(Synth, RejectsARecordThatIsNotAWholeNumberOfSteps) {
  SynthSpec s = spec(1);
  s.end += 60;
  try {
    generate_prp(seasonal(), s, [](Instant, double) {});
    FAIL() << "no error";
  } catch (const InputError& e) {
    EXPECT_STREQ(e.what(),
                 "--end: must be a whole number of steps of 1h after the start (got "
                 "366d 1min)");
  }
}

// ---- the parameter file ----

std::string twelve_rows(const std::string& row) {
  std::string text;
  for (int i = 1; i <= 12; ++i) text += std::to_string(i) + "," + row + "\n";
  return text;
}

PrpParameters read(const std::string& text) {
  std::istringstream in(text);
  return read_prp_parameters(in, "monthly.csv");
}

std::string error_of(const std::string& text) {
  return test_support::input_error_of([&] { read(text); });
}

TEST(SynthParameters, ReadsTheModelsParameters) {
  const PrpParameters p =
      read("# invented\nmonth,cells_per_day,mean_duration_h,mean_intensity_mm_per_h\n" +
           twelve_rows("2.4,2,3"));
  EXPECT_DOUBLE_EQ(p.months[11].cell_rate_per_s, 2.4 / 86400);
  EXPECT_DOUBLE_EQ(p.months[11].mean_duration_s, 7200);
  EXPECT_DOUBLE_EQ(p.months[11].mean_intensity_m_per_s, 3e-3 / 3600);
}

TEST(SynthParameters, ReadsMonthlyStatistics) {
  const PrpParameters p =
      read("month,mean_mm_per_day,wet_day_fraction,mean_duration_h\n" + twelve_rows("2.5,0.4,3"));
  EXPECT_NEAR(prp_mean_depth_m(p.months[0], kSecondsPerDay), 2.5e-3, 1e-15);
  EXPECT_NEAR(prp_wet_probability(p.months[0], kSecondsPerDay), 0.4, 1e-12);
}

TEST(SynthParameters, RejectsAnUnknownHeader) {
  EXPECT_EQ(error_of("month,rate\n"),
            "monthly.csv:1: expected the header "
            "month,cells_per_day,mean_duration_h,mean_intensity_mm_per_h or "
            "month,mean_mm_per_day,wet_day_fraction,mean_duration_h (got month,rate)");
}

TEST(SynthParameters, RejectsAMissingMonth) {
  EXPECT_EQ(error_of("month,cells_per_day,mean_duration_h,mean_intensity_mm_per_h\n"
                     "1,1,1,1\n2,1,1,1\n"),
            "monthly.csv:3: month: every month 1 to 12 needs a row (missing 3, 4, 5, 6, 7, 8, 9, "
            "10, 11, 12)");
}

TEST(SynthParameters, RejectsAMonthGivenTwice) {
  EXPECT_EQ(error_of("month,cells_per_day,mean_duration_h,mean_intensity_mm_per_h\n"
                     "1,1,1,1\n1,1,1,1\n"),
            "monthly.csv:3: month: month 1 is already given on line 2");
}

TEST(SynthParameters, RejectsAMonthOutOfRange) {
  EXPECT_EQ(error_of("month,cells_per_day,mean_duration_h,mean_intensity_mm_per_h\n13,1,1,1\n"),
            "monthly.csv:2: month: must be a whole number from 1 to 12 (got 13)");
}

TEST(SynthParameters, RejectsANumberItCannotRead) {
  EXPECT_EQ(error_of("month,cells_per_day,mean_duration_h,mean_intensity_mm_per_h\n1,1,x,1\n"),
            "monthly.csv:2: mean_duration_h: not a number (got \"x\")");
}

TEST(SynthParameters, RejectsAZeroDuration) {
  EXPECT_EQ(error_of("month,cells_per_day,mean_duration_h,mean_intensity_mm_per_h\n1,1,0,1\n"),
            "monthly.csv:2: mean_duration_h: must be > 0 (got 0)");
}

TEST(SynthParameters, RejectsAWetFractionOfOneForARainyMonth) {
  EXPECT_EQ(error_of("month,mean_mm_per_day,wet_day_fraction,mean_duration_h\n1,2,1,3\n"),
            "monthly.csv:2: wet_day_fraction: must be between 0 and 1, both excluded, for a "
            "month with rain (got 1)");
}

TEST(SynthParameters, RejectsARowOfTheWrongLength) {
  EXPECT_EQ(error_of("month,cells_per_day,mean_duration_h,mean_intensity_mm_per_h\n1,1,1\n"),
            "monthly.csv:2: expected 4 fields (got 3)");
}

TEST(SynthParameters, RejectsAnEmptyFile) {
  EXPECT_EQ(error_of("# nothing\n"),
            "monthly.csv:1: empty file (expected the header "
            "month,cells_per_day,mean_duration_h,mean_intensity_mm_per_h or "
            "month,mean_mm_per_day,wet_day_fraction,mean_duration_h)");
}

}  // namespace
}  // namespace gutterwatt::synth_test
