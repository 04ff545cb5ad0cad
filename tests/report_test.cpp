#include "gutterwatt/report.hpp"

#include <gtest/gtest.h>
#include <unistd.h>

#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <regex>
#include <sstream>
#include <string>
#include <vector>

#include "gutterwatt/error.hpp"

namespace gutterwatt::report_test {
namespace {

namespace fs = std::filesystem;

// The fixtures hold invented values (tests/data/report/README.md).
const fs::path kFixtures = fs::path(GUTTERWATT_SOURCE_DIR) / "tests" / "data" / "report";

std::string read_file(const fs::path& path) {
  std::ifstream in(path, std::ios::binary);
  std::ostringstream text;
  text << in.rdbuf();
  return text.str();
}

void write_file(const fs::path& path, const std::string& text) {
  std::ofstream out(path, std::ios::binary | std::ios::trunc);
  out << text;
}

std::size_t count(const std::string& text, const std::string& what) {
  std::size_t n = 0;
  for (std::size_t at = text.find(what); at != std::string::npos; at = text.find(what, at + 1)) {
    ++n;
  }
  return n;
}

/// Replaces line `line` (1-based) of a file.
void replace_line(const fs::path& path, int line, const std::string& text) {
  std::istringstream in(read_file(path));
  std::string out, current;
  for (int n = 1; std::getline(in, current); ++n) out += (n == line ? text : current) + "\n";
  write_file(path, out);
}

void replace_text(const fs::path& path, const std::string& from, const std::string& to) {
  std::string text = read_file(path);
  const std::size_t at = text.find(from);
  ASSERT_NE(at, std::string::npos) << from;
  text.replace(at, from.size(), to);
  write_file(path, text);
}

/// A scratch folder, removed at the end of the test.
class ScratchDir {
 public:
  ScratchDir() {
    const auto* info = ::testing::UnitTest::GetInstance()->current_test_info();
    path_ = fs::temp_directory_path() /
            ("gutterwatt-report-" + std::string(info->name()) + "-" + std::to_string(::getpid()));
    fs::remove_all(path_);
    fs::create_directories(path_);
  }
  ~ScratchDir() {
    std::error_code ignored;
    fs::remove_all(path_, ignored);
  }
  /// A copy of fixture folder `name` inside the scratch folder.
  fs::path copy_of(const std::string& name) const {
    const fs::path to = path_ / name;
    fs::copy(kFixtures / name, to, fs::copy_options::recursive);
    return to;
  }
  const fs::path& path() const { return path_; }

 private:
  fs::path path_;
};

template <typename F>
std::string error_of(F&& f) {
  try {
    f();
  } catch (const InputError& e) {
    return e.what();
  }
  return "no InputError";
}

TEST(Report, WritesTheRunPageIntoTheRunFolder) {
  ScratchDir scratch;
  const fs::path run = scratch.copy_of("run");
  const fs::path written = write_report(run);
  EXPECT_EQ(written, run / "report.html");
  const std::string page = read_file(written);
  EXPECT_EQ(page.rfind("<!DOCTYPE html>", 0), 0u);
  // Titled by its period (2025-03-30T00:00 to 2025-04-02T00:00), not as a season.
  EXPECT_NE(page.find("<h1>Invented fixture shed: 30 Mar \xE2\x80\x93 1 Apr 2025</h1>"),
            std::string::npos);
  EXPECT_NE(page.find("</html>"), std::string::npos);
}

TEST(Report, RunPageContainsEveryChart) {
  ScratchDir scratch;
  const std::string page = render_report(scratch.copy_of("run"));
  EXPECT_EQ(count(page, "<svg "), 7u);
  for (const char* id : {"chart-rain-level", "chart-energy", "chart-battery", "chart-monthly",
                         "chart-typical-cycle", "chart-busiest-day", "chart-overflow-episode"}) {
    EXPECT_NE(page.find(std::string("<svg id=\"") + id + "\""), std::string::npos) << id;
  }
}

TEST(Report, RunPageShowsEveryWarningAboveTheHeadline) {
  ScratchDir scratch;
  const std::string page = render_report(scratch.copy_of("run"));
  // The fixture's summary.json holds one invented warning of each kind; the page escapes them.
  const auto run =
      page.find("<li>invented run warning: the record is daily &amp; spread over each day</li>");
  const auto design =
      page.find("<li>invented design warning: the drop pipe loses &lt;half&gt; the head</li>");
  const auto headline = page.find("id=\"headline\"");
  ASSERT_NE(run, std::string::npos);
  ASSERT_NE(design, std::string::npos);
  EXPECT_LT(run, headline);
  EXPECT_LT(design, headline);
  // The cautions stay at the foot.
  EXPECT_GT(page.find("id=\"cautions\""), page.find("id=\"closeups\""));
}

TEST(Report, RunPageWithoutWarningsSaysSo) {
  ScratchDir scratch;
  const fs::path run = scratch.copy_of("run");
  replace_text(run / "summary.json",
               "\"invented run warning: the record is daily & spread over each day\"", "");
  replace_text(run / "summary.json",
               "\"invented design warning: the drop pipe loses <half> the head\"", "");
  const std::string page = render_report(run);
  EXPECT_NE(page.find("The run and the design check gave no warnings."), std::string::npos);
}

TEST(Report, CloseUpsAreDrawnFromTheTrace) {
  ScratchDir scratch;
  const std::string page = render_report(scratch.copy_of("run"));
  // Every fixture cycle holds 27.3 L, so the typical one (median volume, the earlier of equals)
  // is the 63rd of the 126 in time order: 2025-04-01T06:20 to 06:22 in events.csv.
  EXPECT_NE(page.find("A typical cycle: 1 Apr 2025 06:20 to 1 Apr 2025 06:22"), std::string::npos);
  EXPECT_NE(page.find("(trace: every switch, at least every minute)"), std::string::npos);
  EXPECT_NE(page.find("trace.csv (941 points)"), std::string::npos);
}

TEST(Report, CloseUpsFallBackToTheTimeseriesWithoutATrace) {
  ScratchDir scratch;
  const fs::path run = scratch.copy_of("run");
  fs::remove(run / "trace.csv");
  const std::string page = render_report(run);
  EXPECT_EQ(page.find("<svg id=\"chart-typical-cycle\""), std::string::npos);
  EXPECT_NE(page.find("No trace.csv in this folder (simulation.trace: off)"), std::string::npos);
  EXPECT_NE(page.find("<svg id=\"chart-overflow-episode\""), std::string::npos);
}

TEST(ReportErrors, NamesTheLineOfATraceTimeGoingBack) {
  ScratchDir scratch;
  const fs::path run = scratch.copy_of("run");
  replace_line(run / "trace.csv", 3, "2025-03-30T05:00:00,8.0,idle,0,0,0,0");
  EXPECT_EQ(
      error_of([&] { render_report(run); }),
      (run / "trace.csv").string() + ":3: time: before the previous row (\"2025-03-30T05:00:00\")");
}

TEST(Report, RunPageHasTheHeadlineFigures) {
  ScratchDir scratch;
  const std::string page = render_report(scratch.copy_of("run"));
  // From the fixture's summary.json (invented): 17.862 Wh, 126 cycles, 4776 L of rain.
  EXPECT_NE(page.find("<strong>17.9\xC2\xA0Wh</strong>"), std::string::npos);
  EXPECT_NE(page.find("<strong>126</strong> release cycles"), std::string::npos);
  EXPECT_NE(page.find("4\xE2\x80\xAF"
                      "776\xC2\xA0L"),
            std::string::npos);
  EXPECT_NE(page.find("Busiest day: 1 Apr 2025"), std::string::npos);
  EXPECT_NE(page.find("Largest overflow episode: 1 Apr 2025 06:25 to 1 Apr 2025 06:50"),
            std::string::npos);
}

// summary.json's realizations block (invented values) becomes the "How sure" table: this run,
// the draws' median and range, and those with the calibration record resampled.
TEST(Report, RunPageShowsTheRealizationsRangesBesideThisRun) {
  ScratchDir scratch;
  const fs::path dir = scratch.copy_of("run");
  EXPECT_EQ(render_report(dir).find("How sure"), std::string::npos);
  const auto spread = [](const std::string& key, const std::string& p10, const std::string& p50,
                         const std::string& p90) {
    return "\"" + key + "\": {\"p10\": " + p10 + ", \"p50\": " + p50 + ", \"p90\": " + p90 + "}";
  };
  const std::string draws = spread("energy_Wh", "16.5", "17.34", "18.5") + ", " +
                            spread("cycles", "120", "125", "131") + ", " +
                            spread("reservoir_overflow_L", "10", "20", "30") + ", " +
                            spread("dribble_L", "100", "200", "300");
  const std::string resampled = spread("energy_Wh", "12.5", "17.5", "24.5") + ", " +
                                spread("cycles", "110", "130", "160") + ", " +
                                spread("reservoir_overflow_L", "5", "20", "60") + ", " +
                                spread("dribble_L", "90", "200", "400");
  replace_text(dir / "summary.json", "  \"site\":",
               "  \"realizations\": {\"n\": 20, " + draws +
                   ", \"calibration_resampled\": {\"n\": 20, \"resampled\": \"x\", " + resampled +
                   "}},\n  \"site\":");
  const std::string page = render_report(dir);
  EXPECT_NE(page.find("<h2>How sure</h2>\n<p>The record was disaggregated 20 times"),
            std::string::npos);
  EXPECT_NE(page.find("the range to quote"), std::string::npos);
  EXPECT_NE(page.find("This is the first of 20 disaggregations of the record"), std::string::npos);
  // The fixture's own 17.862 Wh and 126 cycles beside the spreads.
  EXPECT_NE(page.find("<tr><td>electrical (generator out)</td><td class=\"n\">17.9\xC2\xA0Wh</td>"
                      "<td class=\"n\">17.3\xC2\xA0Wh</td><td class=\"n\">16.5\xC2\xA0Wh to "
                      "18.5\xC2\xA0Wh</td><td class=\"n\">17.5\xC2\xA0Wh</td><td class=\"n\">"
                      "12.5\xC2\xA0Wh to 24.5\xC2\xA0Wh</td></tr>"),
            std::string::npos)
      << page.substr(page.find("How sure"), 3000);
  EXPECT_NE(page.find("<tr><td>siphon cycles</td><td class=\"n\">126</td><td class=\"n\">125</td>"
                      "<td class=\"n\">120 to 131</td><td class=\"n\">130</td><td class=\"n\">"
                      "110 to 160</td></tr>"),
            std::string::npos);
}

TEST(Report, SharesAreOfRoofRunoffAndSaySo) {
  ScratchDir scratch;
  const std::string page = render_report(scratch.copy_of("run"));
  // The fixture's 4320.8 L of roof runoff: 3990.45 / 4320.8 = 92.35 %, 288 / 4320.8 = 6.665 %,
  // 451.25 / 4320.8 = 10.44 % (by hand).
  EXPECT_NE(page.find("Of that roof runoff, 3\xE2\x80\xAF"
                      "990\xC2\xA0L (92.4\xC2\xA0%) passed the nozzle, 288\xC2\xA0L "
                      "(6.67\xC2\xA0%) overflowed and 451\xC2\xA0L (10.4\xC2\xA0%) dribbled"),
            std::string::npos);
  EXPECT_NE(page.find("<th class=\"n\">share of roof runoff</th>"), std::string::npos);
  EXPECT_EQ(page.find(">of rain</th>"), std::string::npos);
}

TEST(Report, OverflowEpisodesCarryNoEnergy) {
  ScratchDir scratch;
  const fs::path run = scratch.copy_of("run");
  // An older run wrote the energy of the cycles running at the same time on its overflow rows.
  replace_line(run / "events.csv", 72,
               "overflow,2025-04-01T06:25,2025-04-01T06:50,1500,288.0,0.168,51.5");
  const std::string page = render_report(run);
  EXPECT_NE(page.find("<tr><td>overflow at the reservoir rim</td><td class=\"n\">1</td><td "
                      "class=\"n\">288</td><td class=\"n\">288</td><td "
                      "class=\"n\">25\xC2\xA0min</td><td class=\"n\">&ndash;</td></tr>"),
            std::string::npos);
}

TEST(Report, MarksCycleStartsAlongTheLevelCharts) {
  ScratchDir scratch;
  const std::string page = render_report(scratch.copy_of("run"));
  // The season and the three close-ups carry the marks and their legend entry.
  EXPECT_EQ(count(page, ">cycle start</text>"), 4u);
  EXPECT_EQ(count(page, "stroke=\"#009E73\" stroke-width=\"1.6\"/>"), 4u);
}

TEST(Report, SweepPageContainsTheRankedTableAndBothHeatMaps) {
  ScratchDir scratch;
  const fs::path sweep = scratch.copy_of("sweep");
  const std::string page = read_file(write_report(sweep));
  EXPECT_EQ(count(page, "<svg "), 2u);
  EXPECT_NE(page.find("<svg id=\"chart-heat-energy\""), std::string::npos);
  EXPECT_NE(page.find("<svg id=\"chart-heat-overflow\""), std::string::npos);
  EXPECT_NE(page.find("<table class=\"ranked\">"), std::string::npos);
  EXPECT_EQ(count(page, "<tr class=\"best\">"), 1u);
  // 12 combinations: 12 ranked rows, numbered 1 to 12.
  EXPECT_NE(page.find("<td class=\"n\">12</td>"), std::string::npos);
  EXPECT_NE(page.find("ranked by <code>energy_Wh</code>"), std::string::npos);
  // Every key in plain words with its unit, the raw key in small print beneath.
  EXPECT_NE(page.find("Release: trigger level, mm<br><small class=\"key\"><code>release.<wbr>"
                      "trigger_<wbr>level_<wbr>mm</code></small>"),
            std::string::npos);
  EXPECT_NE(page.find("Release: trigger level, mm &#8594;"), std::string::npos);
  EXPECT_NE(page.find("Release: break level, mm &#8593;"), std::string::npos);
  EXPECT_NE(page.find("class=\"key\">release.break_level_mm</text>"), std::string::npos);
}

TEST(Report, PagesLoadNothingFromTheNetwork) {
  ScratchDir scratch;
  for (const char* name : {"run", "sweep"}) {
    const std::string page = render_report(scratch.copy_of(name));
    EXPECT_EQ(page.find("http://"), std::string::npos) << name;
    EXPECT_EQ(page.find("https://"), std::string::npos) << name;
    EXPECT_EQ(page.find("<script"), std::string::npos) << name;
    EXPECT_EQ(page.find("@import"), std::string::npos) << name;
    EXPECT_EQ(page.find("url(http"), std::string::npos) << name;
    const std::regex load(R"re((src|href)\s*=\s*["']?(https?:)?//)re", std::regex::icase);
    EXPECT_FALSE(std::regex_search(page, load)) << name;
  }
}

TEST(Report, PagesPrintWithBreaksAndEndWithTheCautions) {
  ScratchDir scratch;
  for (const char* name : {"run", "sweep"}) {
    const std::string page = render_report(scratch.copy_of(name));
    EXPECT_NE(page.find("@media print"), std::string::npos);
    EXPECT_NE(page.find("break-before: page"), std::string::npos);
    const std::size_t cautions = page.find("<section id=\"cautions\">");
    ASSERT_NE(cautions, std::string::npos);
    EXPECT_EQ(page.find("<section", cautions + 1), std::string::npos) << "cautions come last";
    for (const char* topic : {"Working at height", "Batteries and electrics", "foundations",
                              "Gutter loading", "mosquitoes", "local codes", "licensed"}) {
      EXPECT_NE(page.find(topic, cautions), std::string::npos) << topic;
    }
  }
}

TEST(Report, SamePageFromTheSameInputs) {
  ScratchDir scratch;
  const fs::path run = scratch.copy_of("run");
  EXPECT_EQ(render_report(run), render_report(run));
}

TEST(Report, FailedRenderLeavesTheEarlierReportUntouched) {
  ScratchDir scratch;
  const fs::path run = scratch.copy_of("run");
  const std::string before = read_file(write_report(run));
  write_file(run / "summary.json", "{");
  EXPECT_THROW(write_report(run), InputError);
  EXPECT_EQ(read_file(run / "report.html"), before);
  std::size_t files = 0;
  for ([[maybe_unused]] const auto& entry : fs::directory_iterator(run)) ++files;
  EXPECT_EQ(files, 5u) << "no temporary file is left behind";
}

TEST(Report, RunWithoutOverflowSaysSo) {
  ScratchDir scratch;
  const fs::path run = scratch.copy_of("run");
  std::istringstream in(read_file(run / "events.csv"));
  std::string kept, line;
  while (std::getline(in, line)) {
    if (line.rfind("overflow,", 0) != 0) kept += line + "\n";
  }
  write_file(run / "events.csv", kept);
  const std::string page = render_report(run);
  EXPECT_NE(page.find("No overflow episode in this run."), std::string::npos);
  EXPECT_EQ(page.find("chart-overflow-episode"), std::string::npos);
  EXPECT_EQ(count(page, "<svg "), 6u);
}

TEST(Report, DryIdleRunHasNoCloseUps) {
  ScratchDir scratch;
  const fs::path run = scratch.copy_of("run");
  const std::string header = read_file(run / "timeseries.csv").substr(0, 200);
  write_file(run / "timeseries.csv", header.substr(0, header.find('\n') + 1) +
                                         "2025-03-30T01:00,0,0,0,idle,0,0,0,0,0,0,0,0.5,0,0\n"
                                         "2025-03-30T02:00,0,0,0,idle,0,0,0,0,0,0,0,0.5,0,0\n");
  write_file(run / "events.csv",
             "kind,start,end,duration_s,volume_L,peak_flow_L_per_s,energy_Wh\n");
  const std::string page = render_report(run);
  EXPECT_NE(page.find("No rain and no energy in this run: there is no busiest day."),
            std::string::npos);
  EXPECT_NE(page.find("No overflow episode in this run."), std::string::npos);
  EXPECT_EQ(count(page, "<svg "), 4u);
}

TEST(Report, SeasonOfHourlyRowsIsThinnedAndStaysSmall) {
  ScratchDir scratch;
  const fs::path run = scratch.copy_of("run");
  // Nine months of hourly rows (invented): a daily wave, one downpour, one long dry spell.
  std::string csv =
      "time,rain_mm,roof_runoff_L,reservoir_level_mm,release_state,release_L,"
      "reservoir_overflow_L,column_overflow_L,nozzle_L,head_m,power_W,energy_Wh,battery_soc,"
      "cum_energy_Wh,cum_overflow_L\n";
  const int hours = 275 * 24;
  double cumulative = 0.0;
  for (int h = 1; h <= hours; ++h) {
    const int day = (h - 1) / 24;
    const int month_day[] = {31, 30, 31, 30, 31, 31, 30, 31, 30};
    int month = 0, d = day;
    while (d >= month_day[month]) d -= month_day[month++];
    char stamp[32];
    std::snprintf(stamp, sizeof stamp, "2025-%02d-%02dT%02d:00", month + 3, d + 1, h % 24);
    if (h % 24 == 0) {
      // Period-ending midnight belongs to the next calendar date.
      int m2 = month, d2 = d + 1;
      if (d2 >= month_day[m2]) {
        d2 = 0;
        ++m2;
      }
      std::snprintf(stamp, sizeof stamp, "2025-%02d-%02dT00:00", m2 + 3, d2 + 1);
    }
    const double rain = h == 4000 ? 47.5 : (h % 97 < 5 ? 0.4 * (h % 7) : 0.0);
    const double level = 20.0 + 25.0 * std::sin(h * 0.3);
    const char* state = h % 11 == 0 ? "running" : (h % 13 == 0 ? "dribble" : "idle");
    const double power = h == 4001 ? 9.75 : (h % 11 == 0 ? 1.5 : 0.0);
    cumulative += power;
    char row[512];
    std::snprintf(row, sizeof row, "%s,%.2f,%.2f,%.2f,%s,0,0,0,0,0,%.3f,%.3f,0.5,%.3f,0\n", stamp,
                  rain, rain * 36.0, level, state, power, power, cumulative);
    csv += row;
  }
  write_file(run / "timeseries.csv", csv);
  const std::string page = read_file(write_report(run));
  EXPECT_LT(page.size(), 3u * 1024u * 1024u);
  EXPECT_NE(page.find("tallest interval in each"), std::string::npos);
  EXPECT_NE(page.find("min/max-per-bucket"), std::string::npos);
  EXPECT_NE(page.find("The season charts here are thinned (6600 rows)"), std::string::npos);
  EXPECT_EQ(count(page, "<svg "), 7u);
}

TEST(Report, SweepOverOneKeyDrawsEnergyAndOverflowAgainstIt) {
  ScratchDir scratch;
  const fs::path dir = scratch.path() / "one";
  fs::create_directories(dir);
  // Invented values.
  write_file(dir / "sweep.csv",
             "release.trigger_level_mm,energy_Wh,overflow_L,dribble_L,cycles,overflow_events,"
             "overflow_hours,curtailed_Wh\n"
             "40,81.5,210,12,60,3,1.5,0\n50,80.0,260,9,52,4,2,0\n30,61.2,150,15,75,2,1,0\n");
  const std::string page = render_report(dir);
  EXPECT_EQ(count(page, "<svg "), 1u);
  EXPECT_NE(page.find("<svg id=\"chart-sweep-line\""), std::string::npos);
  EXPECT_NE(page.find("ranked by <code>energy_Wh</code>"), std::string::npos);
}

TEST(Report, SweepWithATextKeyListsItWithoutAMap) {
  ScratchDir scratch;
  const fs::path dir = scratch.path() / "kinds";
  fs::create_directories(dir);
  write_file(dir / "sweep.csv",
             "release.kind,release.trigger_level_mm,energy_Wh,overflow_L,dribble_L,cycles,"
             "overflow_events,overflow_hours,curtailed_Wh,note\n"
             "bell,50,80,200,9,50,3,1.5,0,invented\nfloat_valve,50,70,190,0,40,3,1.5,0,invented\n");
  write_file(dir / "sweep.json",
             R"({"scenario": "Invented kinds", "vary": ["release.kind", "release.trigger_level_mm"],
                 "rank": "energy_Wh"})");
  const std::string page = render_report(dir);
  EXPECT_EQ(count(page, "<svg "), 0u);
  EXPECT_NE(page.find("Heat maps need two varied keys with numeric values; this sweep has 1."),
            std::string::npos);
  EXPECT_NE(page.find("<td>float_valve</td>"), std::string::npos);
  EXPECT_NE(page.find("Invented kinds: sweep report"), std::string::npos);
}

TEST(ReportErrors, NamesAFolderWithNeitherOutput) {
  ScratchDir scratch;
  EXPECT_EQ(
      error_of([&] { write_report(scratch.path()); }),
      scratch.path().string() + ": holds neither timeseries.csv (a run) nor sweep.csv (a sweep)");
  EXPECT_EQ(error_of([&] { write_report(scratch.path() / "absent"); }),
            (scratch.path() / "absent").string() + ": no such directory");
}

TEST(ReportErrors, NamesAMissingRunFile) {
  ScratchDir scratch;
  const fs::path run = scratch.copy_of("run");
  fs::remove(run / "events.csv");
  EXPECT_EQ(error_of([&] { write_report(run); }),
            (run / "events.csv").string() + ": file not found");
  EXPECT_FALSE(fs::exists(run / "report.html"));
}

TEST(ReportErrors, NamesTheCellThatIsNotANumber) {
  ScratchDir scratch;
  const fs::path run = scratch.copy_of("run");
  replace_line(run / "timeseries.csv", 3,
               "2025-03-30T02:00,0.0,0.0,2.0,idle,0.0,0.0,0.0,0.0,0.0,abc,0.0,0.4983,0.0,0.0");
  EXPECT_EQ(error_of([&] { render_report(run); }),
            (run / "timeseries.csv").string() + ":3: power_W: not a number: \"abc\"");
}

TEST(ReportErrors, NamesAnUnknownReleaseState) {
  ScratchDir scratch;
  const fs::path run = scratch.copy_of("run");
  replace_line(run / "timeseries.csv", 4,
               "2025-03-30T03:00,0.0,0.0,2.0,sealed,0.0,0.0,0.0,0.0,0.0,0.0,0.0,0.4975,0.0,0.0");
  EXPECT_EQ(error_of([&] { render_report(run); }),
            (run / "timeseries.csv").string() +
                ":4: release_state: unknown state \"sealed\" (expected idle, dribble, running, "
                "closed or open)");
}

TEST(ReportErrors, NamesAMissingColumn) {
  ScratchDir scratch;
  const fs::path run = scratch.copy_of("run");
  replace_text(run / "timeseries.csv", ",head_m,", ",head,");
  EXPECT_EQ(
      error_of([&] { render_report(run); }),
      (run / "timeseries.csv").string() + ":1: head_m: missing column (nor its US twin head_ft)");
}

TEST(ReportErrors, NamesARowWithTheWrongNumberOfFields) {
  ScratchDir scratch;
  const fs::path run = scratch.copy_of("run");
  replace_line(run / "timeseries.csv", 5, "2025-03-30T04:00,0.0,0.0");
  EXPECT_EQ(error_of([&] { render_report(run); }),
            (run / "timeseries.csv").string() + ":5: expected 15 fields, found 3");
}

TEST(ReportErrors, NamesAnImpossibleTime) {
  ScratchDir scratch;
  const fs::path run = scratch.copy_of("run");
  replace_line(run / "timeseries.csv", 2,
               "2025-02-30T01:00,0.0,0.0,2.0,idle,0.0,0.0,0.0,0.0,0.0,0.0,0.0,0.4992,0.0,0.0");
  EXPECT_EQ(error_of([&] { render_report(run); }),
            (run / "timeseries.csv").string() +
                ":2: time: not a time: \"2025-02-30T01:00\" (expected YYYY-MM-DDThh:mm)");
}

TEST(ReportErrors, NamesTimesThatGoBackwards) {
  ScratchDir scratch;
  const fs::path run = scratch.copy_of("run");
  replace_line(run / "timeseries.csv", 3,
               "2025-03-30T01:00,0.0,0.0,2.0,idle,0.0,0.0,0.0,0.0,0.0,0.0,0.0,0.4983,0.0,0.0");
  EXPECT_EQ(error_of([&] { render_report(run); }),
            (run / "timeseries.csv").string() +
                ":3: time: not after the previous row (\"2025-03-30T01:00\")");
}

TEST(ReportErrors, NamesAnUnknownEventKind) {
  ScratchDir scratch;
  const fs::path run = scratch.copy_of("run");
  replace_line(run / "events.csv", 2, "spill,2025-03-30T05:40,2025-03-30T06:00,1200,22.6,0.004,0");
  EXPECT_EQ(error_of([&] { render_report(run); }),
            (run / "events.csv").string() +
                ":2: kind: unknown kind \"spill\" (expected cycle, dribble, overflow or "
                "column_overflow)");
}

TEST(ReportErrors, NamesAMissingSummaryKey) {
  ScratchDir scratch;
  const fs::path run = scratch.copy_of("run");
  replace_text(run / "summary.json", "\"rain\": 4776.0,", "");
  EXPECT_EQ(error_of([&] { render_report(run); }),
            (run / "summary.json").string() + ": water_L.rain: missing");
}

TEST(ReportErrors, NamesASummaryValueOfTheWrongType) {
  ScratchDir scratch;
  const fs::path run = scratch.copy_of("run");
  replace_text(run / "summary.json", "\"energy_Wh\": 13.572", "\"energy_Wh\": \"13.572\"");
  EXPECT_EQ(error_of([&] { render_report(run); }),
            (run / "summary.json").string() + ": months[1].energy_Wh: expected a number");
}

TEST(ReportErrors, NamesTheLineOfBrokenJson) {
  ScratchDir scratch;
  const fs::path run = scratch.copy_of("run");
  write_file(run / "summary.json", "{\n  \"scenario\": \"x\",\n  \"site\": ]\n}\n");
  EXPECT_EQ(error_of([&] { render_report(run); }),
            (run / "summary.json").string() + ":3: not valid JSON");
}

TEST(ReportErrors, NamesASweepMetricThatIsNotANumber) {
  ScratchDir scratch;
  const fs::path sweep = scratch.copy_of("sweep");
  replace_line(sweep / "sweep.csv", 4, "60,5,lots,305.0,8.5,50,4,2.0,0.0");
  EXPECT_EQ(error_of([&] { render_report(sweep); }),
            (sweep / "sweep.csv").string() + ":4: energy_Wh: not a number: \"lots\"");
}

TEST(ReportErrors, NamesAVariedKeyThatIsNotAColumn) {
  ScratchDir scratch;
  const fs::path sweep = scratch.copy_of("sweep");
  replace_text(sweep / "sweep.json", "\"release.break_level_mm\"", "\"release.nope\"");
  EXPECT_EQ(
      error_of([&] { render_report(sweep); }),
      (sweep / "sweep.json").string() + ": vary[1]: \"release.nope\" is not a column of sweep.csv");
}

// Renders both fixture pages in headless Chromium through tools/check_report_render, which also
// checks the rendered DOM holds every chart. Skipped where Debian's chromium is not installed
// (tools/setup installs it).
TEST(ReportRender, RendersInHeadlessChromium) {
  if (std::system("command -v chromium >/dev/null 2>&1") != 0) {
    GTEST_SKIP() << "chromium is not installed";
  }
  ScratchDir scratch;
  for (const char* name : {"run", "sweep"}) {
    const fs::path dir = scratch.copy_of(name);
    write_report(dir);
    const std::string command =
        "'" + (fs::path(GUTTERWATT_SOURCE_DIR) / "tools" / "check_report_render").string() + "' '" +
        dir.string() + "' >/dev/null 2>&1";
    EXPECT_EQ(std::system(command.c_str()), 0) << name;
    EXPECT_GT(fs::file_size(dir / "report.png"), 10000u) << name;
    // The run page's new sections: the warnings and the typical-cycle close-up (the script
    // checks every chart the page lists, and the warnings section on a run page).
    if (std::string(name) == "run") {
      EXPECT_NE(read_file(dir / "report.html").find("chart-typical-cycle"), std::string::npos);
    }
  }
}

}  // namespace
}  // namespace gutterwatt::report_test
