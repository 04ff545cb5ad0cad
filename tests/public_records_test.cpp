// End to end on the pinned public data (npm's vega-datasets 3.2.1, fetched by tools/setup): the
// daily record of two cities in one file (weather.csv, a `location` column) read for one city
// gives the run its single-city file (seattle-weather.csv) gives.

#include <gtest/gtest.h>

#include <nlohmann/json.hpp>
#include <string>

#include "cli_support.hpp"
#include "test_support.hpp"

namespace gutterwatt::public_records_test {
namespace {

using namespace cli_support;

// An invented system (the daily demo's) fed by a public daily record; `rain` is the file and
// any keys that pick rows out of it.
std::string daily_site(const std::string& rain) {
  return "site: {name: Public record check (invented system), temperature_C: 12}\n"
         "rain:\n" +
         rain +
         "  format: daily\n"
         "  value_column: precipitation\n"
         "  unit: mm\n"
         "  disaggregate: {method: cascade, step: 5min, seed: 1}\n"
         "roof: {area_m2: 40, runoff_coefficient: 0.9, initial_loss_mm: 0.5, lag_s: 60}\n"
         "first_flush: {volume_L: 10, reset_after_dry_h: 12}\n"
         "reservoir: {shape: half_round, width_mm: 125, length_m: 8, rim_mm: 62}\n"
         "release: {kind: bell, trigger_level_mm: 50, break_level_mm: 8, standpipe_diameter_mm: "
         "19, priming_flow_L_per_min: 2}\n"
         "drop_pipe: {diameter_mm: 19, length_m: 4.5, roughness_mm: 0.0015, minor_loss_k: 2.0, "
         "drop_m: 4.0}\n"
         "head_column: {diameter_mm: 120, height_m: 3.0}\n"
         "nozzle: {diameter_mm: 6, discharge_coefficient: 0.95, velocity_coefficient: 0.97}\n"
         "turbine: {kind: impulse, runner_diameter_mm: 70, peak_efficiency: 0.7}\n"
         "generator: {efficiency: 0.65, cut_in_W: 0.3}\n"
         "battery: {capacity_Wh: 12, initial_soc: 0.5, charge_efficiency: 0.9, max_charge_W: 10, "
         "load_W: 0.005}\n"
         "simulation: {start: 2013-01-01T00:00, end: 2014-12-31T23:55, output_interval: 1h}\n";
}

std::string public_file(const std::string& name) {
  return test_support::public_data_file("vega-datasets-3.2.1/data/" + name).string();
}

TEST(PublicRecords, OneCityOutOfTwoGivesTheResultsOfItsOwnFile) {
  const fs::path dir = scratch("public-two-cities");
  write_file(dir / "seattle.yaml",
             daily_site("  file: " + public_file("seattle-weather.csv") + "\n"));
  write_file(dir / "two-cities.yaml", daily_site("  file: " + public_file("weather.csv") +
                                                 "\n  where: {location: Seattle}\n"));
  // One disaggregation each (the files are the point here, not the spread of 20 draws).
  const Outcome one = run("run " + (dir / "seattle.yaml").string() + " --realizations 1 --out " +
                              (dir / "one").string(),
                          dir);
  const Outcome two = run("run " + (dir / "two-cities.yaml").string() + " --realizations 1 --out " +
                              (dir / "two").string(),
                          dir);
  ASSERT_EQ(one.status, 0) << one.err;
  ASSERT_EQ(two.status, 0) << two.err;
  EXPECT_EQ(slurp(dir / "two" / "timeseries.csv"), slurp(dir / "one" / "timeseries.csv"));
  EXPECT_EQ(slurp(dir / "two" / "events.csv"), slurp(dir / "one" / "events.csv"));
  auto a = nlohmann::json::parse(slurp(dir / "one" / "summary.json"));
  auto b = nlohmann::json::parse(slurp(dir / "two" / "summary.json"));
  EXPECT_EQ(a["scenario"], "seattle.yaml");
  EXPECT_EQ(b["scenario"], "two-cities.yaml");
  a.erase("scenario");
  b.erase("scenario");
  EXPECT_EQ(a, b);
  EXPECT_GT(a["water_L"]["rain"].get<double>(), 0.0);
}

TEST(PublicRecords, BothCitiesInOneRecordNameTheLocationColumn) {
  const fs::path dir = scratch("public-both-cities");
  const std::string file = public_file("weather.csv");
  write_file(dir / "s.yaml", daily_site("  file: " + file + "\n"));
  // Line 1463 starts the second city at 2012-01-01, after the first city's 2015-12-31.
  expect_bad(run("check " + (dir / "s.yaml").string(), dir),
             file +
                 ":1463: date: \"2012-01-01\" is earlier than the previous date \"2015-12-31\" "
                 "(line 1462); rows must be in time order; the column \"location\" changes here "
                 "from \"Seattle\" to \"New York\": several series in one file? keep one with "
                 "rain.where: {location: New York}");
}

TEST(PublicRecords, AnUnknownWhereColumnNamesTheKey) {
  const fs::path dir = scratch("public-where-column");
  const std::string file = public_file("weather.csv");
  write_file(dir / "s.yaml", daily_site("  file: " + file + "\n  where: {city: Seattle}\n"));
  expect_bad(run("check " + (dir / "s.yaml").string(), dir),
             file +
                 ":1: rain.where.city: no such column in the header (found \"location\", "
                 "\"date\", \"precipitation\", \"temp_max\", \"temp_min\", \"wind\", \"weather\")");
}

TEST(PublicRecords, ATimeFormatThatDoesNotMatchNamesTheLine) {
  const fs::path dir = scratch("public-time-format");
  const std::string file = public_file("weather.csv");
  write_file(dir / "s.yaml", daily_site("  file: " + file +
                                        "\n  where: {location: New York}\n"
                                        "  time_format: \"%m/%d/%Y\"\n"));
  expect_bad(run("check " + (dir / "s.yaml").string(), dir),
             file +
                 ":1463: date: does not match rain.time_format \"%m/%d/%Y\" as a date, at "
                 "midnight (got \"2012-01-01\")");
}

}  // namespace
}  // namespace gutterwatt::public_records_test
