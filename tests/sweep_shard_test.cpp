// Regional sweeps: sites as a dimension, shards of a sweep and their merge (issue 18). The
// end-to-end cases run the built gutterwatt on the sweep fixtures (tests/data/sweep: an invented
// shed and three invented days of rain).

#include "gutterwatt/sweep_shard.hpp"

#include <gtest/gtest.h>

#include <map>
#include <nlohmann/json.hpp>

#include "cli_support.hpp"
#include "gutterwatt/error.hpp"
#include "gutterwatt/rain_files.hpp"

namespace gutterwatt::sweep_shard_test {
namespace {

namespace fs = std::filesystem;
using cli_support::expect_bad;
using cli_support::fixture_site;
using cli_support::run_in;
using cli_support::slurp;
using cli_support::write_file;

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

/// Three invented sites on the fixture's rain, told apart by their roofs (and one by its record's
/// folder: the path is relative to the sites file).
const std::string kSites =
    "site,rain.file,roof.area_m2\n"
    "Upper yard (invented),rain-10min.csv,40\n"
    "\"Mill lane, north (invented)\",./rain-10min.csv,25\n"
    "Low barn (invented),,60\n";

const std::string kVary =
    "--vary release.trigger_level_mm=30,40,50,70 --vary release.kind=bell,float_valve";

/// The fixture site with kSites beside it.
fs::path study_site(const std::string& name) {
  const fs::path dir = fixture_site(name);
  write_file(dir / "sites.csv", kSites);
  return dir;
}

std::vector<std::string> lines_of(const std::string& text) {
  std::vector<std::string> out;
  std::istringstream in(text);
  for (std::string line; std::getline(in, line);) out.push_back(line);
  return out;
}

TEST(SweepSites, ReadsNamesAndEachSitesKeys) {
  const SweepSites sites = read_sweep_sites(kSites, "/study/sites.csv");
  ASSERT_EQ(sites.sites.size(), 3u);
  EXPECT_EQ(sites.keys, (std::vector<std::string>{"rain.file", "roof.area_m2"}));
  EXPECT_EQ(sites.sites[1].name, "Mill lane, north (invented)");
  EXPECT_EQ(sites.sites[1].line, 3);
  // Paths are made absolute from the sites file's folder; an empty cell leaves the key alone.
  EXPECT_EQ(sites.sites[1].overrides,
            (std::vector<std::string>{"rain.file=\"/study/rain-10min.csv\"", "roof.area_m2=25"}));
  EXPECT_EQ(sites.sites[2].overrides, (std::vector<std::string>{"roof.area_m2=60"}));
}

TEST(SweepSites, NamesTheFileLineAndColumnOfWhatItCannotTake) {
  EXPECT_EQ(error_of([] { read_sweep_sites("name,roof.area_m2\na,1\n", "s.csv"); }),
            "s.csv:1: column 1: expected \"site\" (the site's name) first, then scenario keys "
            "such as rain.file (got \"name\")");
  EXPECT_EQ(error_of([] { read_sweep_sites("site,roof.area\na,1\n", "s.csv"); }),
            error_of([] {
              check_scenario_key("roof.area", "s.csv");
            }).replace(0, std::string("s.csv: roof.area").size(), "s.csv:1: column 2 (roof.area)"));
  EXPECT_EQ(error_of([] { read_sweep_sites("site,roof.area_m2,roof.area_m2\na,1,2\n", "s.csv"); }),
            "s.csv:1: column 3 (roof.area_m2): is given twice");
  EXPECT_EQ(error_of([] { read_sweep_sites("site,roof.area_m2\na,1\n\na,2\n", "s.csv"); }),
            "s.csv:4: column 1 (site): the site \"a\" is listed twice");
  EXPECT_EQ(error_of([] { read_sweep_sites("site,roof.area_m2\n,1\n", "s.csv"); }),
            "s.csv:2: column 1 (site): no site name");
  EXPECT_EQ(error_of([] { read_sweep_sites("site,roof.area_m2\na,1,2\n", "s.csv"); }),
            "s.csv:2: expected 2 fields, found 3");
  EXPECT_EQ(error_of([] { read_sweep_sites("site,roof.area_m2\n", "s.csv"); }),
            "s.csv: no site (only a header line)");
}

TEST(SweepShards, ReadsKOfNAndTakesKFromTheArrayJobsIndex) {
  const auto none = [](const char*) -> const char* { return nullptr; };
  const SweepShard two = parse_shard("2/5", none);
  EXPECT_EQ(two.index, 2u);
  EXPECT_EQ(two.count, 5u);
  std::map<std::string, const char*> env{{"SGE_TASK_ID", "3"}, {"LSB_JOBINDEX", "4"}};
  const auto from = [&](const char* name) -> const char* {
    const auto it = env.find(name);
    return it == env.end() ? nullptr : it->second;
  };
  EXPECT_EQ(parse_shard("auto/5", from).index, 3u);  // the first variable of the list that is set
  env["SLURM_ARRAY_TASK_ID"] = "1";
  EXPECT_EQ(parse_shard("auto/5", from).index, 1u);
  env["SLURM_ARRAY_TASK_ID"] = "0";
  EXPECT_EQ(error_of([&] { parse_shard("auto/5", from); }),
            "--shard: SLURM_ARRAY_TASK_ID is \"0\"; expected 1 to 5 (submit the array as 1-5)");
  EXPECT_EQ(error_of([&] { parse_shard("auto/5", none); }),
            "--shard: auto takes K from an array job's index, but none of SLURM_ARRAY_TASK_ID, "
            "PBS_ARRAY_INDEX, SGE_TASK_ID, LSB_JOBINDEX is set; give K/N outside an array job");
  EXPECT_EQ(error_of([&] { parse_shard("6/5", none); }),
            "--shard: K is \"6\"; expected 1 to 5 (submit the array as 1-5)");
  EXPECT_EQ(error_of([&] { parse_shard("3", none); }),
            "--shard: expected K/N (shard K of N, 1 <= K <= N) or auto/N (got \"3\")");
  EXPECT_EQ(error_of([&] { parse_shard("1/0", none); }),
            "--shard: expected K/N (shard K of N, 1 <= K <= N) or auto/N (got \"1/0\")");
}

TEST(SweepShards, SliceTheCellsInOrderWithSizesApartByOneAtMost) {
  for (const std::size_t cells : {0u, 1u, 7u, 24u, 1000u}) {
    for (const std::size_t n : {1u, 3u, 7u, 10u}) {
      std::size_t next = 0;
      for (std::size_t k = 1; k <= n; ++k) {
        const auto [first, end] = shard_cells(cells, {k, n});
        EXPECT_EQ(first, next) << cells << " cells, shard " << k << " of " << n;
        const std::size_t size = end - first;
        EXPECT_TRUE(size == cells / n || size == cells / n + 1) << cells << " " << k << "/" << n;
        next = end;
      }
      EXPECT_EQ(next, cells);
    }
  }
  // 10 cells in 3 shards: 3, 3 and 4 (floor(k * 10 / 3) = 3, 6, 10).
  EXPECT_EQ(shard_cells(10, {2, 3}), (std::pair<std::size_t, std::size_t>{3, 6}));
}

TEST(SweepShards, DigestIsFnv1aOfTheBytes) {
  // FNV-1a 64-bit values of "", "a" and "foobar" as published with the algorithm (the test
  // vectors of draft-eastlake-fnv; from memory). "" gives the offset basis itself.
  EXPECT_EQ(fnv1a_hex(""), "cbf29ce484222325");
  EXPECT_EQ(fnv1a_hex("a"), "af63dc4c8601ec8c");
  EXPECT_EQ(fnv1a_hex("foobar"), "85944171f73967e8");
}

TEST(SweepSitesRun, ReadsEachSitesRecordOnceSiteBySite) {
  const fs::path dir = study_site("sites-once");
  const SweepSites sites = read_sweep_sites(slurp(dir / "sites.csv"), (dir / "sites.csv").string());
  const SweepPlan plan = plan_sweep(slurp(dir / "shed.yaml"), (dir / "shed.yaml").string(), dir,
                                    {"release.trigger_level_mm=30,40,50"}, {}, "energy_Wh", &sites);
  ASSERT_EQ(plan.cell_count(), 9u);
  std::vector<std::size_t> loaded;
  const SiteRecords records = [&](std::size_t site) {
    loaded.push_back(site);
    return std::vector<RainSeries>{load_rain(plan.site_scenario(site).rain)};
  };
  SweepOptions options;
  options.jobs = 2;
  // Cells 2 to 6: the last of the first site, the whole second, the first of the third.
  const SweepResult result = run_sweep_sites(plan, records, options, 2, 7);
  EXPECT_EQ(loaded, (std::vector<std::size_t>{0, 1, 2}));
  ASSERT_EQ(result.rows.size(), 5u);
  EXPECT_EQ(result.rows.front().cell, 2u);
  EXPECT_EQ(result.rows.back().site, 2u);
}

TEST(SweepSitesRun, RanksWithinEachSiteAndOverallAndEachRowIsASingleRun) {
  const fs::path dir = study_site("sites-ranked");
  const auto r = run_in(dir,
                        "sweep shed.yaml --sites sites.csv --vary "
                        "release.trigger_level_mm=30,40,50 --jobs 2 --out one --quiet");
  ASSERT_EQ(r.status, 0) << r.err;
  const std::vector<std::string> lines = lines_of(slurp(dir / "one" / "sweep.csv"));
  ASSERT_EQ(lines.size(), 10u);
  EXPECT_TRUE(lines[0].starts_with("site,site_rank,release.trigger_level_mm,energy_Wh,"))
      << lines[0];
  std::map<std::string, int> seen;
  double last = 1e300;
  for (std::size_t l = 1; l < lines.size(); ++l) {
    const std::string& line = lines[l];
    const bool quoted = line.front() == '"';
    const std::size_t name_end = quoted ? line.find('"', 1) + 1 : line.find(',');
    std::string site = line.substr(quoted ? 1 : 0, quoted ? name_end - 2 : name_end);
    std::istringstream rest(line.substr(name_end + 1));
    std::string rank, trigger, energy;
    std::getline(rest, rank, ',');
    std::getline(rest, trigger, ',');
    std::getline(rest, energy, ',');
    EXPECT_EQ(std::stoi(rank), ++seen[site]) << line;  // site_rank counts each site's rows
    EXPECT_LE(std::stod(energy), last) << line;        // and the rows are best first overall
    last = std::stod(energy);
    if (l == 1) {
      // The best row is `gutterwatt run shed.yaml --set roof.area_m2=AREA --set trigger=...`.
      const std::string area = site.starts_with("Upper")  ? "40"
                               : site.starts_with("Mill") ? "25"
                                                          : "60";
      const Scenario scenario = load_scenario(
          dir / "shed.yaml", {"roof.area_m2=" + area, "release.trigger_level_mm=" + trigger});
      SummaryBuilder summary(scenario);
      const RunResult single = simulate(scenario, load_rain(scenario.rain), summary);
      EXPECT_EQ(energy, format_metric(sweep_metrics(single, summary).energy_Wh)) << line;
    }
  }
  EXPECT_EQ(seen.size(), 3u);
  const nlohmann::json j = nlohmann::json::parse(slurp(dir / "one" / "sweep.json"));
  EXPECT_EQ(j["sites"], "sites.csv");
  EXPECT_EQ(j["site_names"].size(), 3u);
  EXPECT_EQ(j["combinations"], 9);
}

TEST(SweepSitesRun, NamesTheSitesLineAndColumnOfAValueTheScenarioRejects) {
  const fs::path dir = fixture_site("sites-bad-value");
  write_file(dir / "sites.csv", "site,roof.area_m2\nA,40\nB,-3\n");
  expect_bad(run_in(dir, "sweep shed.yaml --sites sites.csv --vary release.kind=bell --out o"),
             "sites.csv:3: column 2 (roof.area_m2): site B: must be > 0 (got -3)");
  expect_bad(run_in(dir, "sweep shed.yaml --sites sites.csv --vary roof.area_m2=1,2 --out o"),
             "--vary: roof.area_m2: is also a column of sites.csv; vary it or give it per site");
}

/// Runs `shards` shards of the study sweep into DIR/shard-K, one after the other.
void run_shards(const fs::path& dir, std::size_t shards, const std::string& extra = "") {
  for (std::size_t k = 1; k <= shards; ++k) {
    const std::string id = std::to_string(k) + "/" + std::to_string(shards);
    const auto r = run_in(dir, "sweep shed.yaml --sites sites.csv " + kVary + extra +
                                   " --jobs 2 --shard " + id + " --out shard-" + std::to_string(k));
    ASSERT_EQ(r.status, 0) << id << ": " << r.err;
  }
}

TEST(SweepMerge, ShardsMergeIntoTheOneMachineSweepByteForByte) {
  const fs::path dir = study_site("merge-bytes");
  // 3 sites by 8 combinations in 5 shards of 4 or 5; the 70 mm trigger is above the rim, so
  // skipped.csv has rows too.
  const auto one =
      run_in(dir, "sweep shed.yaml --sites sites.csv " + kVary + " --jobs 2 --out one");
  ASSERT_EQ(one.status, 0) << one.err;
  run_shards(dir, 5);
  const nlohmann::json shard = nlohmann::json::parse(slurp(dir / "shard-2" / "shard.json"));
  EXPECT_EQ(shard["first_cell"], 4);
  EXPECT_EQ(shard["end_cell"], 9);
  EXPECT_EQ(shard["plan"]["site_names"].size(), 3u);
  EXPECT_EQ(shard["plan_digest"],
            nlohmann::json::parse(slurp(dir / "shard-5" / "shard.json"))["plan_digest"]);
  // Merged in any order of the folders.
  const auto merged = run_in(dir, "merge merged shard-3 shard-1 shard-5 shard-2 shard-4");
  ASSERT_EQ(merged.status, 0) << merged.err;
  // The same table and warnings, each site's best row too; only the folder written differs.
  const auto without_last_line = [](const std::string& text) {
    return text.substr(0, text.rfind('\n', text.size() - 2) + 1);
  };
  EXPECT_EQ(without_last_line(merged.out), without_last_line(one.out));
  std::string one_err = one.err;
  one_err.replace(one_err.find("one/skipped.csv"), 3, "merged");
  EXPECT_EQ(merged.err, one_err);
  EXPECT_NE(one.out.find("best at each site:\n  Low barn (invented): "
                         "release.trigger_level_mm="),
            std::string::npos)
      << one.out;
  for (const char* file : {"sweep.csv", "skipped.csv", "sweep.json"}) {
    EXPECT_EQ(slurp(dir / "merged" / file), slurp(dir / "one" / file)) << file;
  }
  EXPECT_EQ(cli_support::lines(slurp(dir / "merged" / "skipped.csv")), 1 + 3 * 2);
  const auto report = run_in(dir, "report merged");
  EXPECT_EQ(report.status, 0) << report.err;
  EXPECT_TRUE(fs::exists(dir / "merged" / "report.html"));
}

TEST(SweepMerge, NamesAMissingOrDoubledCombinationAndItsShard) {
  const fs::path dir = study_site("merge-missing");
  run_shards(dir, 3);
  expect_bad(run_in(dir, "merge merged shard-1 shard-3"),
             "the combination site Mill lane, north (invented), release.trigger_level_mm=30, "
             "release.kind=bell is missing: it is in shard 2 of 3, whose folder was not given (or "
             "has not finished)");
  expect_bad(run_in(dir, "merge merged shard-1 shard-2 shard-3 shard-2"),
             "shard-2/shard.csv:2: the combination site Mill lane, north (invented), "
             "release.trigger_level_mm=30, release.kind=bell is also in shard-2; give each shard "
             "once");
  EXPECT_FALSE(fs::exists(dir / "merged" / "sweep.csv"));
}

TEST(SweepMerge, RefusesShardsOfDifferentPlans) {
  const fs::path dir = study_site("merge-plans");
  run_shards(dir, 2);
  const auto other = run_in(dir, "sweep shed.yaml --sites sites.csv " + kVary +
                                     " --set battery.load_W=0.05 --shard 2/2 --out other");
  ASSERT_EQ(other.status, 0) << other.err;
  const std::string a = nlohmann::json::parse(slurp(dir / "shard-1" / "shard.json"))["plan_digest"];
  const std::string b = nlohmann::json::parse(slurp(dir / "other" / "shard.json"))["plan_digest"];
  expect_bad(run_in(dir, "merge merged shard-1 other"),
             "other/shard.json: plan_digest: " + b + " differs from " + a +
                 " in shard-1/shard.json: the shards come from different sweeps (the scenario, "
                 "the sites file, a record file's size, --vary, --set, --rank, --units or "
                 "--realizations differ)");
  expect_bad(run_in(dir, "merge merged shard-1 sites.csv"),
             "sites.csv/shard.json: no such file: sites.csv is not a shard folder (give the "
             "folders sweep --shard wrote)");
}

TEST(SweepMerge, RefusesASiteWhoseRecordChangedBetweenShards) {
  const fs::path dir = study_site("merge-record");
  // 24 cells in 5 shards: shards 1 (cells 0-3) and 2 (4-8) both run the first site.
  const auto first = run_in(
      dir, "sweep shed.yaml --sites sites.csv " + kVary + " --shard 1/5 --out shard-1 --quiet");
  ASSERT_EQ(first.status, 0) << first.err;
  // The same size, so the plan (which sees record files by name and size) is the same.
  std::string rain = slurp(dir / "rain-10min.csv");
  const std::size_t at = rain.find("06:10,2.0");
  ASSERT_NE(at, std::string::npos);
  rain.replace(at, 9, "06:10,3.0");
  write_file(dir / "rain-10min.csv", rain);
  const auto second = run_in(
      dir, "sweep shed.yaml --sites sites.csv " + kVary + " --shard 2/5 --out shard-2 --quiet");
  ASSERT_EQ(second.status, 0) << second.err;
  const auto digest = [&](const std::string& shard) {
    return nlohmann::json::parse(slurp(dir / shard / "shard.json"))["records"][0]["digest"]
        .get<std::string>();
  };
  expect_bad(run_in(dir, "merge merged shard-1 shard-2"),
             "shard-2/shard.json: records: the record of Upper yard (invented) reads as " +
                 digest("shard-2") + " here but as " + digest("shard-1") +
                 " in shard-1: it changed between shards");
}

}  // namespace
}  // namespace gutterwatt::sweep_shard_test
