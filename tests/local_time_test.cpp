// End to end in a time zone with daylight saving (America/Los_Angeles, the 2025 US changes:
// Energy Policy Act of 2005, sec. 110, second Sunday of March and first Sunday of November at
// 2:00 local): months and load hours follow the local clock, and output stamps carry the offset
// in force.

#include <gtest/gtest.h>

#include <nlohmann/json.hpp>
#include <optional>
#include <sstream>
#include <string>
#include <vector>

#include "cli_support.hpp"
#include "gutterwatt/calendar.hpp"
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

// An invented 5-minute record on Los Angeles clock stamps (naive, as a local gauge logs them),
// over [from, to): 0.1 mm in each 5 minutes of 06:00-07:00 local every day, dry otherwise.
std::string local_five_minute_record(Instant from, Instant to) {
  const std::optional<TimeZone> zone = TimeZone::named("America/Los_Angeles");
  std::string text = "time,rain_mm\n";
  for (Instant t = from + 300; t <= to; t += 300) {
    const std::string stamp = format_iso8601(t, zone.value_or(TimeZone{})).substr(0, 16);
    const int minute = std::stoi(stamp.substr(11, 2)) * 60 + std::stoi(stamp.substr(14, 2));
    text += stamp + (minute > 6 * 60 && minute <= 7 * 60 ? ",0.1\n" : ",0\n");
  }
  return text;
}

// Daily totals as a series at local midnights across a change of daylight saving, spread by
// fragments of the local record: each calendar day keeps its total, and a 23 h or 25 h day takes
// a day's pattern stretched over it (README, "Rain records"), so the 06:00-07:00 rain lands
// within 05:00-08:00 local. `days` are the stamps' dates (each ends the day before), `wet` the
// one with 4.6 mm.
void spreads_calendar_days(const std::string& name, const std::string& period, Instant fine_from,
                           Instant fine_to, const std::vector<std::string>& days,
                           const std::string& wet, const std::string& wet_day) {
  const fs::path dir = scratch(name);
  std::string daily = "time,rain_mm\n";
  for (const std::string& day : days) daily += day + "T00:00," + (day == wet ? "4.6\n" : "0\n");
  write_file(dir / "fine.csv", local_five_minute_record(fine_from, fine_to));
  write_file(dir / "rain.csv", daily);
  std::string scenario = la_site("{capacity_Wh: 20}", period + ", output_interval: 1h}");
  scenario.replace(scenario.find("step: 5min, gaps: zero}"), 23,
                   "gaps: error, disaggregate: {method: fragments, step: 5min, "
                   "calibrate_with: {file: fine.csv}}}");
  write_file(dir / "s.yaml", scenario);
  const Outcome r = run("run " + (dir / "s.yaml").string() + " --realizations 1 --quiet --out " +
                            (dir / "out").string(),
                        dir);
  ASSERT_EQ(r.status, 0) << r.err;
  const auto summary = nlohmann::json::parse(slurp(dir / "out" / "summary.json"));
  EXPECT_EQ(summary["rain"]["depth_mm"], 4.6);
  // Hourly rows end at their stamps: the rain of 05:00-08:00 is in the rows of 06:00 to 08:00.
  std::istringstream series(slurp(dir / "out" / "timeseries.csv"));
  double inside_mm = 0.0;
  for (std::string row; std::getline(series, row);) {
    const bool in_window = row.starts_with(wet_day + "T06:00") ||
                           row.starts_with(wet_day + "T07:00") ||
                           row.starts_with(wet_day + "T08:00");
    if (in_window) inside_mm += std::stod(row.substr(row.find(',') + 1));
  }
  EXPECT_NEAR(inside_mm, 4.6, 1e-3);
}

TEST(LocalTime, FragmentsSpreadCalendarDaysOfASeries) {
  // 9 March 2025 is 23 h in Los Angeles; 1 March 00:00 PST is kStart + 8 h, 21 March 00:00 PDT
  // 20 days later less an hour.
  spreads_calendar_days(
      "local-fragments-spring", "{start: 2025-03-05T00:00, end: 2025-03-11T00:00",
      test_support::kStart + 8 * 3600, test_support::kStart + 8 * 3600 + 20 * 86400 - 3600,
      {"2025-03-06", "2025-03-07", "2025-03-08", "2025-03-09", "2025-03-10", "2025-03-11"},
      "2025-03-10", "2025-03-09");
  // 2 November is 25 h; 20 October 00:00 PDT is 233 days after 1 March (by hand) at 07:00Z, 10
  // November 00:00 PST 21 days and an hour later.
  const Instant oct20 = test_support::kStart + 233 * 86400 + 7 * 3600;
  spreads_calendar_days(
      "local-fragments-autumn", "{start: 2025-10-30T00:00, end: 2025-11-05T00:00", oct20,
      oct20 + 21 * 86400 + 3600,
      {"2025-10-31", "2025-11-01", "2025-11-02", "2025-11-03", "2025-11-04", "2025-11-05"},
      "2025-11-03", "2025-11-02");
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
