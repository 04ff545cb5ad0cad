// End to end in a time zone with daylight saving (America/Los_Angeles, the 2025 US changes:
// Energy Policy Act of 2005, sec. 110, second Sunday of March and first Sunday of November at
// 2:00 local): months and load hours follow the local clock, and output stamps carry the offset
// in force.

#include <gtest/gtest.h>

#include <nlohmann/json.hpp>
#include <string>

#include "cli_support.hpp"
#include "test_support.hpp"

namespace gutterwatt::local_time_test {
namespace {

using namespace cli_support;

// An invented small system in Los Angeles time; `battery` and `period` complete it.
std::string la_site(const std::string& battery, const std::string& period) {
  return "site: {name: Local time check (invented), time_zone: America/Los_Angeles}\n"
         "rain: {file: rain.csv, step: 5min, gaps: zero}\n" +
         std::string(test_support::kMinimalSystemYaml) + "battery: " + battery +
         "\nsimulation: " + period + "\n";
}

nlohmann::json run_site(const fs::path& dir, const std::string& scenario, const std::string& rain) {
  write_file(dir / "s.yaml", scenario);
  write_file(dir / "rain.csv", rain);
  const Outcome r = run(
      "run " + (dir / "s.yaml").string() + " --out " + (dir / "out").string() + " --quiet", dir);
  EXPECT_EQ(r.status, 0) << r.err;
  return nlohmann::json::parse(slurp(dir / "out" / "summary.json"));
}

// A load of 1 W in one local hour of the day only, from a large full battery.
std::string load_in_hour(int hour) {
  std::string profile;
  for (int h = 0; h < 24; ++h) profile += std::string(h ? ", " : "") + (h == hour ? "1" : "0");
  return "{capacity_Wh: 100, initial_soc: 1, load_profile_W: [" + profile + "]}";
}

TEST(LocalTime, CountsRainInTheLocalMonth) {
  // 1 mm in 23:25-23:30 on 31 March, Pacific daylight time: 06:25-06:30Z on 1 April.
  const auto summary =
      run_site(scratch("local-month"),
               la_site("{capacity_Wh: 20}", "{start: 2025-03-31T00:00, end: 2025-04-02T00:00}"),
               "time,rain_mm\n2025-03-31T23:30,1\n");
  ASSERT_EQ(summary["months"].size(), 2u);
  EXPECT_EQ(summary["months"][0]["month"], "2025-03");
  EXPECT_EQ(summary["months"][0]["rain_mm"], 1.0);
  EXPECT_EQ(summary["months"][1]["rain_mm"], 0.0);
  EXPECT_EQ(summary["start"], "2025-03-31T00:00-07:00");
}

TEST(LocalTime, ServesTheLoadOfTheRepeatedHourTwice) {
  // Noon to noon across the autumn change is 25 hours, and 01:00-02:00 comes twice: 2 Wh.
  const fs::path dir = scratch("local-fall-back");
  const auto summary = run_site(dir,
                                la_site(load_in_hour(1),
                                        "{start: 2025-11-01T12:00, end: 2025-11-02T12:00, "
                                        "output_interval: 1h}"),
                                "time,rain_mm\n2025-11-01T12:00,0\n");
  EXPECT_NEAR(summary["energy_Wh"]["load_served"].get<double>(), 2.0, 1e-6);
  const std::string series = slurp(dir / "out" / "timeseries.csv");
  EXPECT_NE(series.find("\n2025-11-02T01:00-07:00,"), std::string::npos);
  EXPECT_NE(series.find("\n2025-11-02T01:00-08:00,"), std::string::npos);
  EXPECT_EQ(lines(series), 1 + 25);
}

TEST(LocalTime, ServesNoLoadInTheSkippedHour) {
  // Noon to noon across the spring change is 23 hours, and 02:00-03:00 never comes; 03:00 does.
  const auto skipped =
      run_site(scratch("local-spring-skipped"),
               la_site(load_in_hour(2), "{start: 2025-03-08T12:00, end: 2025-03-09T12:00}"),
               "time,rain_mm\n2025-03-08T12:00,0\n");
  EXPECT_EQ(skipped["energy_Wh"]["load_served"].get<double>(), 0.0);
  const auto after =
      run_site(scratch("local-spring-after"),
               la_site(load_in_hour(3), "{start: 2025-03-08T12:00, end: 2025-03-09T12:00}"),
               "time,rain_mm\n2025-03-08T12:00,0\n");
  EXPECT_NEAR(after["energy_Wh"]["load_served"].get<double>(), 1.0, 1e-6);
}

TEST(LocalTime, RefusesAnUnknownZone) {
  const fs::path dir = scratch("local-unknown-zone");
  std::string text = la_site("{capacity_Wh: 20}", "{start: 2025-03-31T00:00}");
  text.replace(text.find("America/Los_Angeles"), 19, "America/Springfield");
  write_file(dir / "s.yaml", text);
  expect_bad(run("check " + (dir / "s.yaml").string(), dir),
             (dir / "s.yaml").string() +
                 ":1: site.time_zone: unknown time zone \"America/Springfield\"; give an IANA "
                 "name such as America/Los_Angeles (the system's tz database)");
}

}  // namespace
}  // namespace gutterwatt::local_time_test
