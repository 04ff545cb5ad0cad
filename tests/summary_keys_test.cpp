// One definition of every number of summary.json the report reads (item 4 of issue 17): the
// writer writes each key of summary_numbers() and the report's reader gets the same value back,
// and the run's warnings come back as written.

#include <gtest/gtest.h>

#include <cmath>
#include <filesystem>
#include <fstream>
#include <string>

#include "gutterwatt/output.hpp"
#include "gutterwatt/realizations.hpp"
#include "gutterwatt/simulation.hpp"
#include "report_files.hpp"
#include "test_support.hpp"

namespace gutterwatt::summary_keys_test {
namespace {

namespace fs = std::filesystem;
using test_support::constant_inflow;
using test_support::kLitre_m3;
using test_support::kPerMinute;
using test_support::make_scenario;

// A two-hour run whose siphon cycles: 6 L/min from a reservoir starting at its break level.
Scenario cycling_scenario() {
  Scenario s = make_scenario(2.0 * 3600.0, 600.0);
  s.reservoir.initial_level_m = s.release.break_level_m;
  return s;
}

struct CyclingRun {
  Scenario s = cycling_scenario();
  RainSeries rain = constant_inflow(s, 6.0 * kLitre_m3 * kPerMinute);
  SummaryBuilder summary{s};
  RunResult r = simulate(s, rain, summary);
};

TEST(SummaryKeys, TheReaderGetsBackWhatTheWriterWrote) {
  const CyclingRun run;
  const auto& [s, rain, summary, r] = run;
  ASSERT_GT(r.cycles, 0);
  const fs::path dir = fs::temp_directory_path() /
                       ("gutterwatt-summary-keys-" +
                        std::to_string(::testing::UnitTest::GetInstance()->random_seed()));
  fs::create_directories(dir);
  const fs::path file = dir / "summary.json";
  RunWarnings warnings{{"a run warning"}, {"a design warning", "another"}};
  {
    std::ofstream out(file);
    write_summary_json(out, s, rain, r, summary, warnings);
  }
  const detail::Summary read = detail::read_summary(file);
  fs::remove_all(dir);
  const SummaryInputs in{s, r, summary};
  // Each number the page shows, against the table's own value for it (the table is the one
  // definition; this checks that the file carries it unchanged to the page).
  const auto same = [&](std::string_view key, double got) {
    const double want = summary_number(key).value(in);
    if (std::isnan(want)) {
      ADD_FAILURE() << key << " does not apply here";
    } else {
      EXPECT_DOUBLE_EQ(got, want) << key;
    }
  };
  same("water_L.rain", read.rain_L);
  same("water_L.roof_runoff", read.roof_runoff_L);
  same("water_L.through_nozzle", read.through_nozzle_L);
  same("water_L.reservoir_overflow", read.reservoir_overflow_L);
  same("energy_Wh.electrical", read.electrical_Wh);
  same("siphon.cycles", read.cycles);
  same("levels_mm.trigger", *read.trigger_mm);
  same("levels_mm.rim", *read.rim_mm);
  same("standing_water.days_total", *read.standing_days_total);
  // By hand: 0.1 L/s for two hours is 720 L of rain on the roof (runoff coefficient 1).
  EXPECT_NEAR(read.rain_L, 720.0, 1e-6);
  EXPECT_EQ(read.cycles, static_cast<double>(r.cycles));
  EXPECT_EQ(read.run_warnings, warnings.run);
  EXPECT_EQ(read.design_warnings, warnings.design);
}

// Each realization metric names its figure in summary.json (the report shows it as "this run"
// beside the spread): a key of the table, whose value is the run's own metric.
TEST(SummaryKeys, EveryRealizationMetricNamesItsFigureInTheTable) {
  const CyclingRun run;
  ASSERT_GT(run.r.cycles, 0);
  const SummaryInputs in{run.s, run.r, run.summary};
  const RunResult& r = run.r;
  const RealizationMetrics metrics = realization_metrics(r);
  // summary.json keeps six decimals: the two agree to half of the last one.
  for (const RealizationColumn& c : kRealizationColumns) {
    EXPECT_NEAR(summary_number(c.summary_key).value(in), metrics.*(c.value), 5e-7) << c.key;
  }
}

TEST(SummaryKeys, EveryKeyIsOnceInTheTable) {
  const auto numbers = summary_numbers();
  for (std::size_t i = 0; i < numbers.size(); ++i) {
    for (std::size_t j = i + 1; j < numbers.size(); ++j) {
      EXPECT_NE(numbers[i].key, numbers[j].key);
    }
  }
  EXPECT_THROW(summary_number("water_L.nope"), std::out_of_range);
}

}  // namespace
}  // namespace gutterwatt::summary_keys_test
