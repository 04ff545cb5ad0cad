// The README compares the demo system fed by one invented season read in different ways (a
// 5-minute series, a tip log, daily totals): the scenarios must differ in their rain only. When
// evaporation and the lead-acid preset went into demo.yaml alone, the comparison quietly set two
// systems side by side.

#include <gtest/gtest.h>

#include <fstream>
#include <sstream>
#include <string>
#include <vector>

namespace {

// The scenario's lines without comments, blank lines and the `rain:` section (the line that
// opens it and the indented lines under it).
std::vector<std::string> lines_outside_rain(const std::string& name) {
  std::ifstream in(std::string(GUTTERWATT_SOURCE_DIR) + "/scenarios/" + name);
  EXPECT_TRUE(in) << name;
  std::vector<std::string> out;
  bool in_rain = false;
  for (std::string line; std::getline(in, line);) {
    line = line.substr(0, line.find('#'));
    while (!line.empty() && line.back() == ' ') line.pop_back();
    if (line.empty()) continue;
    const bool indented = line.front() == ' ';
    if (!indented) in_rain = line.rfind("rain:", 0) == 0;
    if (!in_rain) out.push_back(line);
  }
  return out;
}

TEST(DemoVariants, DifferInTheirRainOnly) {
  const std::vector<std::string> demo = lines_outside_rain("demo.yaml");
  ASSERT_FALSE(demo.empty());
  for (const char* variant : {"tips-demo.yaml", "daily-demo.yaml"}) {
    EXPECT_EQ(lines_outside_rain(variant), demo) << variant;
  }
}

}  // namespace
