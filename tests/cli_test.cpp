// End-to-end tests: the built gutterwatt executable run as a user would run it.

#include <gtest/gtest.h>

#include <algorithm>
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <map>
#include <nlohmann/json.hpp>
#include <regex>
#include <sstream>
#include <string>

#include "cli_support.hpp"
#include "gutterwatt/realizations.hpp"

namespace fs = std::filesystem;
using namespace gutterwatt::cli_support;

TEST(Cli, DemoRunWritesThreeFilesWithEnergyAndAClosedBalance) {
  const fs::path dir = scratch("cli-demo");
  const Outcome r =
      run("run " + source("scenarios/demo.yaml") + " --out " + (dir / "out").string(), dir);
  ASSERT_EQ(r.status, 0) << r.err;
  EXPECT_NE(r.out.find("siphon cycles"), std::string::npos);
  for (const char* f : {"timeseries.csv", "events.csv", "summary.json"}) {
    EXPECT_TRUE(fs::exists(dir / "out" / f)) << f;
  }
  const auto summary = nlohmann::json::parse(slurp(dir / "out" / "summary.json"));
  EXPECT_GT(summary["energy_Wh"]["electrical"].get<double>(), 1.0);
  EXPECT_GT(summary["siphon"]["cycles"].get<int>(), 10);
  EXPECT_GT(summary["water_L"]["dribble"].get<double>(), 0.0);
  EXPECT_GT(summary["overflow"]["events"].get<int>(), 0);
  EXPECT_LT(summary["water_L"]["balance_relative_error"].get<double>(), 1e-9);
  const auto& w = summary["water_L"];
  const double closing = w["rain"].get<double>() - w["roof_loss"].get<double>() -
                         w["first_flush"].get<double>() - w["reservoir_overflow"].get<double>() -
                         w["column_overflow"].get<double>() - w["through_nozzle"].get<double>() -
                         w["evaporation"].get<double>() - w["storage_change"].get<double>();
  EXPECT_GT(w["evaporation"].get<double>(), 0.0);
  EXPECT_GT(summary["standing_water"]["days_total"].get<double>(), 0.0);
  // The demo's lead-acid preset: cut at half charge, reconnected at 70 % (common practice).
  EXPECT_EQ(summary["battery"]["cut_soc"].get<double>(), 0.5);
  EXPECT_EQ(summary["battery"]["reconnect_soc"].get<double>(), 0.7);
  EXPECT_NEAR(closing, 0.0, 1e-3);  // the printed accounts are rounded to 1e-6 L each
  EXPECT_EQ(summary["months"].size(), 9u);
  const std::string ts = slurp(dir / "out" / "timeseries.csv");
  EXPECT_EQ(ts.substr(0, ts.find('\n')),
            "time,rain_mm,roof_runoff_L,reservoir_level_mm,release_state,release_L,"
            "reservoir_overflow_L,column_overflow_L,nozzle_L,head_m,power_W,energy_Wh,battery_soc,"
            "cum_energy_Wh,cum_overflow_L");
  // 2025-03-01T00:00 to 2025-11-30T23:55 at 1 h: 275 days, 6599 full hours and a last
  // partial row.
  EXPECT_EQ(lines(ts), 1 + 6600);
  const std::string ev = slurp(dir / "out" / "events.csv");
  EXPECT_EQ(ev.substr(0, ev.find('\n')),
            "kind,start,end,duration_s,volume_L,peak_flow_L_per_s,energy_Wh");
  EXPECT_NE(ev.find("\ncycle,"), std::string::npos);
  EXPECT_NE(ev.find("\ndribble,"), std::string::npos);
  EXPECT_NE(ev.find("\noverflow,"), std::string::npos);
  // An overflow makes no energy: its energy_Wh cell is empty.
  std::istringstream rows(ev);
  for (std::string row; std::getline(rows, row);) {
    if (row.rfind("overflow,", 0) == 0) {
      EXPECT_EQ(row.back(), ',') << row;
    }
  }
}

TEST(Cli, TerminalAndPageShowTheSameSharesOfRoofRunoff) {
  const fs::path dir = scratch("cli-shares");
  const Outcome r =
      run("run " + source("scenarios/demo.yaml") + " --out " + (dir / "out").string(), dir);
  ASSERT_EQ(r.status, 0) << r.err;
  ASSERT_EQ(run("report " + (dir / "out").string(), dir).status, 0);
  const std::string page = slurp(dir / "out" / "report.html");
  std::smatch term, html;
  for (const auto& [row, words] :
       {std::pair<std::string, std::string>{"through the nozzle", "passed the nozzle"},
        {"overflow \\(rim and head column\\)", "overflowed"},
        {"  of which dribble", "dribbled through"}}) {
    // The terminal's share row comes after its litres row of the same name.
    const std::string shares = r.out.substr(r.out.find(" shares of roof runoff"));
    ASSERT_TRUE(std::regex_search(shares, term, std::regex(" " + row + " +(\\S+)  %"))) << row;
    ASSERT_TRUE(std::regex_search(page, html, std::regex("\\(([^()]+)\xC2\xA0%\\) " + words)))
        << words;
    EXPECT_EQ(term[1].str(), html[1].str()) << row;
  }
  // summary.json's overflow share counts the same water: the rim and the head column.
  const auto summary = nlohmann::json::parse(slurp(dir / "out" / "summary.json"));
  const auto& w = summary["water_L"];
  EXPECT_GT(w["column_overflow"].get<double>(), 0.0);
  EXPECT_NEAR(summary["overflow"]["share_of_runoff"].get<double>(),
              (w["reservoir_overflow"].get<double>() + w["column_overflow"].get<double>()) /
                  w["roof_runoff"].get<double>(),
              1e-6);
}

TEST(Cli, CheckShowsADailyRecordAsReadAndAsDisaggregated) {
  const fs::path dir = scratch("cli-check-daily");
  const Outcome r = run("check " + source("scenarios/daily-demo.yaml"), dir);
  ASSERT_EQ(r.status, 0) << r.err;
  // No day of the invented season averages the 3.33 mm/h that primes the siphon.
  EXPECT_NE(r.out.find("  record as read, 1d steps\n"
                       "    median wet intensity                                      0.205  mm/h\n"
                       "    rain volume below the priming intensity                     100  %\n"),
            std::string::npos)
      << r.out;
  EXPECT_NE(r.out.find("  record disaggregated by cascade, 5min steps\n"), std::string::npos);
}

// The daily demo spread by the method of fragments from the invented nearby gauge: check shows
// the record as disaggregated, run draws realizations, and being calibrated it prints neither the
// uncalibrated cascade's warning nor the methods' span.
TEST(Cli, FragmentsRunFromTheWalkthroughScenario) {
  const fs::path dir = scratch("cli-fragments");
  const std::string scenario = source("scenarios/daily-fragments.yaml");
  const Outcome check = run("check " + scenario, dir);
  ASSERT_EQ(check.status, 0) << check.err;
  EXPECT_NE(check.out.find("  record disaggregated by fragments, 5min steps\n"), std::string::npos)
      << check.out;
  EXPECT_NE(check.out.find("  1d intervals deep enough to prime on their own ("), std::string::npos)
      << check.out;
  const Outcome r =
      run("run " + scenario + " --quiet --realizations 3 --out " + (dir / "out").string(), dir);
  ASSERT_EQ(r.status, 0) << r.err;
  EXPECT_EQ(r.err.find("uncalibrated"), std::string::npos) << r.err;
  EXPECT_EQ(r.err.find("the methods give"), std::string::npos) << r.err;
  const auto summary = nlohmann::json::parse(slurp(dir / "out" / "summary.json"));
  EXPECT_EQ(summary["realizations"]["n"].get<int>(), 3);
  // As many again on resamples of the calibration record, their spread beside the draws'.
  const auto& resampled = summary["realizations"]["calibration_resampled"];
  EXPECT_EQ(resampled["n"].get<int>(), 3);
  EXPECT_EQ(resampled["resampled"].get<std::string>(), gutterwatt::kCalibrationResample);
  const auto& energy = resampled["energy_Wh"];
  EXPECT_LE(energy["p10"].get<double>(), energy["p50"].get<double>());
  EXPECT_LE(energy["p50"].get<double>(), energy["p90"].get<double>());
}

// The decade walkthrough (README): ten years of invented daily totals spread by fragments of one
// year from a nearby gauge. Every year keeps its rain, summed here from the file itself, and the
// range with the calibration record resampled is written beside the draws'.
TEST(Cli, DecadeWalkthroughKeepsEachYearsRain) {
  const fs::path dir = scratch("cli-decade");
  std::map<std::string, double> year_mm;
  std::istringstream daily(slurp(source("data/demo/decade-daily.csv")));
  for (std::string line; std::getline(daily, line);) {
    if (line.empty() || line[0] == '#' || line.rfind("date", 0) == 0) continue;
    year_mm[line.substr(0, 4)] += std::stod(line.substr(line.find(',') + 1));
  }
  ASSERT_EQ(year_mm.size(), 10u);
  const Outcome r = run("run " + source("scenarios/decade-daily.yaml") +
                            " --quiet --realizations 2 --out " + (dir / "out").string(),
                        dir);
  ASSERT_EQ(r.status, 0) << r.err;
  const auto summary = nlohmann::json::parse(slurp(dir / "out" / "summary.json"));
  ASSERT_EQ(summary["years"].size(), 10u);
  for (const auto& year : summary["years"]) {
    const std::string label = year["year"].get<std::string>();
    EXPECT_NEAR(year["rain_mm"].get<double>(), year_mm[label], 1e-6) << label;
  }
  EXPECT_EQ(summary["realizations"]["calibration_resampled"]["n"].get<int>(), 2);
}

// The spread of three realizations against three single runs made with the seeds 1, 2, 3.
// source: Hyndman & Fan (1996) definition 7 worked by hand for n = 3: h = 2p + 1, so
// P10 = x1 + 0.2 (x2 - x1), P50 = x2, P90 = x2 + 0.8 (x3 - x2).
TEST(Cli, RealizationsReportTheSpreadOfSeparateSeeds) {
  const fs::path dir = scratch("cli-realizations");
  const std::string scenario = source("scenarios/daily-demo.yaml");
  const Outcome r =
      run("run " + scenario + " --realizations 3 --out " + (dir / "all").string(), dir);
  ASSERT_EQ(r.status, 0) << r.err;
  EXPECT_NE(r.out.find(" realizations: 3 disaggregations of the record (seeds 1 to 3; this run "
                       "is the first)\n"),
            std::string::npos)
      << r.out;
  std::vector<double> energy;
  for (int seed = 1; seed <= 3; ++seed) {
    const std::string out = (dir / ("seed" + std::to_string(seed))).string();
    const Outcome one =
        run("run " + scenario + " --quiet --set rain.disaggregate.seed=" + std::to_string(seed) +
                " --realizations 1 --out " + out,
            dir);
    ASSERT_EQ(one.status, 0) << one.err;
    const auto summary = nlohmann::json::parse(slurp(fs::path(out) / "summary.json"));
    EXPECT_FALSE(summary.contains("realizations"));
    energy.push_back(summary["energy_Wh"]["electrical"].get<double>());
  }
  const auto all = nlohmann::json::parse(slurp(dir / "all" / "summary.json"));
  // The cascade has no library to resample: its range is the draws' alone.
  EXPECT_FALSE(all["realizations"].contains("calibration_resampled"));
  EXPECT_EQ(r.out.find("calibration record resampled"), std::string::npos);
  // The written run is the first realization.
  EXPECT_EQ(all["energy_Wh"]["electrical"].get<double>(), energy[0]);
  std::sort(energy.begin(), energy.end());
  const auto& z = all["realizations"];
  EXPECT_EQ(z["n"].get<int>(), 3);
  EXPECT_EQ(z["seeds"], nlohmann::json::parse("[1, 3]"));
  EXPECT_EQ(z["percentiles"].get<std::string>(), "Hyndman & Fan (1996) definition 7");
  EXPECT_NEAR(z["energy_Wh"]["p10"].get<double>(), energy[0] + 0.2 * (energy[1] - energy[0]), 2e-6);
  EXPECT_NEAR(z["energy_Wh"]["p50"].get<double>(), energy[1], 2e-6);
  EXPECT_NEAR(z["energy_Wh"]["p90"].get<double>(), energy[1] + 0.8 * (energy[2] - energy[1]), 2e-6);
  for (const char* key : {"cycles", "reservoir_overflow_L", "dribble_L"}) {
    EXPECT_LE(z[key]["p10"].get<double>(), z[key]["p50"].get<double>()) << key;
    EXPECT_LE(z[key]["p50"].get<double>(), z[key]["p90"].get<double>()) << key;
  }
}

TEST(Cli, UncalibratedCascadeSaysHowFarApartTheMethodsAre) {
  const fs::path dir = scratch("cli-method-spread");
  const std::string scenario = source("scenarios/daily-demo.yaml");
  const Outcome r =
      run("run " + scenario + " --quiet --realizations 2 --out " + (dir / "all").string(), dir);
  ASSERT_EQ(r.status, 0) << r.err;
  const Outcome nrcs =
      run("run " + scenario + " --quiet --set rain.disaggregate.method=nrcs-II --out " +
              (dir / "nrcs").string(),
          dir);
  ASSERT_EQ(nrcs.status, 0) << nrcs.err;
  const double nrcs_Wh =
      nlohmann::json::parse(slurp(dir / "nrcs" / "summary.json"))["energy_Wh"]["electrical"]
          .get<double>();
  // The one number rule (three significant figures, zero is 0): block makes nothing; nrcs-II's
  // figure is summary.json's to three figures, within half a unit of the third.
  const std::string head = "warning: for this design the methods give block 0 Wh, nrcs-II ";
  const std::size_t at = r.err.find(head);
  ASSERT_NE(at, std::string::npos) << r.err;
  const std::size_t from = at + head.size();
  const std::size_t unit = r.err.find(" Wh, cascade ", from);
  ASSERT_NE(unit, std::string::npos) << r.err;
  const std::string shown = r.err.substr(from, unit - from);
  EXPECT_NEAR(std::stod(shown), nrcs_Wh, 0.005 * nrcs_Wh) << shown;
  EXPECT_NE(r.err.find("(median of 2 realizations): with uncalibrated defaults the answer is a "
                       "guess within this span\n"),
            std::string::npos)
      << r.err;
}

TEST(Cli, RealizationsNeedARandomDisaggregation) {
  const fs::path dir = scratch("cli-realizations-as-read");
  expect_bad(run("run " + source("scenarios/demo.yaml") + " --realizations 5 --out " +
                     (dir / "out").string(),
                 dir),
             "--realizations: the record is used as read (no rain.disaggregate), so every "
             "realization would be the same run; leave --realizations out");
  expect_bad(run("run " + source("scenarios/daily-demo.yaml") +
                     " --set rain.disaggregate.method=nrcs-II --realizations 5 --out " +
                     (dir / "out").string(),
                 dir),
             "--realizations: method: nrcs-II spreads the record the same way every time, so "
             "every realization would be the same run; use method: cascade or fragments, or leave "
             "--realizations out");
  EXPECT_FALSE(fs::exists(dir / "out"));
}

TEST(Cli, CheckPrintsFiguresWarningsAndCautions) {
  const fs::path dir = scratch("cli-check");
  const Outcome r = run("check " + source("scenarios/demo.yaml"), dir);
  ASSERT_EQ(r.status, 0) << r.err;
  for (const char* s :
       {"storage between the set-points", "priming flow as steady rain",
        "running flow at the set-point", "nozzle flow at design head", "jet velocity",
        "electrical power at design head", "rain that overflows the rim", "Warnings", "Cautions",
        "Working at height", "Local building"}) {
    EXPECT_NE(r.out.find(s), std::string::npos) << s;
  }
}

TEST(Cli, MisspeltKeyIsOneLineExitTwoNamingFileLineAndKey) {
  const fs::path dir = scratch("cli-misspelt");
  std::string text = slurp(source("scenarios/demo.yaml"));
  const std::string good = "runoff_coefficient";
  text.replace(text.find(good), good.size(), "runof_coefficient");
  std::ofstream(dir / "bad.yaml") << text;
  const Outcome r =
      run("run " + (dir / "bad.yaml").string() + " --out " + (dir / "out").string(), dir);
  EXPECT_EQ(r.status, 2);
  EXPECT_EQ(lines(r.err), 1) << r.err;
  EXPECT_NE(r.err.find("bad.yaml:11: roof.runof_coefficient: unknown key; did you mean "
                       "runoff_coefficient?"),
            std::string::npos)
      << r.err;
}

TEST(Cli, FailedRunLeavesEarlierResultsUntouched) {
  const fs::path dir = scratch("cli-untouched");
  const fs::path out = dir / "out";
  ASSERT_EQ(
      run("run " + source("scenarios/demo.yaml") + " --quiet --out " + out.string(), dir).status,
      0);
  const std::string before = slurp(out / "summary.json");
  const Outcome r = run(
      "run " + source("scenarios/demo.yaml") + " --set roof.area_m2=-3 --out " + out.string(), dir);
  EXPECT_EQ(r.status, 2);
  EXPECT_EQ(r.err, "gutterwatt: error: --set: roof.area_m2: must be > 0 (got -3)\n");
  EXPECT_EQ(slurp(out / "summary.json"), before);
  for (const auto& entry : fs::directory_iterator(out)) {
    EXPECT_EQ(entry.path().filename().string().find(".tmp"), std::string::npos) << entry.path();
  }
}

TEST(Cli, UnknownCommandIsExitTwo) {
  const fs::path dir = scratch("cli-unknown");
  const Outcome r = run("simulate x.yaml", dir);
  EXPECT_EQ(r.status, 2);
  EXPECT_EQ(lines(r.err), 1) << r.err;
}

TEST(Cli, StormFileRunsUnchangedAsARainFile) {
  const fs::path dir = scratch("cli-storm");
  ASSERT_EQ(run("storm --kind nrcs-II --depth 40 --duration 24h --step 5min --start "
                "2025-06-01T00:00 --out " +
                    (dir / "storm.csv").string(),
                dir)
                .status,
            0);
  const Outcome r = run(
      "run " + source("scenarios/demo.yaml") + " --rain " + (dir / "storm.csv").string() +
          " --from 2025-06-01T00:00 --to 2025-06-02T00:00 --quiet --out " + (dir / "out").string(),
      dir);
  ASSERT_EQ(r.status, 0) << r.err;
  const auto summary = nlohmann::json::parse(slurp(dir / "out" / "summary.json"));
  EXPECT_NEAR(summary["rain"]["depth_mm"].get<double>(), 40.0, 1e-6);
  EXPECT_GT(summary["siphon"]["cycles"].get<int>(), 0);
}
