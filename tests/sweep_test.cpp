#include "gutterwatt/sweep.hpp"

#include <gtest/gtest.h>
#include <unistd.h>

#include <charconv>
#include <cmath>
#include <fstream>
#include <nlohmann/json.hpp>
#include <set>
#include <sstream>

#include "cli_support.hpp"
#include "gutterwatt/error.hpp"
#include "gutterwatt/rain_files.hpp"
#include "gutterwatt/units.hpp"

namespace gutterwatt::sweep_test {
namespace {

namespace fs = std::filesystem;
using cli_support::names_in;

// An invented site and three days of invented rain (tests/data/sweep/README.md).
const fs::path kFixtures = fs::path(GUTTERWATT_SOURCE_DIR) / "tests" / "data" / "sweep";
const fs::path kScenario = kFixtures / "shed.yaml";

std::string read_file(const fs::path& path) {
  std::ifstream in(path, std::ios::binary);
  std::ostringstream text;
  text << in.rdbuf();
  return text.str();
}

/// The message of the InputError that `f` throws.
template <typename F>
std::string error_of(F f) {
  try {
    f();
  } catch (const InputError& e) {
    return e.what();
  }
  return "no error";
}

std::vector<std::string> values_of(const std::string& spec) { return parse_vary(spec).values; }

SweepPlan plan_of(const std::vector<std::string>& vary, const std::vector<std::string>& set = {},
                  const std::string& rank = "energy_Wh") {
  return plan_sweep(read_file(kScenario), kScenario.string(), kScenario.parent_path(), vary, set,
                    rank);
}

/// A fresh, empty folder under the system's temporary folder, removed with its contents at the
/// end of the test.
class TempDir {
 public:
  explicit TempDir(const std::string& name)
      : path_(fs::temp_directory_path() /
              ("gutterwatt-sweep-test-" + std::to_string(::getpid()) + "-" + name)) {
    fs::remove_all(path_);
    fs::create_directories(path_);
  }
  ~TempDir() {
    std::error_code ec;
    fs::remove_all(path_, ec);
  }
  TempDir(const TempDir&) = delete;
  TempDir& operator=(const TempDir&) = delete;
  const fs::path& path() const { return path_; }

 private:
  fs::path path_;
};

std::vector<std::string> split(const std::string& line, char sep) {
  std::vector<std::string> out;
  std::stringstream in(line);
  std::string cell;
  while (std::getline(in, cell, sep)) out.push_back(cell);
  return out;
}

std::vector<std::string> lines_of(const std::string& text) {
  std::vector<std::string> out;
  std::stringstream in(text);
  std::string line;
  while (std::getline(in, line)) out.push_back(line);
  return out;
}

double read_double(const std::string& text) {
  double v = 0.0;
  std::from_chars(text.data(), text.data() + text.size(), v);
  return v;
}

SweepRow row_with(double energy_Wh, double overflow_L) {
  SweepRow row;
  row.metrics.energy_Wh = energy_Wh;
  row.metrics.overflow_L = overflow_L;
  return row;
}

TEST(SweepVary, ExpandsARangeIncludingItsEnd) {
  EXPECT_EQ(values_of("release.trigger_level_mm=30:50:10"),
            (std::vector<std::string>{"30", "40", "50"}));
}

TEST(SweepVary, StopsBelowTheEndWhenTheStepDoesNotReachIt) {
  EXPECT_EQ(values_of("k=0:10:3"), (std::vector<std::string>{"0", "3", "6", "9"}));
}

TEST(SweepVary, PrintsDecimalStepsWithoutFloatNoise) {
  // 0.1 + 2 * 0.1 is 0.30000000000000004 in binary floating point.
  EXPECT_EQ(values_of("k=0.1:0.5:0.1"),
            (std::vector<std::string>{"0.1", "0.2", "0.3", "0.4", "0.5"}));
  EXPECT_EQ(values_of("roof.runoff_coefficient=0.7:0.9:0.05"),
            (std::vector<std::string>{"0.7", "0.75", "0.8", "0.85", "0.9"}));
  EXPECT_EQ(values_of("k=-0.2:0.2:0.2"), (std::vector<std::string>{"-0.2", "0", "0.2"}));
}

TEST(SweepVary, ReachesAnEndThatFloatNoiseOvershoots) {
  ASSERT_GT(0.1 + 2 * 0.1, 0.3);
  EXPECT_EQ(values_of("k=0.1:0.3:0.1"), (std::vector<std::string>{"0.1", "0.2", "0.3"}));
  const std::vector<std::string> v = values_of("k=0:1:0.1");
  ASSERT_EQ(v.size(), 11u);
  EXPECT_EQ(v.back(), "1");
  EXPECT_EQ(values_of("k=1e-3:3e-3:1e-3"), (std::vector<std::string>{"0.001", "0.002", "0.003"}));
}

TEST(SweepVary, ReadsAListOfTextValues) {
  EXPECT_EQ(values_of("release.kind=bell, float_valve,orifice"),
            (std::vector<std::string>{"bell", "float_valve", "orifice"}));
  EXPECT_EQ(values_of("nozzle.diameter_mm=4"), (std::vector<std::string>{"4"}));
}

TEST(SweepVary, RejectsAZeroStep) {
  EXPECT_EQ(error_of([] { parse_vary("release.trigger_level_mm=30:50:0"); }),
            "--vary: release.trigger_level_mm: the step must be greater than 0 (got 0)");
}

TEST(SweepVary, RejectsANegativeStep) {
  EXPECT_EQ(error_of([] { parse_vary("release.trigger_level_mm=50:30:-10"); }),
            "--vary: release.trigger_level_mm: the step must be greater than 0 (got -10)");
}

TEST(SweepVary, RejectsABackwardsRange) {
  EXPECT_EQ(error_of([] { parse_vary("release.trigger_level_mm=60:40:5"); }),
            "--vary: release.trigger_level_mm: the range runs backwards (from 60 to 40); FROM "
            "must not exceed TO");
}

TEST(SweepVary, RejectsARangeWithoutThreeNumbers) {
  EXPECT_EQ(error_of([] { parse_vary("k=30:50"); }),
            "--vary: k: expected FROM:TO:STEP with three numbers (got \"30:50\")");
  EXPECT_EQ(error_of([] { parse_vary("k=30:fifty:5"); }),
            "--vary: k: expected FROM:TO:STEP with three numbers (got \"30:fifty:5\")");
}

TEST(SweepVary, RejectsASpecWithoutAKey) {
  EXPECT_EQ(error_of([] { parse_vary("30:50:10"); }),
            "--vary: expected KEY=FROM:TO:STEP or KEY=v1,v2,... (got \"30:50:10\")");
  EXPECT_EQ(error_of([] { parse_vary("k="); }), "--vary: k: no values after \"=\"");
}

TEST(SweepVary, RejectsEmptyAndRepeatedListValues) {
  EXPECT_EQ(error_of([] { parse_vary("release.kind=bell,,none"); }),
            "--vary: release.kind: empty value in the list \"bell,,none\"");
  EXPECT_EQ(error_of([] { parse_vary("release.kind=bell,none,bell"); }),
            "--vary: release.kind: the value \"bell\" is listed twice");
}

TEST(SweepVary, RejectsMoreValuesThanASweepMayHave) {
  EXPECT_EQ(error_of([] { parse_vary("k=0:1:0.000001"); }),
            "--vary: k: 1000001 values; a sweep is limited to 100000 combinations");
}

TEST(SweepCombinations, VaryTheFirstKeySlowest) {
  const std::vector<SweepAxis> axes{{"a", {"1", "2"}}, {"b", {"x", "y", "z"}}};
  const std::vector<std::vector<std::string>> expected{{"1", "x"}, {"1", "y"}, {"1", "z"},
                                                       {"2", "x"}, {"2", "y"}, {"2", "z"}};
  EXPECT_EQ(expand_combinations(axes), expected);
}

TEST(SweepCombinations, RejectsMoreThanTheLimit) {
  const std::vector<SweepAxis> axes{{"a", std::vector<std::string>(1000, "1")},
                                    {"b", std::vector<std::string>(101, "2")}};
  EXPECT_EQ(error_of([&] { expand_combinations(axes); }),
            "--vary: 101000 combinations; a sweep is limited to 100000");
}

TEST(SweepRanking, OrdersEachMetricBestFirstByDefault) {
  EXPECT_TRUE(parse_rank("energy_Wh").descending);
  EXPECT_TRUE(parse_rank("cycles").descending);
  EXPECT_FALSE(parse_rank("overflow_L").descending);
  EXPECT_FALSE(parse_rank("overflow_hours").descending);
  EXPECT_FALSE(parse_rank("dribble_share").descending);
  EXPECT_FALSE(parse_rank("unmet_load_Wh").descending);
  EXPECT_FALSE(parse_rank("curtailed_Wh").descending);
}

TEST(SweepRanking, TakesASignToForceTheOrder) {
  const SweepRank up = parse_rank("+energy_Wh");
  EXPECT_EQ(up.metric, "energy_Wh");
  EXPECT_FALSE(up.descending);
  const SweepRank down = parse_rank("-overflow_L");
  EXPECT_EQ(down.metric, "overflow_L");
  EXPECT_TRUE(down.descending);
}

TEST(SweepRanking, RejectsAnUnknownMetric) {
  EXPECT_EQ(
      error_of([] { parse_rank("energy"); }),
      "--rank: unknown metric \"energy\"; expected one of energy_Wh, overflow_L, dribble_L, "
      "cycles, overflow_events, overflow_hours, curtailed_Wh, jet_Wh, stored_Wh, "
      "unmet_load_Wh, dribble_share, overflow_days, largest_overflow_L, standing_longest_days, "
      "standing_spells_over_7_days (with - or + in front to force descending or ascending)");
}

TEST(SweepRanking, PutsTheBestFirstAndKeepsCombinationOrderForTies) {
  std::vector<SweepRow> rows{row_with(2.0, 5.0), row_with(3.0, 1.0), row_with(2.0, 1.0),
                             row_with(9.0, 0.0), row_with(3.0, 7.0)};
  rows[3].status = SweepStatus::skipped;
  EXPECT_EQ(rank_rows(rows, parse_rank("energy_Wh")), (std::vector<std::size_t>{1, 4, 0, 2}));
  EXPECT_EQ(rank_rows(rows, parse_rank("overflow_L")), (std::vector<std::size_t>{1, 2, 0, 4}));
  EXPECT_EQ(rank_rows(rows, parse_rank("+energy_Wh")), (std::vector<std::size_t>{0, 2, 1, 4}));
}

TEST(SweepPlan, RefusesToVaryARainKey) {
  EXPECT_EQ(error_of([] { plan_of({"rain.file=a.csv,b.csv"}); }),
            "--vary: rain.file: the rain record is read once for the whole sweep, so keys under "
            "rain. cannot be varied; sweep each record separately");
}

TEST(SweepPlan, RefusesAKeyBothVariedAndSet) {
  EXPECT_EQ(error_of([] {
              plan_of({"release.trigger_level_mm=30:50:10"}, {"release.trigger_level_mm=40"});
            }),
            "--vary: release.trigger_level_mm: is also given with --set; vary it or set it, not "
            "both");
}

TEST(SweepPlan, RefusesAKeyVariedTwice) {
  EXPECT_EQ(error_of([] {
              plan_of({"nozzle.diameter_mm=4", "nozzle.diameter_mm=5"});
            }),
            "--vary: nozzle.diameter_mm: is varied twice");
}

TEST(SweepPlan, NeedsAKeyToVary) {
  EXPECT_EQ(error_of([] { plan_of({}); }),
            "--vary: give at least one key to vary, as KEY=FROM:TO:STEP or KEY=v1,v2,...");
}

TEST(SweepPlan, BuildsEachCombinationsOverridesAfterTheSetOnes) {
  const SweepPlan plan =
      plan_of({"release.trigger_level_mm=30:40:10", "release.kind=bell,float_valve"},
              {"battery.load_W=0.05"});
  ASSERT_EQ(plan.combinations.size(), 4u);
  EXPECT_EQ(plan.overrides(1),
            (std::vector<std::string>{"battery.load_W=0.05", "release.trigger_level_mm=30",
                                      "release.kind=float_valve"}));
}

TEST(Sweep, RowsEqualSingleRunsWithTheSameOverrides) {
  const SweepPlan plan =
      plan_of({"release.trigger_level_mm=30:50:10", "release.kind=bell,float_valve"},
              {"battery.load_W=0.05"});
  const RainSeries rain = load_rain(plan.base.rain);
  const TempDir temp("single-runs");
  const fs::path& dir = temp.path();
  SweepOptions options;
  options.jobs = 2;
  run_sweep_into(dir, plan, rain, options);

  const std::vector<std::string> lines = lines_of(read_file(dir / "sweep.csv"));
  ASSERT_EQ(lines.size(), 7u);
  const std::vector<std::string> header = split(lines[0], ',');
  const std::vector<std::string> metrics = sweep_metric_names();
  ASSERT_EQ(header.size(), 2 + metrics.size());
  EXPECT_EQ(header[0], "release.trigger_level_mm");
  EXPECT_EQ(header[1], "release.kind");
  for (std::size_t l = 1; l < lines.size(); ++l) {
    const std::vector<std::string> cells = split(lines[l], ',');
    ASSERT_EQ(cells.size(), header.size());
    // What `gutterwatt run shed.yaml --set battery.load_W=0.05 --set ...` does.
    const Scenario scenario =
        load_scenario(kScenario, {"battery.load_W=0.05", "release.trigger_level_mm=" + cells[0],
                                  "release.kind=" + cells[1]});
    SummaryBuilder summary(scenario);
    const RunResult single = simulate(scenario, load_rain(scenario.rain), summary);
    const SweepMetrics expected = sweep_metrics(single, summary);
    for (std::size_t m = 0; m < metrics.size(); ++m) {
      EXPECT_EQ(cells[2 + m], format_metric(sweep_metric(expected, metrics[m])))
          << lines[l] << ": " << metrics[m];
    }
    EXPECT_EQ(read_double(cells[2]), single.totals.electrical_J / kJoulesPerWh) << lines[l];
  }
}

TEST(Sweep, WritesRowsBestFirstAndASummaryFile) {
  const SweepPlan plan = plan_of({"release.trigger_level_mm=20:50:10"}, {}, "energy_Wh");
  const TempDir temp("ranked");
  const fs::path& dir = temp.path();
  const SweepResult result = run_sweep_into(dir, plan, load_rain(plan.base.rain));
  EXPECT_EQ(names_in(dir), (std::set<std::string>{"skipped.csv", "sweep.csv", "sweep.json"}));
  const std::vector<std::string> lines = lines_of(read_file(dir / "sweep.csv"));
  ASSERT_EQ(lines.size(), 5u);
  double last = 1e300;
  for (std::size_t l = 1; l < lines.size(); ++l) {
    const double energy = read_double(split(lines[l], ',')[1]);
    EXPECT_LE(energy, last) << lines[l];
    last = energy;
  }
  const nlohmann::json j = nlohmann::json::parse(read_file(dir / "sweep.json"));
  EXPECT_EQ(j["scenario"], "shed.yaml");
  EXPECT_EQ(j["site"], "Sweep test shed (invented)");
  EXPECT_EQ(j["vary"], nlohmann::json::array({"release.trigger_level_mm"}));
  EXPECT_EQ(j["rank"], "energy_Wh");
  EXPECT_EQ(j["order"], "descending");
  EXPECT_EQ(j["combinations"], 4);
  EXPECT_EQ(j["ran"], 4);
  EXPECT_EQ(j["skipped"], 0);
  EXPECT_EQ(j["failed"], 0);
  EXPECT_EQ(read_file(dir / "skipped.csv"), "release.trigger_level_mm,status,reason\n");
}

TEST(Sweep, ListsInvalidCombinationsAsSkipped) {
  // The rim of the invented reservoir is at 62 mm, so a 70 mm trigger cannot load.
  const SweepPlan plan = plan_of({"release.trigger_level_mm=50,70", "release.kind=bell,none"});
  const TempDir temp("skipped");
  const fs::path& dir = temp.path();
  const SweepResult result = run_sweep_into(dir, plan, load_rain(plan.base.rain));
  EXPECT_EQ(result.skipped, 1u);
  EXPECT_EQ(result.failed, 0u);
  EXPECT_EQ(result.ranked.size(), 3u);
  EXPECT_EQ(read_file(dir / "skipped.csv"),
            "release.trigger_level_mm,release.kind,status,reason\n"
            "70,bell,skipped,--set: release.trigger_level_mm: must not be above "
            "reservoir.rim_mm = 62 (got 70)\n");
  EXPECT_EQ(lines_of(read_file(dir / "sweep.csv")).size(), 4u);
  const nlohmann::json j = nlohmann::json::parse(read_file(dir / "sweep.json"));
  EXPECT_EQ(j["combinations"], 4);
  EXPECT_EQ(j["skipped"], 1);
}

TEST(Sweep, ListsACombinationWhoseSimulationFailsAndGoesOn) {
  const SweepPlan plan = plan_of({"nozzle.diameter_mm=4,5,6"});
  SweepOptions options;
  options.simulate = [](const Scenario& s, const RainSeries& rain, Observer& observer,
                        const RunOptions& run) {
    if (s.nozzle.diameter_m > 0.0045 && s.nozzle.diameter_m < 0.0055) {
      throw SimulationError("simulation failed at 2025-06-01T06:00: invented failure, x");
    }
    return simulate(s, rain, observer, run);
  };
  const TempDir temp("failed");
  const fs::path& dir = temp.path();
  const SweepResult result = run_sweep_into(dir, plan, load_rain(plan.base.rain), options);
  EXPECT_EQ(result.failed, 1u);
  EXPECT_EQ(result.ranked.size(), 2u);
  EXPECT_EQ(read_file(dir / "skipped.csv"),
            "nozzle.diameter_mm,status,reason\n"
            "5,failed,\"simulation failed at 2025-06-01T06:00: invented failure, x\"\n");
}

// Three invented realizations per combination, energies chosen by hand; percentiles by Hyndman &
// Fan (1996) definition 7 for n = 3 (h = 2p + 1): P10 = x1 + 0.2 (x2 - x1), P90 = x2 + 0.8 (x3 -
// x2).
TEST(Sweep, RanksRealizationsByTheMedianAndMarksRowsInsideTheBestRange) {
  const SweepPlan plan = plan_of({"nozzle.diameter_mm=4,5,6"});
  // Realization k is told apart by its total depth, k + 1.
  std::vector<RainSeries> records(3);
  for (std::size_t k = 0; k < 3; ++k) records[k].total_depth_m = static_cast<double>(k + 1);
  SweepOptions options;
  options.simulate = [](const Scenario& s, const RainSeries& rain, Observer&, const RunOptions&) {
    const auto k = static_cast<std::size_t>(rain.total_depth_m) - 1;
    const int mm = static_cast<int>(std::lround(s.nozzle.diameter_m * 1e3));
    const double energy_Wh[3][3] = {{12, 10, 11}, {20, 9, 11.5}, {3, 1, 2}};  // 4, 5, 6 mm
    RunResult r;
    r.totals.electrical_J = energy_Wh[mm - 4][k] * kJoulesPerWh;
    return r;
  };
  const TempDir temp("realizations");
  const SweepResult result = run_sweep_into(temp.path(), plan, records, options);
  ASSERT_EQ(result.ranked.size(), 3u);
  EXPECT_EQ(result.realizations, 3u);
  // Medians 11 (4 mm), 11.5 (5 mm), 2 (6 mm): 5 mm is best, its P10 to P90 is 9.5 to 18.3.
  const SweepRow& best = result.rows[result.ranked[0]];
  EXPECT_EQ(best.values[0], "5");
  EXPECT_DOUBLE_EQ(best.metrics.energy_Wh, 11.5);
  EXPECT_DOUBLE_EQ(best.rank_spread->p10, 9.5);
  EXPECT_DOUBLE_EQ(best.rank_spread->p90, 18.3);
  EXPECT_EQ(result.rows[result.ranked[1]].values[0], "4");
  EXPECT_DOUBLE_EQ(result.rows[result.ranked[1]].rank_spread->p10, 10.2);
  EXPECT_TRUE(best.within_best);
  EXPECT_TRUE(result.rows[result.ranked[1]].within_best);
  EXPECT_FALSE(result.rows[result.ranked[2]].within_best);
  const std::vector<std::string> csv = lines_of(read_file(temp.path() / "sweep.csv"));
  ASSERT_EQ(csv.size(), 4u);
  EXPECT_TRUE(csv[0].ends_with(",energy_Wh_p10,energy_Wh_p90,within_best_range")) << csv[0];
  EXPECT_TRUE(csv[1].starts_with("5,11.5,")) << csv[1];
  EXPECT_TRUE(csv[1].ends_with(",9.5,18.3,1")) << csv[1];
  EXPECT_TRUE(csv[3].ends_with(",0")) << csv[3];
  const nlohmann::json j = nlohmann::json::parse(read_file(temp.path() / "sweep.json"));
  EXPECT_EQ(j["realizations"], 3);
  std::ostringstream table;
  print_sweep_table(table, plan, result);
  EXPECT_NE(table.str().find("metrics are medians over 3 realizations of the record; ~ marks rows "
                             "whose median lies inside the best row's P10 to P90"),
            std::string::npos)
      << table.str();
}

TEST(Sweep, InterruptedSweepLeavesNoFilesAndKeepsEarlierResults) {
  const SweepPlan plan = plan_of({"release.trigger_level_mm=20:50:5"});
  const TempDir temp("interrupted");
  const fs::path& dir = temp.path();
  { std::ofstream(dir / "sweep.csv") << "earlier\n"; }
  std::atomic<bool> stop{false};
  SweepOptions options;
  options.jobs = 1;
  options.stop = &stop;
  options.progress = [&stop](const SweepProgress& p) {
    if (p.done >= 1) stop.store(true);
  };
  EXPECT_THROW(run_sweep_into(dir, plan, load_rain(plan.base.rain), options), Interrupted);
  EXPECT_EQ(names_in(dir), (std::set<std::string>{"sweep.csv"}));
  EXPECT_EQ(read_file(dir / "sweep.csv"), "earlier\n");
}

TEST(Sweep, StopSetBeforeTheStartRunsNothing) {
  const SweepPlan plan = plan_of({"release.trigger_level_mm=20:50:10"});
  const TempDir temp("stopped");
  const fs::path& dir = temp.path();
  std::atomic<bool> stop{true};
  SweepOptions options;
  options.stop = &stop;
  std::atomic<int> runs{0};
  options.simulate = [&runs](const Scenario& s, const RainSeries& rain, Observer& observer,
                             const RunOptions& run) {
    ++runs;
    return simulate(s, rain, observer, run);
  };
  EXPECT_THROW(run_sweep_into(dir, plan, load_rain(plan.base.rain), options), Interrupted);
  EXPECT_EQ(runs, 0);
  EXPECT_TRUE(names_in(dir).empty());
}

TEST(SweepOutput, FormatsMetricsSoTheyReadBackExactly) {
  EXPECT_EQ(format_metric(0.1 + 0.2), "0.30000000000000004");
  EXPECT_EQ(format_metric(60.0), "60");
  EXPECT_EQ(format_metric(-0.0), "0");
  const double v = 11.731134434074695;
  EXPECT_EQ(read_double(format_metric(v)), v);
}

TEST(SweepOutput, DrawsAProgressLineWithTheTimeLeft) {
  EXPECT_EQ(progress_line({0, 40, 0.0}, 10), "[..........]   0/40    0%");
  EXPECT_EQ(progress_line({10, 40, 15.0}, 10), "[##........]  10/40   25%  0:45 left");
  EXPECT_EQ(progress_line({40, 40, 3725.0}, 10), "[##########]  40/40  100%  0:00 left");
  EXPECT_EQ(progress_line({1, 3, 3000.0}, 10), "[###.......]  1/3   33%  1:40:00 left");
}

TEST(SweepOutput, PrintsTheBestRowsAsATable) {
  SweepPlan plan;
  plan.base.site.name = "Invented shed";
  plan.axes = {{"release.kind", {"bell", "none"}}};
  SweepResult result;
  result.rows = {row_with(1.23456, 10.0), row_with(0.5, 40.25)};
  result.rows[0].values = {"bell"};
  result.rows[1].values = {"none"};
  result.ranked = {0, 1};
  std::ostringstream out;
  print_sweep_table(out, plan, result, 1);
  EXPECT_EQ(out.str(),
            "Invented shed: 2 of 2 combinations ran, best first by energy_Wh (highest first)\n"
            "  #  release.kind  energy_Wh  overflow_L  dribble_L  cycles  overflow_events\n"
            "  1  bell               1.23          10          0       0                0\n"
            "  ... 1 more in sweep.csv\n");
}

// A plan and a result made by hand: the best row is the first ranked.
SweepResult ranked_first(const std::vector<std::string>& best_values) {
  SweepResult r;
  SweepRow row;
  row.values = best_values;
  r.rows.push_back(row);
  r.ranked.push_back(0);
  return r;
}

TEST(SweepWarnings, BestAtTheEdgeOfANumericRangeAsksToExtendIt) {
  SweepPlan plan;
  plan.axes = {{"release.trigger_level_mm", {"40", "45", "50", "55"}},
               {"battery.capacity_Wh", {"10", "20", "30"}},
               {"release.kind", {"bell", "float_valve", "orifice"}}};
  EXPECT_EQ(sweep_warnings(plan, ranked_first({"55", "20", "bell"})),
            std::vector<std::string>{
                "the best release.trigger_level_mm is the highest tried (55): extend the range"});
  EXPECT_EQ(sweep_warnings(plan, ranked_first({"45", "10", "orifice"})),
            std::vector<std::string>{
                "the best battery.capacity_Wh is the lowest tried (10): extend the range"});
  EXPECT_TRUE(sweep_warnings(plan, ranked_first({"45", "20", "bell"})).empty());
}

TEST(SweepWarnings, PrimingFlowAloneIsABuildProperty) {
  SweepPlan plan;
  plan.axes = {{"release.priming_flow_L_per_min", {"1", "2"}}};
  const auto warnings = sweep_warnings(plan, ranked_first({"1"}));
  ASSERT_EQ(warnings.size(), 1u);
  EXPECT_EQ(warnings[0],
            "release.priming_flow_L_per_min is a property of a build: what makes a siphon prime at "
            "a lower flow (a restriction at its outlet) also lowers its running flow, which this "
            "sweep holds fixed. Measure builds on the bench (gutterwatt fit) and compare them with "
            "--vary release.build=NAME,NAME (README, \"The bench test\")");
  plan.axes.push_back({"drop_pipe.minor_loss_k", {"1", "3"}});
  EXPECT_TRUE(sweep_warnings(plan, ranked_first({"1", "3"})).empty());
}

}  // namespace
}  // namespace gutterwatt::sweep_test
