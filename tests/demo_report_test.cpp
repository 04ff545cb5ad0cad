// End-to-end: the demo run and a two-key sweep of it, each turned into a report page by the
// built executable, as tools/demo does.

#include <gtest/gtest.h>
#include <sys/wait.h>

#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <sstream>
#include <string>

namespace fs = std::filesystem;

namespace {

std::string slurp(const fs::path& p) {
  std::ifstream in(p, std::ios::binary);
  std::ostringstream s;
  s << in.rdbuf();
  return s.str();
}

int run(const std::string& args) {
  const std::string cmd = std::string(GUTTERWATT_EXE) + " " + args + " >/dev/null 2>&1 </dev/null";
  const int raw = std::system(cmd.c_str());
  return WIFEXITED(raw) ? WEXITSTATUS(raw) : -1;
}

std::size_t count(const std::string& text, const std::string& what) {
  std::size_t n = 0;
  for (std::size_t at = text.find(what); at != std::string::npos; at = text.find(what, at + 1)) ++n;
  return n;
}

const std::string kDemo = std::string(GUTTERWATT_SOURCE_DIR) + "/scenarios/demo.yaml";

}  // namespace

TEST(DemoReport, RunPageHoldsTheChartsAndLoadsNothing) {
  const fs::path dir = fs::temp_directory_path() / "gutterwatt-demo-report-run";
  fs::remove_all(dir);
  ASSERT_EQ(run("run " + kDemo + " --quiet --out " + dir.string()), 0);
  ASSERT_EQ(run("report " + dir.string()), 0);
  const std::string page = slurp(dir / "report.html");
  EXPECT_GE(count(page, "<svg"), 6u);
  EXPECT_EQ(count(page, "http://") + count(page, "https://"), 0u);
  EXPECT_EQ(count(page, "<script"), 0u);
  EXPECT_NE(page.find("Working at height"), std::string::npos);
  // The run writes its trace, and the page draws the typical cycle from it below the warnings.
  EXPECT_TRUE(fs::exists(dir / "trace.csv"));
  EXPECT_NE(page.find("<svg id=\"chart-typical-cycle\""), std::string::npos);
  EXPECT_LT(page.find("id=\"warnings\""), page.find("id=\"headline\""));
}

TEST(DemoReport, TraceOffWritesNoTrace) {
  const fs::path dir = fs::temp_directory_path() / "gutterwatt-demo-report-no-trace";
  fs::remove_all(dir);
  ASSERT_EQ(run("run " + kDemo + " --quiet --set simulation.trace=off --out " + dir.string()), 0);
  EXPECT_FALSE(fs::exists(dir / "trace.csv"));
  EXPECT_TRUE(fs::exists(dir / "timeseries.csv"));
  ASSERT_EQ(run("report " + dir.string()), 0);
  EXPECT_NE(slurp(dir / "report.html").find("No trace.csv in this folder"), std::string::npos);
}

TEST(DemoReport, SweepPageHoldsTheHeatMaps) {
  const fs::path dir = fs::temp_directory_path() / "gutterwatt-demo-report-sweep";
  fs::remove_all(dir);
  ASSERT_EQ(run("sweep " + kDemo +
                " --quiet --vary release.priming_flow_L_per_min=1,2 "
                "--vary release.trigger_level_mm=45,50 --out " +
                dir.string()),
            0);
  ASSERT_EQ(run("report " + dir.string()), 0);
  const std::string page = slurp(dir / "report.html");
  EXPECT_GE(count(page, "<svg"), 2u);
  EXPECT_NE(page.find("release.priming_flow_L_per_min"), std::string::npos);
  EXPECT_EQ(count(page, "http://") + count(page, "https://"), 0u);
}
