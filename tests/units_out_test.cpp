// End-to-end tests of --units us|si (issue #15, "Units out"): the same run written in SI and in
// US customary units, compared cell by cell through the exact factors.
//
// The factors are written here from the source, not taken from the code under test: NIST
// Handbook 44, Appendix C (1959 international yard and pound agreement), REFERENCES.md section
// 11: 1 in = 25.4 mm, 1 ft = 0.3048 m, 1 US gal = 231 in^3 = 3.785411784 L, so 1 gpm =
// 3.785411784 / 60 L/s.

#include <gtest/gtest.h>

#include <cmath>
#include <filesystem>
#include <map>
#include <sstream>
#include <string>
#include <tuple>
#include <vector>

#include "cli_support.hpp"

namespace fs = std::filesystem;
using namespace gutterwatt::cli_support;

namespace {

constexpr double kMmPerIn = 25.4;
constexpr double kMPerFt = 0.3048;
constexpr double kLPerGal = 3.785411784;

/// A CSV's header and rows as text cells (no quoted fields in these files).
struct Table {
  std::vector<std::string> header;
  std::vector<std::vector<std::string>> rows;
};

std::vector<std::string> split(const std::string& line) {
  std::vector<std::string> cells;
  std::stringstream in(line);
  for (std::string cell; std::getline(in, cell, ',');) cells.push_back(cell);
  if (!line.empty() && line.back() == ',') cells.emplace_back();
  return cells;
}

Table read_table(const fs::path& file) {
  std::istringstream in(slurp(file));
  Table t;
  std::string line;
  std::getline(in, line);
  t.header = split(line);
  while (std::getline(in, line)) t.rows.push_back(split(line));
  return t;
}

/// SI column name -> (US column name, SI per US unit). Columns not listed keep their name and
/// value.
const std::map<std::string, std::pair<std::string, double>> kTwins = {
    {"rain_mm", {"rain_in", kMmPerIn}},
    {"roof_runoff_L", {"roof_runoff_gal", kLPerGal}},
    {"reservoir_level_mm", {"reservoir_level_in", kMmPerIn}},
    {"release_L", {"release_gal", kLPerGal}},
    {"reservoir_overflow_L", {"reservoir_overflow_gal", kLPerGal}},
    {"column_overflow_L", {"column_overflow_gal", kLPerGal}},
    {"nozzle_L", {"nozzle_gal", kLPerGal}},
    {"head_m", {"head_ft", kMPerFt}},
    {"cum_overflow_L", {"cum_overflow_gal", kLPerGal}},
    {"volume_L", {"volume_gal", kLPerGal}},
    {"peak_flow_L_per_s", {"peak_flow_gpm", kLPerGal / 60.0}},
};

/// Decimals of a cell as written (`0.125` 3, `4` 0).
int decimals(const std::string& cell) {
  const std::size_t dot = cell.find('.');
  return dot == std::string::npos ? 0 : static_cast<int>(cell.size() - dot - 1);
}

/// Every cell of `us` against the same cell of `si`: the twin name, and the value times the
/// exact factor within the rounding of both cells (each written to at most its decimals, so the
/// two roundings add: 0.5 in the last place of each, the US one scaled by the factor).
void expect_twins(const Table& si, const Table& us) {
  ASSERT_EQ(si.header.size(), us.header.size());
  ASSERT_EQ(si.rows.size(), us.rows.size());
  ASSERT_GT(si.rows.size(), 0u);
  for (std::size_t c = 0; c < si.header.size(); ++c) {
    const auto twin = kTwins.find(si.header[c]);
    const bool converted = twin != kTwins.end();
    EXPECT_EQ(us.header[c], converted ? twin->second.first : si.header[c]);
    const double factor = converted ? twin->second.second : 1.0;
    for (std::size_t r = 0; r < si.rows.size(); ++r) {
      const std::string& a = si.rows[r][c];
      const std::string& b = us.rows[r][c];
      char* end = nullptr;
      const double x = std::strtod(a.c_str(), &end);
      if (a.empty() || *end != '\0') {
        EXPECT_EQ(a, b) << si.header[c] << " row " << r;  // text: time, state, kind
        continue;
      }
      const double y = std::strtod(b.c_str(), nullptr);
      const double tolerance =
          0.5 * std::pow(10.0, -decimals(a)) + 0.5 * factor * std::pow(10.0, -decimals(b)) + 1e-12;
      EXPECT_NEAR(y * factor, x, tolerance)
          << si.header[c] << " row " << r << ": " << a << " " << b;
    }
  }
}

/// The us-demo scenario run in `units` into dir/units.
Outcome run_us_demo(const fs::path& dir, const std::string& units) {
  return run("run " + source("scenarios/us-demo.yaml") + " --units " + units + " --out " +
                 (dir / units).string(),
             dir);
}

}  // namespace

TEST(UnitsOut, UsRunWritesTwinColumnsWithValuesByTheExactFactors) {
  const fs::path dir = scratch("units-out-run");
  ASSERT_EQ(run_us_demo(dir, "si").status, 0);
  const Outcome us = run_us_demo(dir, "us");
  ASSERT_EQ(us.status, 0) << us.err;
  const Table ts_si = read_table(dir / "si" / "timeseries.csv");
  const Table ts_us = read_table(dir / "us" / "timeseries.csv");
  // The header in US units, as the issue names it.
  std::string header;
  for (const std::string& h : ts_us.header) header += h + ",";
  EXPECT_EQ(header,
            "time,rain_in,roof_runoff_gal,reservoir_level_in,release_state,release_gal,"
            "reservoir_overflow_gal,column_overflow_gal,nozzle_gal,head_ft,power_W,energy_Wh,"
            "battery_soc,cum_energy_Wh,cum_overflow_gal,");
  expect_twins(ts_si, ts_us);
  const Table ev_si = read_table(dir / "si" / "events.csv");
  const Table ev_us = read_table(dir / "us" / "events.csv");
  std::string events_header;
  for (const std::string& h : ev_us.header) events_header += h + ",";
  EXPECT_EQ(events_header, "kind,start,end,duration_s,volume_gal,peak_flow_gpm,energy_Wh,");
  expect_twins(ev_si, ev_us);
}

TEST(UnitsOut, SummaryJsonStaysSiWhateverTheUnits) {
  const fs::path dir = scratch("units-out-summary");
  ASSERT_EQ(run_us_demo(dir, "si").status, 0);
  ASSERT_EQ(run_us_demo(dir, "us").status, 0);
  const std::string si = slurp(dir / "si" / "summary.json");
  const std::string us = slurp(dir / "us" / "summary.json");
  // Every number is SI either way; only the warnings' text, written for the page in the units
  // the run was asked for, differs (the last key in the file, sorted by name before `water_L`).
  const auto numbers = [](const std::string& text) {
    const std::size_t from = text.find("  \"warnings\": {");
    const std::size_t to = text.find("  \"water_L\"");
    return text.substr(0, from) + text.substr(to);
  };
  EXPECT_EQ(numbers(us), numbers(si));
  EXPECT_NE(us.find("in/h of rain to prime"), std::string::npos);
  EXPECT_NE(si.find("mm/h of rain to prime"), std::string::npos);
  EXPECT_NE(si.find("\"water_L\""), std::string::npos);
}

TEST(UnitsOut, TerminalTableShowsUsUnits) {
  const fs::path dir = scratch("units-out-table");
  const Outcome r = run_us_demo(dir, "us");
  ASSERT_EQ(r.status, 0) << r.err;
  EXPECT_NE(r.out.find("  rain on the roof "), std::string::npos) << r.out;
  EXPECT_NE(r.out.find("  gal\n"), std::string::npos) << r.out;
  EXPECT_NE(r.out.find("  in/h\n"), std::string::npos) << r.out;
  EXPECT_EQ(r.out.find("  L\n"), std::string::npos) << r.out;
  EXPECT_EQ(r.out.find("mm/h"), std::string::npos) << r.out;
  EXPECT_NE(r.out.find("rain in  energy Wh   cycles  overflows  overflow gal  dribble gal\n"),
            std::string::npos)
      << r.out;
  // The same litres, by the exact factor, as the SI table prints them (three figures each).
  const Outcome si = run_us_demo(dir, "si");
  ASSERT_EQ(si.status, 0) << si.err;
  const auto figure = [](const std::string& out, const std::string& label) {
    const std::size_t at = out.find("  " + label + " ");
    return std::strtod(out.c_str() + out.find_first_not_of(' ', at + 2 + label.size()), nullptr);
  };
  const double gal = figure(r.out, "rain on the roof");
  const double litres = figure(si.out, "rain on the roof");
  EXPECT_NEAR(gal * kLPerGal, litres, 0.005 * litres);
}

TEST(UnitsOut, SiteUnitsIsTheDefaultAndTheOptionOverridesIt) {
  const fs::path dir = scratch("units-out-key");
  const Outcome us = run("run " + source("scenarios/us-demo.yaml") +
                             " --set site.units=us --quiet --out " + (dir / "key").string(),
                         dir);
  ASSERT_EQ(us.status, 0) << us.err;
  EXPECT_NE(slurp(dir / "key" / "timeseries.csv").find(",rain_in,"), std::string::npos);
  const Outcome si =
      run("run " + source("scenarios/us-demo.yaml") +
              " --set site.units=us --units si --quiet --out " + (dir / "option").string(),
          dir);
  ASSERT_EQ(si.status, 0) << si.err;
  EXPECT_NE(slurp(dir / "option" / "timeseries.csv").find(",rain_mm,"), std::string::npos);
}

TEST(UnitsOut, BadUnitsAreExitTwo) {
  const fs::path dir = scratch("units-out-bad");
  for (const char* command : {"run", "check", "sweep"}) {
    const Outcome r =
        run(std::string(command) + " " + source("scenarios/us-demo.yaml") +
                " --units imperial --vary roof.area_m2=40,50 --out " + (dir / "out").string(),
            dir);
    EXPECT_EQ(r.status, 2) << command;
    EXPECT_EQ(lines(r.err), 1) << r.err;
    EXPECT_NE(r.err.find("--units"), std::string::npos) << r.err;
  }
  const Outcome report = run("report " + dir.string() + " --units metric", dir);
  EXPECT_EQ(report.status, 2);
  EXPECT_NE(report.err.find("--units"), std::string::npos) << report.err;
  std::string text = slurp(source("scenarios/us-demo.yaml"));
  text.replace(text.find("site: {"), 7, "site: {units: metric, ");
  write_file(dir / "bad.yaml", text);
  expect_bad(
      run("check --no-rain " + (dir / "bad.yaml").string(), dir),
      (dir / "bad.yaml").string() + ":9: site.units: expected one of si or us, got \"metric\"");
  EXPECT_FALSE(fs::exists(dir / "out"));
}

TEST(UnitsOut, ReportOnAUsRunRendersInUsUnitsOrInSi) {
  const fs::path dir = scratch("units-out-report");
  ASSERT_EQ(run_us_demo(dir, "us").status, 0);
  const Outcome us = run("report " + (dir / "us").string(), dir);
  ASSERT_EQ(us.status, 0) << us.err;
  const std::string page = slurp(dir / "us" / "report.html");
  EXPECT_NE(page.find("Rain, in per "), std::string::npos);
  EXPECT_NE(page.find("Reservoir level, in above the floor"), std::string::npos);
  EXPECT_NE(page.find("\xC2\xA0gal"), std::string::npos);
  EXPECT_EQ(page.find("\xC2\xA0L<"), std::string::npos);
  const Outcome si = run("report " + (dir / "us").string() + " --units si", dir);
  ASSERT_EQ(si.status, 0) << si.err;
  const std::string si_page = slurp(dir / "us" / "report.html");
  EXPECT_NE(si_page.find("Rain, mm per "), std::string::npos);
  EXPECT_NE(si_page.find("\xC2\xA0L<"), std::string::npos);
}

TEST(UnitsOut, CheckPrintsUsFigures) {
  const fs::path dir = scratch("units-out-check");
  const Outcome us =
      run("check --no-rain " + source("scenarios/us-demo.yaml") + " --units us", dir);
  ASSERT_EQ(us.status, 0) << us.err;
  const Outcome si =
      run("check --no-rain " + source("scenarios/us-demo.yaml") + " --units si", dir);
  ASSERT_EQ(si.status, 0) << si.err;
  // label -> (SI unit, US unit, SI per US unit)
  const std::vector<std::tuple<std::string, std::string, std::string, double>> figures = {
      {"storage between the set-points", "L", "gal", kLPerGal},
      {"running flow at the set-point", "L/min", "gpm", kLPerGal},
      {"design head (head column brim-full)", "m", "ft", kMPerFt},
      {"jet velocity", "m/s", "ft/s", kMPerFt},
      {"rain that overflows the rim while the release runs", "mm/h", "in/h", kMmPerIn},
  };
  for (const auto& [label, si_unit, us_unit, factor] : figures) {
    const auto value = [&](const std::string& out, const std::string& unit) {
      const std::size_t at = out.find("  " + label + " ");
      EXPECT_NE(at, std::string::npos) << label;
      const std::size_t eol = out.find('\n', at);
      const std::string line = out.substr(at, eol - at);
      EXPECT_TRUE(line.ends_with("  " + unit)) << line;
      return std::strtod(line.c_str() + line.find_first_not_of(' ', 2 + label.size()), nullptr);
    };
    // Both printed to three figures: within 0.5 % of each other through the factor.
    const double s = value(si.out, si_unit);
    EXPECT_NEAR(value(us.out, us_unit) * factor, s, 0.005 * s) << label;
  }
}

TEST(UnitsOut, SweepWritesUsMetricsAndItsReportRenders) {
  const fs::path site = fixture_site("units-out-sweep");
  const std::string sweep = "sweep " + (site / "shed.yaml").string() +
                            " --vary release.trigger_level_mm=40,50 --rank overflow_gal --out ";
  const Outcome us = run(sweep + (site / "us").string() + " --units us", site);
  ASSERT_EQ(us.status, 0) << us.err;
  EXPECT_NE(us.out.find("best first by overflow_gal (lowest first)"), std::string::npos) << us.out;
  const Outcome si = run(sweep + (site / "si").string(), site);
  ASSERT_EQ(si.status, 0) << si.err;
  const Table a = read_table(site / "si" / "sweep.csv");
  const Table b = read_table(site / "us" / "sweep.csv");
  ASSERT_EQ(a.header.size(), b.header.size());
  ASSERT_EQ(a.rows.size(), b.rows.size());
  for (std::size_t c = 0; c < a.header.size(); ++c) {
    const bool litres = a.header[c].ends_with("_L");
    EXPECT_EQ(b.header[c],
              litres ? a.header[c].substr(0, a.header[c].size() - 1) + "gal" : a.header[c]);
    for (std::size_t r = 0; r < a.rows.size(); ++r) {
      const double x = std::strtod(a.rows[r][c].c_str(), nullptr);
      const double y = std::strtod(b.rows[r][c].c_str(), nullptr);
      // sweep.csv writes each value exactly (shortest round trip): only the factor differs.
      EXPECT_NEAR(y * (litres ? kLPerGal : 1.0), x, 1e-12 * std::abs(x)) << a.header[c];
    }
  }
  ASSERT_EQ(run("report " + (site / "us").string(), site).status, 0);
  const std::string page = slurp(site / "us" / "report.html");
  EXPECT_NE(page.find("overflow_<wbr>gal"), std::string::npos);
  EXPECT_NE(page.find("Overflow, gal"), std::string::npos);
}

// A strftime format starts with %, which YAML reads as a directive: --set takes it unquoted.
TEST(UnitsOut, SetTakesATimeFormatUnquoted) {
  const fs::path dir = scratch("units-out-time-format");
  const Outcome given = run("check " + source("scenarios/us-demo.yaml"), dir);
  ASSERT_EQ(given.status, 0) << given.err;
  const Outcome set = run("check " + source("scenarios/us-demo.yaml") +
                              " --set 'rain.time_format=%m/%d/%Y %I:%M:%S %p'",
                          dir);
  ASSERT_EQ(set.status, 0) << set.err;
  EXPECT_EQ(set.out, given.out);
  const Outcome wrong = run("check " + source("scenarios/us-demo.yaml") +
                                " --set 'rain.time_format=%d/%m/%Y %I:%M:%S %p'",
                            dir);
  EXPECT_EQ(wrong.status, 2);
  EXPECT_NE(wrong.err.find("does not match rain.time_format \"%d/%m/%Y %I:%M:%S %p\""),
            std::string::npos)
      << wrong.err;
}
