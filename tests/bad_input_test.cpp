// The bad-input catalogue (issue 4): one test per kind of bad input a user can give gutterwatt,
// run through the built executable, each checking the exit status and the whole line on stderr.
// Then the faults around a run: an output folder that cannot be written, a full disk, SIGINT
// and SIGTERM, and a numerical fault. Every site, rain record and file here is invented.

#include <gtest/gtest.h>
#include <signal.h>

#include <atomic>
#include <chrono>
#include <filesystem>
#include <limits>
#include <regex>
#include <set>
#include <sstream>
#include <string>
#include <thread>
#include <vector>

#include "cli_support.hpp"
#include "gutterwatt/calendar.hpp"
#include "gutterwatt/error.hpp"
#include "gutterwatt/simulation.hpp"
#include "test_support.hpp"

namespace fs = std::filesystem;
using namespace gutterwatt::cli_support;

namespace {

// An invented site. Messages name lines of this text, so keep them where they are.
const std::string kScenario = R"(# Invented scenario for the bad-input catalogue.
site: {name: Catalogue shed (invented), temperature_C: 12}
rain:
  file: rain.csv
  format: series
roof: {area_m2: 40, runoff_coefficient: 0.9}
reservoir: {shape: half_round, width_mm: 125, length_m: 8, rim_mm: 62}
release:
  kind: bell
  trigger_level_mm: 50
  break_level_mm: 8
  standpipe_diameter_mm: 19
  priming_flow_L_per_min: 2
drop_pipe: {diameter_mm: 19, length_m: 4.5, drop_m: 4.0}
nozzle: {diameter_mm: 6}
turbine: {runner_diameter_mm: 70}
battery: {capacity_Wh: 12}
)";

// Invented 5-minute rain.
const std::string kRain =
    "time,rain_mm\n2025-03-01T00:05,0.2\n2025-03-01T00:10,0\n2025-03-01T00:15,0.4\n";

const std::string kTipsFormat = "  format: tips\n  tip_depth: 0.2\n";
const std::string kDailyFormat = "  format: daily\n  disaggregate: {method: block}\n";

// `text` with its only `from` replaced by `to`.
std::string with(std::string text, const std::string& from, const std::string& to) {
  const std::size_t at = text.find(from);
  EXPECT_NE(at, std::string::npos) << "not in the text: " << from;
  if (at != std::string::npos) text.replace(at, from.size(), to);
  return text;
}

// A scratch folder holding site.yaml and rain.csv.
struct Site {
  fs::path dir;
  std::string scenario;  ///< path of site.yaml
  std::string rain;      ///< path of rain.csv, as messages name it
};

Site make_site(const std::string& name, const std::string& rain_text = kRain,
               const std::string& scenario_text = kScenario) {
  Site s;
  s.dir = scratch("bad-" + name);
  s.scenario = (s.dir / "site.yaml").string();
  s.rain = (s.dir / "rain.csv").string();
  write_file(s.scenario, scenario_text);
  write_file(s.rain, rain_text);
  return s;
}

// A site whose rain file is `rain_text` read in the given rain format lines.
Site rain_site(const std::string& name, const std::string& rain_text,
               const std::string& format_lines = "  format: series\n") {
  return make_site(name, rain_text, with(kScenario, "  format: series\n", format_lines));
}

// A site whose scenario is kScenario with `from` replaced by `to`.
Site scenario_site(const std::string& name, const std::string& from, const std::string& to) {
  return make_site(name, kRain, with(kScenario, from, to));
}

// `gutterwatt check` of the site, reading its rain.
Outcome check(const Site& s, const std::string& extra = "") {
  return run("check " + s.scenario + " " + extra, s.dir);
}

// `gutterwatt check --no-rain` of the site: the scenario alone.
Outcome check_scenario(const Site& s) { return run("check --no-rain " + s.scenario, s.dir); }

// An output folder holding an earlier run's three files, with invented contents.
const std::vector<std::string> kRunFiles = {"events.csv", "summary.json", "timeseries.csv"};

fs::path earlier_results(const fs::path& dir, const std::vector<std::string>& names = kRunFiles) {
  const fs::path out = dir / "out";
  fs::create_directories(out);
  for (const std::string& name : names) write_file(out / name, "earlier " + name + "\n");
  return out;
}

void expect_earlier_results_untouched(const fs::path& out,
                                      const std::vector<std::string>& names = kRunFiles) {
  EXPECT_EQ(names_in(out), std::set<std::string>(names.begin(), names.end()));
  for (const std::string& name : names) {
    EXPECT_EQ(slurp(out / name), "earlier " + name + "\n") << name;
  }
}

}  // namespace

// ---------------------------------------------------------------- rain: the series format

TEST(BadRainSeries, MissingFileIsNamed) {
  const Site s = make_site("series-missing");
  const std::string missing = (s.dir / "none.csv").string();
  expect_bad(check(s, "--rain " + missing), missing + ": rain.file: no such file");
}

TEST(BadRainSeries, FolderIsNotAFile) {
  const Site s = make_site("series-folder");
  expect_bad(check(s, "--rain " + s.dir.string()),
             s.dir.string() + ": rain.file: is a folder, not a file");
}

TEST(BadRainSeries, FileThatCannotBeReadIsAReadError) {
  // Reading /proc/self/mem from its start fails: a file that opens but cannot be read.
  const Site s = make_site("series-unreadable");
  expect_bad(check(s, "--rain /proc/self/mem"),
             "/proc/self/mem: the file could not be read past this line (an input/output error)");
}

TEST(BadRainSeries, EmptyFileAsksForAHeader) {
  const Site s = rain_site("series-empty", "");
  expect_bad(check(s), s.rain +
                           ":1: empty file (expected a header row naming the columns \"time\" "
                           "and \"rain_mm\")");
}

TEST(BadRainSeries, CommentsAndBlankLinesOnlyAreEmpty) {
  const Site s = rain_site("series-comments", "# nothing logged\n\n   \n");
  expect_bad(check(s), s.rain +
                           ":1: empty file (expected a header row naming the columns \"time\" "
                           "and \"rain_mm\")");
}

TEST(BadRainSeries, HeaderWithoutRowsHasNoData) {
  const Site s = rain_site("series-header-only", "time,rain_mm\n");
  expect_bad(check(s), s.rain + ":1: no data rows");
}

TEST(BadRainSeries, BinaryFileIsNotText) {
  const Site s = rain_site("series-binary", std::string("\x7f"
                                                        "ELF\x02\x01\x01\0\0\0\0\n",
                                                        12));
  expect_bad(check(s), s.rain + ":1: binary data (a NUL byte on this line), not a CSV text file");
}

TEST(BadRainSeries, Utf16FileIsNamedAsSuch) {
  const std::string utf16("\xFF\xFEt\0i\0m\0e\0,\0r\0a\0i\0n\0_\0m\0m\0\n\0", 28);
  const Site s = rain_site("series-utf16", utf16);
  expect_bad(check(s),
             s.rain + ":1: UTF-16 text, not UTF-8; save the file as CSV in UTF-8 (or plain ASCII)");
}

TEST(BadRainSeries, ControlBytesInAMessageAreShownEscaped) {
  const Site s = rain_site("series-garbage", "\x01\x02garbage\xff\r\n");
  expect_bad(check(s), s.rain +
                           ":1: time: no such column in the header (found "
                           "\"\\x01\\x02garbage\\xFF\")");
}

TEST(BadRainSeries, MissingValueColumnListsTheHeader) {
  const Site s = rain_site("series-no-value", "time,rain\n2025-03-01T00:05,0.2\n");
  expect_bad(check(s),
             s.rain + ":1: rain_mm: no such column in the header (found \"time\", \"rain\")");
}

TEST(BadRainSeries, MissingTimeColumnListsTheHeader) {
  const Site s = rain_site("series-no-time", "date,rain_mm\n2025-03-01T00:05,0.2\n");
  expect_bad(check(s),
             s.rain + ":1: time: no such column in the header (found \"date\", \"rain_mm\")");
}

TEST(BadRainSeries, RepeatedColumnIsAmbiguous) {
  const Site s = rain_site("series-twice", "time,rain_mm,rain_mm\n2025-03-01T00:05,0.2,0.3\n");
  expect_bad(check(s), s.rain + ":1: rain_mm: appears twice in the header (columns 2 and 3)");
}

TEST(BadRainSeries, ShortRowNamesTheMissingColumn) {
  const Site s =
      rain_site("series-short", "time,rain_mm\n2025-03-01T00:05,0.2\n2025-03-01T00:10\n");
  expect_bad(check(s),
             s.rain + ":3: rain_mm: missing (the row has 1 field, the column is field 2)");
}

TEST(BadRainSeries, DecimalCommaIsNotReadAsItsWholePart) {
  const Site s = rain_site("series-comma", "time,rain_mm\n2025-03-01T00:05,0,2\n");
  expect_bad(check(s), s.rain +
                           ":2: the row has more fields than the 2 columns of the header (field "
                           "3 is \"2\"); a decimal comma? write decimals with a point, or separate "
                           "the fields with another character and set "
                           "rain.delimiter and rain.decimal: \",\"");
}

TEST(BadRainSeries, NonNumericValueIsQuoted) {
  const Site s = rain_site("series-text", "time,rain_mm\n2025-03-01T00:05,trace\n");
  expect_bad(check(s), s.rain + ":2: rain_mm: not a number (got \"trace\")");
}

TEST(BadRainSeries, NanIsNotANumber) {
  const Site s = rain_site("series-nan", "time,rain_mm\n2025-03-01T00:05,NaN\n");
  expect_bad(check(s), s.rain + ":2: rain_mm: not a number (got \"NaN\")");
}

TEST(BadRainSeries, InfinityIsNotFinite) {
  const Site s = rain_site("series-inf", "time,rain_mm\n2025-03-01T00:05,-inf\n");
  expect_bad(check(s), s.rain + ":2: rain_mm: not a finite number (got \"-inf\")");
}

TEST(BadRainSeries, NumberTooLargeForADoubleIsNotFinite) {
  const Site s = rain_site("series-huge", "time,rain_mm\n2025-03-01T00:05,1e400\n");
  expect_bad(check(s), s.rain + ":2: rain_mm: not a finite number (got \"1e400\")");
}

TEST(BadRainSeries, NegativeDepthIsRefused) {
  const Site s = rain_site("series-negative", "time,rain_mm\n2025-03-01T00:05,-0.2\n");
  expect_bad(check(s), s.rain + ":2: rain_mm: must not be negative (got -0.2)");
}

TEST(BadRainSeries, AbsurdDepthIsAnImplausibleIntensity) {
  // 150 mm in 5 minutes: a file in hundredths of a millimetre, say.
  const Site s =
      rain_site("series-absurd", "time,rain_mm\n2025-03-01T00:05,0\n2025-03-01T00:10,150\n");
  expect_bad(check(s), s.rain +
                           ":3: rain_mm: implausible intensity 1800 mm/h (got 150 mm in 5min; "
                           "the limit is 1000 mm/h)");
}

TEST(BadRainSeries, IntensityReadAsDepthShowsAsImplausible) {
  // A file of mm/h read with the default value: depth (wrong units).
  const Site s =
      rain_site("series-units", "time,rain_mm\n2025-03-01T00:05,90\n2025-03-01T00:10,0\n");
  expect_bad(check(s), s.rain +
                           ":2: rain_mm: implausible intensity 1080 mm/h (got 90 mm in 5min; "
                           "the limit is 1000 mm/h)");
}

TEST(BadRainSeries, UnreadableTimestampSaysWhatIsExpected) {
  const Site s = rain_site("series-stamp", "time,rain_mm\n01/03/2025 00:05,0.2\n");
  expect_bad(check(s), s.rain +
                           ":2: time: not an ISO 8601 date-time such as 2025-03-01T00:05 (got "
                           "\"01/03/2025 00:05\")");
}

TEST(BadRainSeries, ImpossibleDateIsNotADateTime) {
  const Site s = rain_site("series-feb30", "time,rain_mm\n2025-02-30T00:05,0.2\n");
  expect_bad(check(s), s.rain +
                           ":2: time: not an ISO 8601 date-time such as 2025-03-01T00:05 (got "
                           "\"2025-02-30T00:05\")");
}

TEST(BadRainSeries, DuplicatedStampNamesBothLines) {
  const Site s =
      rain_site("series-duplicate", "time,rain_mm\n2025-03-01T00:05,0.2\n2025-03-01T00:05,0.2\n");
  expect_bad(check(s), s.rain +
                           ":3: time: \"2025-03-01T00:05\" is the same instant as the previous "
                           "stamp \"2025-03-01T00:05\" (line 2)");
}

TEST(BadRainSeries, SameInstantWrittenInTwoOffsetsIsADuplicate) {
  const Site s = rain_site("series-same-instant",
                           "time,rain_mm\n2025-03-01T00:05Z,0.2\n2025-03-01T01:05+01:00,0.2\n");
  expect_bad(check(s), s.rain +
                           ":3: time: \"2025-03-01T01:05+01:00\" is the same instant as the "
                           "previous stamp \"2025-03-01T00:05Z\" (line 2)");
}

TEST(BadRainSeries, StampsOutOfOrderAskForTimeOrder) {
  const Site s =
      rain_site("series-order", "time,rain_mm\n2025-03-01T00:10,0.2\n2025-03-01T00:05,0.2\n");
  expect_bad(check(s), s.rain +
                           ":3: time: \"2025-03-01T00:05\" is earlier than the previous stamp "
                           "\"2025-03-01T00:10\" (line 2); rows must be in time order");
}

TEST(BadRainSeries, MixedOffsetsAreRefused) {
  const Site s =
      rain_site("series-mixed", "time,rain_mm\n2025-03-01T00:05,0.2\n2025-03-01T00:10+01:00,0.2\n");
  expect_bad(check(s), s.rain +
                           ":3: time: mixed time zones: \"2025-03-01T00:10+01:00\" has a UTC "
                           "offset but the stamp on line 2 has none");
}

TEST(BadRainSeries, GapNamesItsSpanAndTheWayOut) {
  const Site s = rain_site("series-gap",
                           "time,rain_mm\n2025-03-01T00:05,0.2\n2025-03-01T00:10,0\n"
                           "2025-03-01T01:10,0.2\n");
  expect_bad(check(s), s.rain +
                           ":4: time: gap in the record from 2025-03-01T00:10 to "
                           "2025-03-01T01:05 (55min with no rows); set rain.gaps: zero to count "
                           "gaps as dry, or rain.gaps: skip to leave them out");
}

TEST(BadRainSeries, SingleRowNeedsTheStep) {
  const Site s = rain_site("series-one-row", "time,rain_mm\n2025-03-01T00:05,0.2\n");
  expect_bad(check(s), s.rain +
                           ":2: time: cannot tell the record step from a single row; give it in "
                           "the scenario (rain.step, e.g. 5min)");
}

TEST(BadRainSeries, FailedRunCreatesNoOutputFolder) {
  const Site s = rain_site("series-run", "time,rain_mm\n2025-03-01T00:05,trace\n");
  const fs::path out = s.dir / "out";
  expect_bad(run("run " + s.scenario + " --out " + out.string(), s.dir),
             s.rain + ":2: rain_mm: not a number (got \"trace\")");
  EXPECT_FALSE(fs::exists(out));
}

// ---------------------------------------------------------------- rain: tipping-bucket logs

TEST(BadRainTips, MissingTimeColumnListsTheHeader) {
  const Site s = rain_site("tips-column", "logger,tipped\nhill,2025-03-01T00:05\n", kTipsFormat);
  expect_bad(check(s),
             s.rain + ":1: time: no such column in the header (found \"logger\", \"tipped\")");
}

TEST(BadRainTips, LogWithoutTipsHasNoData) {
  const Site s = rain_site("tips-none", "# logger 7, no tips this month\ntime\n", kTipsFormat);
  expect_bad(check(s), s.rain + ":2: no data rows");
}

TEST(BadRainTips, BinaryFileIsNotText) {
  const Site s = rain_site("tips-binary", std::string("PK\x03\x04\0\0\x08\0", 8), kTipsFormat);
  expect_bad(check(s), s.rain + ":1: binary data (a NUL byte on this line), not a CSV text file");
}

TEST(BadRainTips, UnreadableStampSaysWhatIsExpected) {
  const Site s = rain_site("tips-stamp", "time\n2025-03-01T00:05\n2025-03-01 00:0x\n", kTipsFormat);
  expect_bad(check(s), s.rain +
                           ":3: time: not an ISO 8601 date-time such as 2025-03-01T00:05 (got "
                           "\"2025-03-01 00:0x\")");
}

TEST(BadRainTips, EarlierStampAsksForTimeOrder) {
  const Site s = rain_site("tips-order", "time\n2025-03-01T00:10\n2025-03-01T00:05\n", kTipsFormat);
  expect_bad(check(s), s.rain +
                           ":3: time: \"2025-03-01T00:05\" is earlier than the previous stamp "
                           "\"2025-03-01T00:10\" (line 2); rows must be in time order");
}

TEST(BadRainTips, MixedOffsetsAreRefused) {
  const Site s =
      rain_site("tips-mixed", "time\n2025-03-01T00:05+02:00\n2025-03-01T00:10\n", kTipsFormat);
  expect_bad(check(s), s.rain +
                           ":3: time: mixed time zones: \"2025-03-01T00:10\" has no UTC offset "
                           "but the stamp on line 2 has one");
}

TEST(BadRainTips, TipsTooCloseAreAnImplausibleIntensity) {
  const Site s = rain_site("tips-burst",
                           "time\n2025-03-01T00:00:00\n2025-03-01T00:00:01\n2025-03-01T00:00:01\n",
                           kTipsFormat);
  expect_bad(check(s), s.rain +
                           ":4: time: implausible intensity 1440 mm/h (got 2 tips of 0.2 mm in "
                           "1s; the limit is 1000 mm/h)");
}

TEST(BadRainTips, TipDepthIsRequired) {
  const Site s = rain_site("tips-depth", "time\n2025-03-01T00:05\n", "  format: tips\n");
  expect_bad(check(s),
             s.scenario + ":3: rain.tip_depth: missing required key (needed by format: tips)");
}

TEST(BadRainTips, NegativeTipDepthIsRefused) {
  const Site s =
      rain_site("tips-negative", "time\n2025-03-01T00:05\n", "  format: tips\n  tip_depth: -0.2\n");
  expect_bad(check(s), s.scenario + ":6: rain.tip_depth: must be > 0 (got -0.2)");
}

// ---------------------------------------------------------------- rain: daily totals

TEST(BadRainDaily, DateTimeIsNotADate) {
  const Site s = rain_site("daily-datetime", "date,rain_mm\n2025-03-01T00:00,3.5\n", kDailyFormat);
  expect_bad(check(s),
             s.rain + ":2: date: not a date such as 2025-03-01 (got \"2025-03-01T00:00\")");
}

TEST(BadRainDaily, MissingValueColumnListsTheHeader) {
  const Site s = rain_site("daily-column", "date,precip\n2025-03-01,3.5\n", kDailyFormat);
  expect_bad(check(s),
             s.rain + ":1: rain_mm: no such column in the header (found \"date\", \"precip\")");
}

TEST(BadRainDaily, DuplicatedDayNamesBothLines) {
  const Site s =
      rain_site("daily-duplicate", "date,rain_mm\n2025-03-01,3.5\n2025-03-01,1\n", kDailyFormat);
  expect_bad(check(s), s.rain +
                           ":3: date: \"2025-03-01\" is the same day as the previous date "
                           "\"2025-03-01\" (line 2)");
}

TEST(BadRainDaily, DaysOutOfOrderAskForTimeOrder) {
  const Site s =
      rain_site("daily-order", "date,rain_mm\n2025-03-02,3.5\n2025-03-01,1\n", kDailyFormat);
  expect_bad(check(s), s.rain +
                           ":3: date: \"2025-03-01\" is earlier than the previous date "
                           "\"2025-03-02\" (line 2); rows must be in time order");
}

TEST(BadRainDaily, MissingDayIsAGap) {
  const Site s =
      rain_site("daily-gap", "date,rain_mm\n2025-03-01,3.5\n2025-03-03,1\n", kDailyFormat);
  expect_bad(check(s), s.rain +
                           ":3: date: gap in the record from 2025-03-02T00:00 to "
                           "2025-03-03T00:00 (1d with no rows); set rain.gaps: zero to count "
                           "gaps as dry, or rain.gaps: skip to leave them out");
}

TEST(BadRainDaily, NonNumericTotalIsQuoted) {
  const Site s = rain_site("daily-text", "date,rain_mm\n2025-03-01,-\n", kDailyFormat);
  expect_bad(check(s), s.rain + ":2: rain_mm: not a number (got \"-\")");
}

TEST(BadRainDaily, NanTotalIsNotANumber) {
  const Site s = rain_site("daily-nan", "date,rain_mm\n2025-03-01,nan\n", kDailyFormat);
  expect_bad(check(s), s.rain + ":2: rain_mm: not a number (got \"nan\")");
}

TEST(BadRainDaily, NegativeTotalIsRefused) {
  const Site s = rain_site("daily-negative", "date,rain_mm\n2025-03-01,-3\n", kDailyFormat);
  expect_bad(check(s), s.rain + ":2: rain_mm: must not be negative (got -3)");
}

TEST(BadRainDaily, AbsurdTotalIsAnImplausibleIntensity) {
  const Site s = rain_site("daily-absurd", "date,rain_mm\n2025-03-01,30000\n", kDailyFormat);
  expect_bad(check(s), s.rain +
                           ":2: rain_mm: implausible intensity 1250 mm/h (got 30000 mm in 1d; "
                           "the limit is 1000 mm/h)");
}

TEST(BadRainDaily, DisaggregationIsRequired) {
  const Site s = rain_site("daily-how", "date,rain_mm\n2025-03-01,3\n", "  format: daily\n");
  expect_bad(check(s), s.scenario +
                           ":3: rain.disaggregate: missing required key (needed by format: "
                           "daily)");
}

TEST(BadRainDaily, UnknownMethodListsTheMethods) {
  const Site s = rain_site("daily-method", "date,rain_mm\n2025-03-01,3\n",
                           "  format: daily\n  disaggregate: {method: nrcs}\n");
  expect_bad(check(s), s.scenario +
                           ":6: rain.disaggregate.method: expected one of block, nrcs-I, "
                           "nrcs-IA, nrcs-II, nrcs-III, cascade or fragments, got \"nrcs\"");
}

TEST(BadRainDaily, IntensityValuesAreRefused) {
  const Site s = rain_site("daily-intensity", "date,rain_mm\n2025-03-01,3\n",
                           kDailyFormat + "  value: intensity\n");
  expect_bad(check(s), s.scenario +
                           ":7: rain.value: must be depth for format: daily (got "
                           "intensity)");
}

// ---------------------------------------------------------------- rain: every reader at once

TEST(BadRainReaders, EveryBadFileIsAnInputErrorNamingTheFileOnOneLine) {
  using namespace gutterwatt;
  const std::vector<std::string> bad = {
      "",
      "\n  \n# only a comment\n",
      std::string("\x7f"
                  "ELF\x02\x01\0\0\n",
                  9),
      std::string("\xFF\xFEt\0i\0m\0e\0\n\0", 12),
      "time,rain_mm\n",
      "when,amount\n2025-03-01,1\n",
      "time,rain_mm\n2025-03-02,1\n2025-03-01,1\n",
      "time,rain_mm\n2025-03-01T00:05Z,1\n2025-03-01T00:10,1\n",
      "time,rain_mm\n\"2025-03-01,1\n",
      "time,rain_mm\nnot a time,1\n",
  };
  SeriesFormat fmt;
  fmt.step_s = 300.0;
  using Reader = RainSeries (*)(std::istream&, const std::string&, const SeriesFormat&);
  const std::vector<std::pair<const char*, Reader>> readers = {
      {"series", [](std::istream& in, const std::string& label,
                    const SeriesFormat& f) { return read_rain_series(in, label, f); }},
      {"tips",
       [](std::istream& in, const std::string& label, const SeriesFormat& f) {
         return read_rain_tips(in, label, f, TipSpreading{0.2e-3, kDefaultTipCap_s});
       }},
      {"daily", [](std::istream& in, const std::string& label,
                   const SeriesFormat& f) { return read_rain_daily(in, label, f); }},
  };
  for (const auto& [format, read] : readers) {
    for (const std::string& text : bad) {
      std::istringstream in(text);
      try {
        read(in, "logger.csv", fmt);
        ADD_FAILURE() << format << " took " << testing::PrintToString(text);
      } catch (const InputError& e) {
        const std::string what = e.what();
        EXPECT_EQ(what.rfind("logger.csv:", 0), 0u) << format << ": " << what;
        EXPECT_EQ(what.find('\n'), std::string::npos) << format << ": " << what;
        EXPECT_FALSE(e.message().empty()) << format;
      }
    }
  }
}

// ---------------------------------------------------------------- the scenario file

TEST(BadScenario, MissingFileIsNamed) {
  const Site s = make_site("scenario-missing");
  const std::string missing = (s.dir / "none.yaml").string();
  expect_bad(run("check " + missing, s.dir), missing + ": no such scenario file");
}

TEST(BadScenario, FolderIsNotAScenario) {
  const Site s = make_site("scenario-folder");
  expect_bad(run("check " + s.dir.string(), s.dir),
             s.dir.string() + ": is a folder, not a scenario file");
}

TEST(BadScenario, EmptyFileIsNamed) {
  const Site s = make_site("scenario-empty", kRain, "");
  expect_bad(check_scenario(s), s.scenario + ": the scenario is empty");
}

TEST(BadScenario, BinaryFileIsNotText) {
  const Site s = make_site("scenario-binary", kRain, std::string("site:\n\x1f\x8b\x08\0\0\0", 12));
  expect_bad(check_scenario(s),
             s.scenario + ":2: binary data (a NUL byte on this line), not a YAML text file");
}

TEST(BadScenario, SyntaxErrorNamesTheLine) {
  const Site s = scenario_site("scenario-syntax", "release:\n  kind: bell\n",
                               "release:\n  kind: bell\n   trigger: [1\n");
  expect_bad(check_scenario(s), s.scenario + ":10: YAML syntax error: illegal map value");
}

TEST(BadScenario, UnclosedBraceIsASyntaxError) {
  const Site s =
      scenario_site("scenario-brace", "battery: {capacity_Wh: 12}", "battery: {capacity_Wh: 12");
  expect_bad(check_scenario(s), s.scenario + ":18: YAML syntax error: end of map flow not found");
}

TEST(BadScenario, TabIndentationIsNamed) {
  const Site s = scenario_site("scenario-tab", "  kind: bell\n", "\tkind: bell\n");
  expect_bad(check_scenario(s),
             s.scenario + ":9: a tab in the indentation; YAML indents with spaces only");
}

TEST(BadScenario, TopLevelListIsNotASection) {
  const Site s = make_site("scenario-list", kRain, "- site\n- rain\n");
  expect_bad(check_scenario(s),
             s.scenario + ":1: expected a section of keys at the top level, got a list");
}

TEST(BadScenario, MisspeltKeySuggestsTheNearest) {
  const Site s = scenario_site("scenario-misspelt", "runoff_coefficient", "runof_coefficient");
  expect_bad(check_scenario(s), s.scenario +
                                    ":6: roof.runof_coefficient: unknown key; did you mean "
                                    "runoff_coefficient?");
}

TEST(BadScenario, UnknownSectionSuggestsTheNearest) {
  const Site s = scenario_site("scenario-section", "turbine:", "turbin:");
  expect_bad(check_scenario(s), s.scenario + ":16: turbin: unknown key; did you mean turbine?");
}

TEST(BadScenario, DecimalCommaInASectionIsNamed) {
  const Site s = scenario_site("scenario-comma", "temperature_C: 12}", "temperature_C: 12,5}");
  expect_bad(check_scenario(s), s.scenario +
                                    ":2: site.5: unknown key; a number is not a key name (a "
                                    "decimal comma? write decimals with a point, such as 12.5)");
}

TEST(BadScenario, DuplicateKeyNamesTheFirst) {
  const Site s =
      scenario_site("scenario-duplicate", "  kind: bell\n", "  kind: bell\n  kind: none\n");
  expect_bad(check_scenario(s),
             s.scenario + ":10: release.kind: duplicate key (first given on line 9)");
}

TEST(BadScenario, MissingRequiredKeyNamesItsSection) {
  const Site s = scenario_site("scenario-required", "area_m2: 40, ", "");
  expect_bad(check_scenario(s), s.scenario + ":6: roof.area_m2: missing required key");
}

TEST(BadScenario, MissingRequiredSectionIsNamed) {
  const Site s = scenario_site("scenario-no-battery", "battery: {capacity_Wh: 12}\n", "");
  expect_bad(check_scenario(s), s.scenario + ": battery: missing required section");
}

TEST(BadScenario, ValueForASectionIsTheWrongType) {
  const Site s = scenario_site("scenario-section-type", "turbine: {runner_diameter_mm: 70}",
                               "turbine: impulse");
  expect_bad(check_scenario(s),
             s.scenario + ":16: turbine: expected a section of keys, got \"impulse\"");
}

TEST(BadScenario, ListForANumberIsTheWrongType) {
  const Site s = scenario_site("scenario-list-number", "area_m2: 40", "area_m2: [40, 41]");
  expect_bad(check_scenario(s), s.scenario + ":6: roof.area_m2: expected a number, got a list");
}

TEST(BadScenario, TextForANumberIsQuoted) {
  const Site s = scenario_site("scenario-text-number", "area_m2: 40", "area_m2: forty");
  expect_bad(check_scenario(s), s.scenario + ":6: roof.area_m2: expected a number, got \"forty\"");
}

TEST(BadScenario, NumberWithAUnitIsNotANumber) {
  const Site s = scenario_site("scenario-unit-number", "area_m2: 40", "area_m2: 40 m2");
  expect_bad(check_scenario(s), s.scenario + ":6: roof.area_m2: expected a number, got \"40 m2\"");
}

TEST(BadScenario, MultiLineValueIsShownOnOneLine) {
  const Site s = scenario_site("scenario-multiline", "  trigger_level_mm: 50\n",
                               "  trigger_level_mm: |\n    50\n    60\n");
  expect_bad(check_scenario(s), s.scenario +
                                    ":10: release.trigger_level_mm: expected a number, got "
                                    "\"50\\x0A60\\x0A\"");
}

TEST(BadScenario, NanIsNotANumber) {
  const Site s = scenario_site("scenario-nan", "area_m2: 40", "area_m2: .nan");
  expect_bad(check_scenario(s), s.scenario + ":6: roof.area_m2: expected a number, got \".nan\"");
}

TEST(BadScenario, InfinityIsNotANumber) {
  const Site s = scenario_site("scenario-inf", "length_m: 8", "length_m: .inf");
  expect_bad(check_scenario(s),
             s.scenario + ":7: reservoir.length_m: expected a number, got \".inf\"");
}

TEST(BadScenario, NegativeAreaMustBePositive) {
  const Site s = scenario_site("scenario-negative", "area_m2: 40", "area_m2: -40");
  expect_bad(check_scenario(s), s.scenario + ":6: roof.area_m2: must be > 0 (got -40)");
}

TEST(BadScenario, AbsurdRoofAreaIsRefused) {
  // Such areas used to make a run crawl for hours instead of failing.
  const Site s = scenario_site("scenario-absurd", "area_m2: 40", "area_m2: 4e30");
  expect_bad(
      check_scenario(s),
      s.scenario + ":6: roof.area_m2: must be at most 1000000, a square kilometre (got 4e30)");
}

TEST(BadScenario, CoefficientAboveOneIsRefused) {
  const Site s =
      scenario_site("scenario-coefficient", "runoff_coefficient: 0.9", "runoff_coefficient: 90");
  expect_bad(check_scenario(s),
             s.scenario + ":6: roof.runoff_coefficient: must be > 0 and <= 1 (got 90)");
}

TEST(BadScenario, RimAboveAHalfRoundGutterIsImpossible) {
  const Site s = scenario_site("scenario-rim", "rim_mm: 62", "rim_mm: 80");
  expect_bad(check_scenario(s), s.scenario +
                                    ":7: reservoir.rim_mm: must be <= the depth of shape: "
                                    "half_round, 62.5 mm (got 80)");
}

TEST(BadScenario, NozzleWiderThanThePipeIsImpossible) {
  const Site s =
      scenario_site("scenario-nozzle", "nozzle: {diameter_mm: 6}", "nozzle: {diameter_mm: 25}");
  expect_bad(check_scenario(s), s.scenario +
                                    ":15: nozzle.diameter_mm: must be smaller than "
                                    "drop_pipe.diameter_mm = 19 (got 25)");
}

TEST(BadScenario, PipeShorterThanItsDropIsImpossible) {
  const Site s =
      scenario_site("scenario-pipe", "length_m: 4.5, drop_m: 4.0", "length_m: 3, drop_m: 4.0");
  expect_bad(check_scenario(s),
             s.scenario + ":14: drop_pipe.length_m: must be >= drop_pipe.drop_m = 4.0 (got 3)");
}

TEST(BadScenario, BreakLevelAtOrAboveTriggerIsImpossible) {
  const Site s = scenario_site("scenario-break", "break_level_mm: 8", "break_level_mm: 50");
  expect_bad(check_scenario(s), s.scenario +
                                    ":11: release.break_level_mm: must be below "
                                    "release.trigger_level_mm = 50 (got 50)");
}

TEST(BadScenario, TriggerAboveTheRimIsImpossible) {
  const Site s = scenario_site("scenario-trigger", "trigger_level_mm: 50", "trigger_level_mm: 70");
  expect_bad(check_scenario(s), s.scenario +
                                    ":10: release.trigger_level_mm: must not be above "
                                    "reservoir.rim_mm = 62 (got 70)");
}

TEST(BadScenario, KeyNeededByTheKindIsNamed) {
  const Site s = scenario_site("scenario-kind-key", "  kind: bell\n", "  kind: float_valve\n");
  expect_bad(check_scenario(s), s.scenario +
                                    ":8: release.orifice_diameter_mm: missing required key "
                                    "(needed by kind: float_valve)");
}

TEST(BadScenario, UnknownChoiceListsTheChoices) {
  const Site s = scenario_site("scenario-choice", "  kind: bell\n", "  kind: siphon\n");
  expect_bad(check_scenario(s), s.scenario +
                                    ":9: release.kind: expected one of bell, float_valve, "
                                    "orifice or none, got \"siphon\"");
}

TEST(BadScenario, UnknownRainUnitListsTheUnits) {
  const Site s =
      scenario_site("scenario-unit", "  format: series\n", "  format: series\n  unit: cm\n");
  expect_bad(check_scenario(s),
             s.scenario + ":6: rain.unit: expected one of mm, in, mm/h or in/h, got \"cm\"");
}

TEST(BadScenario, IntensityUnitForDepthValuesIsRefused) {
  const Site s = scenario_site("scenario-depth-unit", "  format: series\n",
                               "  format: series\n  unit: mm/h\n");
  expect_bad(check_scenario(s),
             s.scenario + ":6: rain.unit: must be mm or in with value: depth (got mm/h)");
}

TEST(BadScenario, DurationWithoutAUnitAsksForOne) {
  const Site s =
      make_site("scenario-duration", kRain, kScenario + "simulation: {output_interval: 60}\n");
  expect_bad(check_scenario(s), s.scenario +
                                    ":18: simulation.output_interval: expected a duration with a "
                                    "unit such as 30s, 5min, 1h or 1d, got \"60\"");
}

TEST(BadScenario, EndBeforeStartIsAnEmptyPeriod) {
  const Site s =
      make_site("scenario-period", kRain,
                kScenario + "simulation: {start: 2025-03-02T00:00, end: 2025-03-01T00:00}\n");
  expect_bad(check_scenario(s), s.scenario +
                                    ":18: simulation.end: must be after simulation.start = "
                                    "2025-03-02T00:00 (got 2025-03-01T00:00)");
}

TEST(BadScenario, BadUtcOffsetShowsTheForm) {
  const Site s = scenario_site("scenario-offset", "temperature_C: 12}",
                               "temperature_C: 12, utc_offset: \"+2h\"}");
  expect_bad(check_scenario(s), s.scenario +
                                    ":2: site.utc_offset: expected a UTC offset such as +02:00, "
                                    "got \"+2h\"");
}

// ---------------------------------------------------------------- the command line

TEST(BadCommandLine, UnknownCommandListsTheCommands) {
  const fs::path dir = scratch("bad-cli-command");
  const Outcome r = run("simulate site.yaml", dir);
  EXPECT_EQ(r.status, 2);
  EXPECT_EQ(lines(r.err), 1) << r.err;
  EXPECT_EQ(
      r.err.rfind("gutterwatt: error: unknown command \"simulate\"; expected run, check, ", 0), 0u)
      << r.err;
  EXPECT_NE(r.err.find(" (see gutterwatt --help)\n"), std::string::npos) << r.err;
}

TEST(BadCommandLine, NoCommandListsTheCommands) {
  const fs::path dir = scratch("bad-cli-none");
  const Outcome r = run("", dir);
  EXPECT_EQ(r.status, 2);
  EXPECT_EQ(lines(r.err), 1) << r.err;
  EXPECT_EQ(r.err.rfind("gutterwatt: error: no command given; expected run, check, ", 0), 0u)
      << r.err;
}

TEST(BadCommandLine, UnknownOptionBeforeTheCommandIsNamed) {
  const fs::path dir = scratch("bad-cli-top-option");
  const Outcome r = run("--verbose", dir);
  EXPECT_EQ(r.status, 2);
  EXPECT_EQ(lines(r.err), 1) << r.err;
  EXPECT_EQ(r.err.rfind("gutterwatt: error: unknown option --verbose; expected a command first: "
                        "run, check, ",
                        0),
            0u)
      << r.err;
}

TEST(BadCommandLine, UnknownOptionOfACommandPointsToItsHelp) {
  const Site s = make_site("cli-option");
  expect_bad(run("run " + s.scenario + " --output", s.dir),
             "The following argument was not expected: --output (see gutterwatt run --help)");
}

TEST(BadCommandLine, MissingScenarioIsNamed) {
  const fs::path dir = scratch("bad-cli-no-scenario");
  expect_bad(run("run", dir), "scenario is required (see gutterwatt run --help)");
}

TEST(BadCommandLine, OptionWithoutItsValueIsNamed) {
  const Site s = make_site("cli-no-value");
  expect_bad(run("run " + s.scenario + " --out", s.dir),
             "--out: 1 required TEXT missing (see gutterwatt run --help)");
}

TEST(BadCommandLine, SetWithoutAnEqualsSignShowsTheForm) {
  const Site s = make_site("cli-set-form");
  expect_bad(run("check --no-rain " + s.scenario + " --set roof.area_m2", s.dir),
             "--set: expected key.path=value, got \"roof.area_m2\"");
}

TEST(BadCommandLine, SetOfAnUnknownKeySuggestsTheNearest) {
  const Site s = make_site("cli-set-key");
  expect_bad(run("check --no-rain " + s.scenario + " --set roof.area=30", s.dir),
             "--set: roof.area: unknown key; did you mean area_m2?");
}

TEST(BadCommandLine, SetOfAWrongValueIsChecked) {
  const Site s = make_site("cli-set-value");
  expect_bad(run("check --no-rain " + s.scenario + " --set release.break_level_mm=55", s.dir),
             "--set: release.break_level_mm: must be below release.trigger_level_mm = 50 (got "
             "55)");
}

TEST(BadCommandLine, SetOfUnreadableYamlIsASyntaxError) {
  const Site s = make_site("cli-set-yaml");
  expect_bad(run("check --no-rain " + s.scenario + " --set 'battery.load_profile_W=[1, 2'", s.dir),
             "--set: battery.load_profile_W: cannot read the value: end of sequence flow not "
             "found");
}

TEST(BadCommandLine, SetOfTextYamlCannotReadSaysToQuoteIt) {
  const Site s = make_site("cli-set-quote");
  expect_bad(run("check --no-rain " + s.scenario + " --set 'site.name=@home'", s.dir),
             "--set: site.name: cannot read the value: unknown token; quote text that holds "
             "YAML's special characters: --set 'site.name=\"...\"'");
}

TEST(BadCommandLine, FromThatIsNotATimeShowsTheForm) {
  const Site s = make_site("cli-from");
  expect_bad(
      run("run " + s.scenario + " --from yesterday --out " + (s.dir / "out").string(), s.dir),
      "--set: simulation.start: expected an ISO 8601 date-time such as 2025-03-01T00:00, "
      "got \"yesterday\"");
}

TEST(BadCommandLine, PeriodOutsideTheRecordIsNamed) {
  const Site s = make_site("cli-period");
  expect_bad(run("run " + s.scenario + " --from 2025-02-01T00:00 --out " + (s.dir / "out").string(),
                 s.dir),
             s.scenario +
                 ": simulation.start: the rain record has no data from 2025-02-01T00:00 to "
                 "2025-03-01T00:00; move the period inside the record or set rain.gaps: zero or "
                 "skip");
}

TEST(BadCommandLine, UnknownStormKindListsTheKinds) {
  const fs::path dir = scratch("bad-cli-storm-kind");
  expect_bad(run("storm --kind scs --depth 40 --duration 24h --step 5min", dir),
             "--kind: unknown storm kind 'scs'; expected one of nrcs-I, nrcs-IA, nrcs-II, "
             "nrcs-III, chicago, idf-block, block");
}

TEST(BadCommandLine, StormDurationWithoutAUnitAsksForOne) {
  const fs::path dir = scratch("bad-cli-storm-duration");
  expect_bad(run("storm --kind block --depth 40 --duration 24 --step 5min", dir),
             "--duration: expected a duration with its unit such as 30min or 24h (got \"24\")");
}

TEST(BadCommandLine, StormOutputThatIsAFolderIsRefused) {
  const fs::path dir = scratch("bad-cli-storm-folder");
  expect_bad(
      run("storm --kind block --depth 40 --duration 1h --step 5min --out " + dir.string(), dir),
      dir.string() + ": --out: is a folder; give the name of a file to write");
}

TEST(BadCommandLine, StormOutputThatIsAPipeIsRefused) {
  // The output is renamed into place, which would replace a pipe or device, not write to it.
  const fs::path dir = scratch("bad-cli-storm-pipe");
  ASSERT_EQ(shell("mkfifo " + (dir / "pipe").string(), dir).status, 0);
  expect_bad(run("storm --kind block --depth 40 --duration 1h --step 5min --out " +
                     (dir / "pipe").string(),
                 dir),
             (dir / "pipe").string() +
                 ": --out: is not a regular file; give the name of a file "
                 "to write");
  EXPECT_TRUE(fs::is_fifo(dir / "pipe"));
}

// ---------------------------------------------------------------- faults around a run

TEST(RunFaults, OutputFolderUnderARegularFileIsAClearError) {
  // Tests run as root, where permission bits do not stop writes; a folder cannot be made
  // under a regular file whoever asks.
  const Site s = make_site("fault-under-file");
  write_file(s.dir / "notes.txt", "invented notes\n");
  const fs::path out = s.dir / "notes.txt" / "out";
  expect_bad(run("run " + s.scenario + " --out " + out.string(), s.dir),
             out.string() + ": --out: cannot create the output folder (Not a directory)");
  EXPECT_EQ(names_in(s.dir), (std::set<std::string>{"notes.txt", "rain.csv", "site.yaml",
                                                    "stderr.txt", "stdout.txt"}));
}

TEST(RunFaults, OutputFolderInsideProcIsAClearError) {
  const Site s = make_site("fault-proc");
  expect_bad(run("run " + s.scenario + " --out /proc/gutterwatt-out", s.dir),
             "/proc/gutterwatt-out: --out: cannot create the output folder (No such file or "
             "directory)");
}

TEST(RunFaults, FullDiskKeepsEarlierResultsAndLeavesNoTemporaryFile) {
  // A full disk cannot be made without mount rights, and /dev/full cannot be the output: the
  // writer writes a temporary file beside it and renames that into place. A file-size limit
  // makes write(2) fail part-way through the same way (EFBIG instead of ENOSPC) once SIGXFSZ is
  // ignored.
  const Site s = make_site("fault-disk-full");
  const fs::path out = earlier_results(s.dir);
  const Outcome r = shell(
      "ulimit -f 16; trap '' XFSZ; exec " + std::string(GUTTERWATT_EXE) + " run " + s.scenario +
          " --quiet --set simulation.output_interval=1s" + " --out " + out.string(),
      s.dir);
  EXPECT_EQ(r.status, 1);
  EXPECT_EQ(r.err, "gutterwatt: error: " + (out / "timeseries.csv").string() +
                       ": write failed (disk full?); earlier results kept\n");
  expect_earlier_results_untouched(out);
}

namespace {

// A long invented record: ten years at a 5-minute step of a repeating hour of showers that
// fill, prime and overflow the gutter, so the solver has switches to find all along (a few
// seconds of run here), written in the test's folder.
std::string long_rain(int years) {
  static constexpr const char* kHour[] = {"0",   "0",   "0", "0.1",  "0.6",  "1.2",
                                          "0.6", "0.3", "0", "0.05", "0.05", "0"};
  std::string text = "time,rain_mm\n";
  const gutterwatt::Instant start = gutterwatt::test_support::kStart;
  const gutterwatt::Instant end = start + years * 365 * 86400;
  int k = 0;
  for (gutterwatt::Instant t = start + 300; t <= end; t += 300, k = (k + 1) % 12) {
    text += gutterwatt::format_iso8601(t) + "," + kHour[k] + "\n";
  }
  return text;
}

// Sends `sig` to a running child and checks that it stops within 2 s with status 130, the
// earlier results in `out` untouched and no temporary file left.
void expect_prompt_stop(Child& child, int sig, const fs::path& out,
                        const std::vector<std::string>& earlier) {
  ASSERT_FALSE(child.wait_for(std::chrono::milliseconds(0))) << "the run ended too soon";
  const auto sent = std::chrono::steady_clock::now();
  child.signal(sig);
  const std::optional<int> status = child.wait_for(std::chrono::seconds(10));
  const auto waited = std::chrono::steady_clock::now() - sent;
  ASSERT_TRUE(status) << "still running 10 s after the signal";
  EXPECT_LT(waited, std::chrono::seconds(2));
  EXPECT_EQ(*status, 130);
  EXPECT_EQ(child.outcome().err,
            "gutterwatt: error: interrupted; earlier results in the output folder are "
            "untouched\n");
  expect_earlier_results_untouched(out, earlier);
}

// Starts a long run over earlier results and signals it once it has begun writing (a new entry
// in the output folder), well inside the simulation.
void expect_run_stops(const std::string& name, int sig) {
  const Site s = make_site(name, long_rain(10));
  const fs::path out = earlier_results(s.dir);
  const std::set<std::string> before = names_in(out);
  Child child({"run", s.scenario, "--quiet", "--out", out.string()}, s.dir);
  ASSERT_TRUE(child.started());
  const auto deadline = std::chrono::steady_clock::now() + std::chrono::seconds(60);
  while (names_in(out) == before && std::chrono::steady_clock::now() < deadline &&
         !child.wait_for(std::chrono::milliseconds(0))) {
    std::this_thread::sleep_for(std::chrono::milliseconds(5));
  }
  ASSERT_NE(names_in(out), before) << "the run never began writing: " << child.outcome().err;
  std::this_thread::sleep_for(std::chrono::milliseconds(200));
  expect_prompt_stop(child, sig, out, kRunFiles);
}

}  // namespace

TEST(RunFaults, SigintStopsALongRunPromptlyAndKeepsEarlierResults) {
  expect_run_stops("fault-sigint", SIGINT);
}

TEST(RunFaults, SigtermStopsALongRunPromptlyAndKeepsEarlierResults) {
  expect_run_stops("fault-sigterm", SIGTERM);
}

TEST(RunFaults, SigintStopsALongSweepPromptlyAndKeepsEarlierResults) {
  // A sweep writes only at the end, so the signal goes after a second: by then the record
  // (read in a fraction of that) is read and the first combinations are running.
  const Site s = make_site("fault-sweep", long_rain(10));
  const std::vector<std::string> earlier = {"skipped.csv", "sweep.csv", "sweep.json"};
  const fs::path out = earlier_results(s.dir, earlier);
  Child child({"sweep", s.scenario, "--vary", "release.trigger_level_mm=40,45", "--jobs", "1",
               "--quiet", "--out", out.string()},
              s.dir);
  ASSERT_TRUE(child.started());
  std::this_thread::sleep_for(std::chrono::seconds(1));
  expect_prompt_stop(child, SIGINT, out, earlier);
}

TEST(RunFaults, StopFlagInterruptsTheSimulation) {
  using namespace gutterwatt;
  const Scenario sc = test_support::make_scenario();
  const RainSeries rain = test_support::constant_inflow(sc, 1e-5);
  test_support::RecordingObserver observer;
  std::atomic<bool> stop{true};
  RunOptions options;
  options.stop = &stop;
  EXPECT_THROW(simulate(sc, rain, observer, options), Interrupted);
}

TEST(NumericalFault, NonFiniteStateIsASimulationErrorWithTimeModeAndState) {
  // The loader lets no NaN through, so this scenario is built in code, past its checks.
  using namespace gutterwatt;
  Scenario sc = test_support::make_scenario(3600.0);
  sc.roof.runoff_coefficient = std::numeric_limits<double>::quiet_NaN();
  const RainSeries rain = test_support::constant_inflow(sc, 1e-5);
  test_support::RecordingObserver observer;
  try {
    simulate(sc, rain, observer);
    FAIL() << "no SimulationError";
  } catch (const SimulationError& e) {
    const std::regex form(
        "simulation failed at 2025-03-01T00:[0-9:]+ \\(t = [0-9.]+ s\\): the state is not "
        "finite; mode: release [a-z]+[^;]*; state: level [-0-9.a-z]+ mm, reservoir [-0-9.a-z]+ "
        "L, roof [-0-9.a-z]+ L, column [-0-9.a-z]+ L, battery [-0-9.a-z]+ Wh");
    EXPECT_TRUE(std::regex_match(std::string(e.what()), form)) << e.what();
  }
}
