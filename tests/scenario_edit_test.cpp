#include "gutterwatt/scenario_edit.hpp"

#include <gtest/gtest.h>

#include <string>

#include "gutterwatt/error.hpp"
#include "test_support.hpp"

namespace gutterwatt::scenario_edit_test {
namespace {

TEST(ScenarioEdit, ReplacesABlockValueAndKeepsItsComment) {
  EXPECT_EQ(set_scenario_value("release:\n  kind: bell\n  priming_flow_L_per_min: 3  # guess\n",
                               "release.priming_flow_L_per_min", "1.6", "s.yaml"),
            "release:\n  kind: bell\n  priming_flow_L_per_min: 1.6  # guess\n");
}

TEST(ScenarioEdit, ReplacesAFlowValueBetweenItsNeighbours) {
  EXPECT_EQ(set_scenario_value("drop_pipe: {diameter_mm: 19, minor_loss_k: 2.0, drop_m: 4}\n",
                               "drop_pipe.minor_loss_k", "3.5", "s.yaml"),
            "drop_pipe: {diameter_mm: 19, minor_loss_k: 3.5, drop_m: 4}\n");
  EXPECT_EQ(set_scenario_value("nozzle: {diameter_mm: 6, discharge_coefficient: 0.95}\n",
                               "nozzle.discharge_coefficient", "0.9", "s.yaml"),
            "nozzle: {diameter_mm: 6, discharge_coefficient: 0.9}\n");
}

TEST(ScenarioEdit, ReplacesAQuotedValueWhole) {
  EXPECT_EQ(set_scenario_value("site:\n  name: \"a: b\"  # x\n", "site.name", "c", "s.yaml"),
            "site:\n  name: c  # x\n");
}

TEST(ScenarioEdit, AddsAMissingKeyFirstInItsSection) {
  EXPECT_EQ(set_scenario_value("nozzle: {diameter_mm: 6}\n", "nozzle.discharge_coefficient", "0.9",
                               "s.yaml"),
            "nozzle: {discharge_coefficient: 0.9, diameter_mm: 6}\n");
  EXPECT_EQ(set_scenario_value("# top\ndrop_pipe:\n    diameter_mm: 19\n", "drop_pipe.minor_loss_k",
                               "3", "s.yaml"),
            "# top\ndrop_pipe:\n    minor_loss_k: 3\n    diameter_mm: 19\n");
}

TEST(ScenarioEdit, RejectsAMissingSection) {
  EXPECT_EQ(test_support::input_error_of([] {
              set_scenario_value("site: {name: x}\n", "nozzle.diameter_mm", "6", "s.yaml");
            }),
            "s.yaml: nozzle: missing section (needed to write nozzle.diameter_mm)");
}

TEST(ScenarioEdit, RelocatesRelativeRainPathsOnly) {
  EXPECT_EQ(relocate_scenario_text("rain:\n  file: ../data/r.csv\n", "/a/scenarios", "/a/out/x",
                                   "s.yaml"),
            "rain:\n  file: ../../data/r.csv\n");
  EXPECT_EQ(
      relocate_scenario_text("rain: {files: [r1.csv, /abs/r2.csv]}\n", "/a/s", "/a", "s.yaml"),
      "rain: {files: [s/r1.csv, /abs/r2.csv]}\n");
}

}  // namespace
}  // namespace gutterwatt::scenario_edit_test
