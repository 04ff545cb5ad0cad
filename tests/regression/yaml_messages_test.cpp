// YAML that the parser cannot take is described in words, with its line (issue 14, item 9):
// nesting past the parser's depth limit, tab indentation, and CR-only line ends.

#include <gtest/gtest.h>

#include <filesystem>
#include <string>

#include "cli_support.hpp"

namespace fs = std::filesystem;
using namespace gutterwatt::cli_support;

namespace {

// `gutterwatt check --no-rain` of a scenario made of `text`.
Outcome check_text(const std::string& name, const std::string& text) {
  const fs::path dir = scratch(name);
  write_file(dir / "site.yaml", text);
  return run("check --no-rain " + (dir / "site.yaml").string(), dir);
}

std::string scenario_in(const std::string& name) { return (scratch(name) / "site.yaml").string(); }

}  // namespace

TEST(YamlMessages, NestingPastTheDepthLimitSaysSo) {
  const std::string file = scenario_in("yaml-deep");
  const Outcome r = check_text("yaml-deep", "site: {name: x}\nrain: " + std::string(3000, '[') +
                                                std::string(3000, ']') + "\n");
  expect_bad(r, file +
                    ":2: nested more than 500 levels deep; a scenario's sections nest a few "
                    "levels at most");
}

TEST(YamlMessages, TabIndentationSaysSo) {
  const std::string file = scenario_in("yaml-tab");
  expect_bad(check_text("yaml-tab", "# invented\nsite:\n\tname: x\n"),
             file + ":3: a tab in the indentation; YAML indents with spaces only");
}

TEST(YamlMessages, CarriageReturnLineEndsSaySo) {
  const std::string file = scenario_in("yaml-cr");
  expect_bad(check_text("yaml-cr", "site: {name: x}\rrain: {file: r.csv}\r"),
             file +
                 ":1: this line ends with a carriage return alone (CR line ends, as old Mac files "
                 "have); save the file with LF or CRLF line ends");
}

TEST(YamlMessages, CrlfLineEndsAreTaken) {
  const fs::path site = fixture_site("yaml-crlf");
  std::string text = slurp(site / "shed.yaml");
  std::string crlf;
  for (char c : text) crlf += c == '\n' ? std::string("\r\n") : std::string(1, c);
  write_file(site / "shed.yaml", crlf);
  EXPECT_EQ(run("check --no-rain " + (site / "shed.yaml").string(), site).status, 0);
}
