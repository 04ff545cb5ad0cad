#include "gutterwatt/storm.hpp"

#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <functional>
#include <numeric>
#include <sstream>
#include <string>
#include <vector>

#include "gutterwatt/error.hpp"
#include "gutterwatt/units.hpp"

namespace gutterwatt::storm_test {
namespace {

constexpr double kDay_s = 86400.0;

double hours(double h) { return h * 3600.0; }

// Runs `action`, expects an InputError and returns its what(), or a marker when none is thrown.
std::string input_error_text(const std::function<void()>& action) {
  try {
    action();
  } catch (const InputError& error) {
    return error.what();
  }
  return "no InputError thrown";
}

double sum(const std::vector<double>& values) {
  return std::accumulate(values.begin(), values.end(), 0.0);
}

StormSpec nrcs_spec(StormKind kind, double depth_m) {
  StormSpec spec;
  spec.kind = kind;
  spec.depth_m = depth_m;
  spec.duration_s = kDay_s;
  spec.step_s = 300.0;
  return spec;
}

// The IDF curve of the Chicago check in REFERENCES.md section 8 (a in mm/h, b in minutes).
constexpr IdfCurve kChicagoIdf{1500.0, 10.0, 0.75};

StormSpec chicago_spec(double duration_min, double step_s) {
  StormSpec spec;
  spec.kind = StormKind::chicago;
  spec.duration_s = duration_min * 60.0;
  spec.step_s = step_s;
  spec.idf = kChicagoIdf;
  spec.peak_position = 0.4;
  return spec;
}

struct TabulatedFraction {
  double hour;
  double fraction;
  double tolerance;
};

// source: USDA SCS (1986) TR-55 Appendix B, values from REFERENCES.md section 8; the starred
// (interpolated) hours 15 and 18 of types I, IA and III carry the wider tolerance.
void expect_fractions(StormKind kind, const std::vector<TabulatedFraction>& rows) {
  for (const auto& row : rows) {
    EXPECT_NEAR(nrcs_cumulative_fraction(kind, hours(row.hour)), row.fraction, row.tolerance)
        << storm_kind_name(kind) << " at " << row.hour << " h";
  }
}

TEST(Storm, NrcsTypeIMatchesTr55Fractions) {
  // source: TR-55 (1986) App. B, values from REFERENCES.md section 8
  expect_fractions(StormKind::nrcs_i, {{6, 0.125, 0.005},
                                       {9, 0.254, 0.005},
                                       {10, 0.515, 0.005},
                                       {11, 0.624, 0.005},
                                       {11.5, 0.654, 0.005},
                                       {12, 0.682, 0.005},
                                       {12.5, 0.706, 0.005},
                                       {13, 0.727, 0.005},
                                       {15, 0.80, 0.01},
                                       {16, 0.830, 0.005},
                                       {18, 0.88, 0.01},
                                       {20, 0.926, 0.005},
                                       {24, 1.0, 0.005}});
}

TEST(Storm, NrcsTypeIAMatchesTr55Fractions) {
  // source: TR-55 (1986) App. B, values from REFERENCES.md section 8
  expect_fractions(StormKind::nrcs_ia, {{6, 0.206, 0.005},
                                        {9, 0.520, 0.005},
                                        {10, 0.577, 0.005},
                                        {11, 0.624, 0.005},
                                        {11.5, 0.645, 0.005},
                                        {12, 0.664, 0.005},
                                        {12.5, 0.683, 0.005},
                                        {13, 0.701, 0.005},
                                        {15, 0.77, 0.01},
                                        {16, 0.800, 0.005},
                                        {18, 0.86, 0.01},
                                        {20, 0.906, 0.005},
                                        {24, 1.0, 0.005}});
}

TEST(Storm, NrcsTypeIIMatchesTr55Fractions) {
  // source: TR-55 (1986) App. B, values from REFERENCES.md section 8 (none starred for type II)
  expect_fractions(StormKind::nrcs_ii, {{6, 0.080, 0.005},
                                        {9, 0.147, 0.005},
                                        {10, 0.181, 0.005},
                                        {11, 0.235, 0.005},
                                        {11.5, 0.283, 0.005},
                                        {12, 0.663, 0.005},
                                        {12.5, 0.735, 0.005},
                                        {13, 0.772, 0.005},
                                        {15, 0.854, 0.005},
                                        {16, 0.880, 0.005},
                                        {18, 0.921, 0.005},
                                        {20, 0.952, 0.005},
                                        {24, 1.0, 0.005}});
}

TEST(Storm, NrcsTypeIIIMatchesTr55Fractions) {
  // source: TR-55 (1986) App. B, values from REFERENCES.md section 8
  expect_fractions(StormKind::nrcs_iii, {{6, 0.072, 0.005},
                                         {9, 0.148, 0.005},
                                         {10, 0.189, 0.005},
                                         {11, 0.250, 0.005},
                                         {11.5, 0.298, 0.005},
                                         {12, 0.500, 0.005},
                                         {12.5, 0.702, 0.005},
                                         {13, 0.751, 0.005},
                                         {15, 0.85, 0.01},
                                         {16, 0.886, 0.005},
                                         {18, 0.92, 0.01},
                                         {20, 0.957, 0.005},
                                         {24, 1.0, 0.005}});
}

TEST(Storm, NrcsTypeIIIMatchesCheckedNehValues) {
  // source: City of Austin Drainage Criteria Manual Table 2-6 (NEH 0.1-h tabulation), values
  // from REFERENCES.md section 8
  expect_fractions(StormKind::nrcs_iii,
                   {{1, 0.0100, 0.005}, {9, 0.1458, 0.005}, {17, 0.9095, 0.005}});
}

TEST(Storm, NrcsTypeIIIIsHalfAtNoon) {
  // source: TR-55 (1986) App. B, exact per REFERENCES.md section 8
  EXPECT_NEAR(nrcs_cumulative_fraction(StormKind::nrcs_iii, hours(12)), 0.500, 1e-12);
}

TEST(Storm, NrcsDistributionsRunFromZeroToOneMonotonically) {
  for (StormKind kind :
       {StormKind::nrcs_i, StormKind::nrcs_ia, StormKind::nrcs_ii, StormKind::nrcs_iii}) {
    EXPECT_EQ(nrcs_cumulative_fraction(kind, 0.0), 0.0) << storm_kind_name(kind);
    EXPECT_EQ(nrcs_cumulative_fraction(kind, kDay_s), 1.0) << storm_kind_name(kind);
    double previous = 0.0;
    for (int minute = 1; minute <= 24 * 60; ++minute) {
      const double fraction = nrcs_cumulative_fraction(kind, minute * 60.0);
      EXPECT_GE(fraction, previous) << storm_kind_name(kind) << " at minute " << minute;
      previous = fraction;
    }
  }
}

TEST(Storm, NrcsStormConservesDepthExactly) {
  for (StormKind kind :
       {StormKind::nrcs_i, StormKind::nrcs_ia, StormKind::nrcs_ii, StormKind::nrcs_iii}) {
    const std::vector<double> depths = storm_depths_m(nrcs_spec(kind, 0.0873));
    ASSERT_EQ(depths.size(), 288u);
    EXPECT_EQ(sum(depths), 0.0873) << storm_kind_name(kind);
    EXPECT_TRUE(std::all_of(depths.begin(), depths.end(), [](double d) { return d > 0.0; }));
  }
}

TEST(Storm, NrcsStormStepsFollowTheDistribution) {
  const std::vector<double> depths = storm_depths_m(nrcs_spec(StormKind::nrcs_ii, 0.1));
  // The first 144 five-minute steps end at 12 h.
  const double to_noon = std::accumulate(depths.begin(), depths.begin() + 144, 0.0);
  EXPECT_NEAR(to_noon, 0.1 * nrcs_cumulative_fraction(StormKind::nrcs_ii, hours(12)), 1e-15);
  // The wettest type II steps lie in the quarter hour before noon (steps 142 to 144, 1-based).
  const auto wettest = std::max_element(depths.begin(), depths.end()) - depths.begin();
  EXPECT_GE(wettest, 141);
  EXPECT_LE(wettest, 143);
}

TEST(Storm, NrcsRejectsADurationOtherThan24Hours) {
  StormSpec spec = nrcs_spec(StormKind::nrcs_ii, 0.05);
  spec.duration_s = hours(6);
  EXPECT_EQ(input_error_text([&] { storm_depths_m(spec); }),
            "--duration: NRCS type II storms are tabulated for 24 h only (got 6 h); use chicago "
            "or idf-block for another duration");
}

TEST(Storm, NrcsTakesItsDepthFromAnIdfCurveWhenNoneIsGiven) {
  StormSpec spec = nrcs_spec(StormKind::nrcs_iii, 0.0);
  spec.idf = kChicagoIdf;
  EXPECT_EQ(sum(storm_depths_m(spec)), idf_depth_m(kChicagoIdf, kDay_s));
}

TEST(Storm, ChicagoPeakIntensityIsAOverBToTheC) {
  // source: Keifer & Chu (1957); value computed in REFERENCES.md section 8: a / b^c = 266.74 mm/h
  const double peak_m_per_s = chicago_intensity_m_per_s(kChicagoIdf, 0.4, 3600.0, 0.4 * 3600.0);
  EXPECT_NEAR(peak_m_per_s * 3600.0 / kMetresPerMm, 266.74, 0.005);
  EXPECT_LT(chicago_intensity_m_per_s(kChicagoIdf, 0.4, 3600.0, 0.4 * 3600.0 - 60.0), peak_m_per_s);
  EXPECT_LT(chicago_intensity_m_per_s(kChicagoIdf, 0.4, 3600.0, 0.4 * 3600.0 + 60.0), peak_m_per_s);
}

TEST(Storm, ChicagoTotalsMatchTheIdfDepths) {
  // source: Keifer & Chu (1957), totals computed in REFERENCES.md section 8 (a 1500 mm/h,
  // b 10 min, c 0.75, r 0.4), printed to 0.001 mm
  const std::vector<std::pair<double, double>> cases = {
      {10, 26.434}, {30, 47.154}, {60, 61.982}, {120, 77.923}};
  for (const auto& [minutes, depth_mm] : cases) {
    EXPECT_NEAR(idf_depth_m(kChicagoIdf, minutes * 60.0) / kMetresPerMm, depth_mm, 5e-4);
    const std::vector<double> depths = storm_depths_m(chicago_spec(minutes, 60.0));
    EXPECT_NEAR(sum(depths) / kMetresPerMm, depth_mm, 5e-4) << minutes << " min";
    EXPECT_EQ(sum(depths), storm_total_depth_m(chicago_spec(minutes, 60.0)));
  }
}

TEST(Storm, ChicagoWindowsAroundThePeakHoldTheIdfDepth) {
  // source: Keifer & Chu (1957), REFERENCES.md section 8: from rT before to (1 - r)T after the
  // peak the storm holds the IDF depth for T, inside a longer storm too
  const double storm_s = 180.0 * 60.0;
  const double peak_s = 0.4 * storm_s;
  const std::vector<std::pair<double, double>> cases = {
      {10, 26.434}, {30, 47.154}, {60, 61.982}, {120, 77.923}};
  for (const auto& [minutes, depth_mm] : cases) {
    const double window_s = minutes * 60.0;
    const double held_m =
        chicago_cumulative_depth_m(kChicagoIdf, 0.4, storm_s, peak_s + 0.6 * window_s) -
        chicago_cumulative_depth_m(kChicagoIdf, 0.4, storm_s, peak_s - 0.4 * window_s);
    EXPECT_NEAR(held_m / kMetresPerMm, depth_mm, 5e-4) << minutes << " min";
  }
}

TEST(Storm, ChicagoWettestStepHoldsThePeak) {
  const std::vector<double> depths = storm_depths_m(chicago_spec(60, 60.0));
  ASSERT_EQ(depths.size(), 60u);
  // r = 0.4 puts the peak at minute 24, the boundary of steps 24 and 25 (1-based); with r = 0.4
  // the falling limb is the slower one, so the step after the peak is the wetter.
  EXPECT_EQ(std::max_element(depths.begin(), depths.end()) - depths.begin(), 24);
}

TEST(Storm, ChicagoScalesToAGivenDepth) {
  StormSpec spec = chicago_spec(60, 300.0);
  const std::vector<double> shape = storm_depths_m(spec);
  spec.depth_m = 0.030;
  const std::vector<double> scaled = storm_depths_m(spec);
  EXPECT_EQ(sum(scaled), 0.030);
  const double factor = 0.030 / sum(shape);
  for (std::size_t k = 0; k < shape.size(); ++k) {
    EXPECT_NEAR(scaled[k], shape[k] * factor, 1e-15) << "step " << k;
  }
}

TEST(Storm, ChicagoWithThePeakAtAnEndStaysFinite) {
  for (double r : {0.0, 1.0}) {
    StormSpec spec = chicago_spec(60, 300.0);
    spec.peak_position = r;
    const std::vector<double> depths = storm_depths_m(spec);
    EXPECT_NEAR(sum(depths) / kMetresPerMm, 61.982, 5e-4) << "r " << r;
    EXPECT_TRUE(std::all_of(depths.begin(), depths.end(), [](double d) { return d > 0.0; }));
    const auto wettest = std::max_element(depths.begin(), depths.end()) - depths.begin();
    EXPECT_EQ(wettest, r == 0.0 ? 0 : 11) << "r " << r;
  }
}

// Denver 10-year IDF curve of Chow, Maidment & Mays (1988), Ex. 14.4.1, as given in
// REFERENCES.md section 8: i = 96.6 / (T_d^0.97 + 13.90) in/h with T_d in minutes.
double denver_depth_m(double duration_s) {
  const double t_min = duration_s / 60.0;
  const double i_in_per_h = 96.6 / (std::pow(t_min, 0.97) + 13.90);
  return i_in_per_h * t_min / 60.0 * kMetresPerInch;
}

TEST(Storm, AlternatingBlockReproducesTheWorkedExample) {
  // source: Chow, Maidment & Mays (1988), Applied Hydrology, Ex. 14.4.1, blocks in inches from
  // REFERENCES.md section 8 (2 h storm, 10 min blocks, largest 6th, then right and left)
  const std::vector<double> expected_in = {0.024, 0.033, 0.050, 0.084, 0.178, 0.693,
                                           0.308, 0.117, 0.063, 0.040, 0.028, 0.021};
  const std::vector<double> blocks_m = alternating_block_depths_m(denver_depth_m, 12, 600.0, 0.5);
  ASSERT_EQ(blocks_m.size(), expected_in.size());
  for (std::size_t k = 0; k < blocks_m.size(); ++k) {
    EXPECT_NEAR(blocks_m[k] / kMetresPerInch, expected_in[k], 1e-3) << "block " << k + 1;
  }
}

TEST(Storm, AlternatingBlockCumulativeDepthsMatchTheWorkedExample) {
  // source: Chow, Maidment & Mays (1988), Ex. 14.4.1, cumulative inches from REFERENCES.md
  // section 8; the total is 1.639 in (41.64 mm)
  const std::vector<double> cumulative_in = {0.693, 1.001, 1.178, 1.296, 1.379, 1.443,
                                             1.492, 1.533, 1.566, 1.594, 1.618, 1.639};
  for (std::size_t k = 0; k < cumulative_in.size(); ++k) {
    EXPECT_NEAR(denver_depth_m(600.0 * static_cast<double>(k + 1)) / kMetresPerInch,
                cumulative_in[k], 1e-3)
        << (k + 1) * 10 << " min";
  }
  const std::vector<double> blocks_m = alternating_block_depths_m(denver_depth_m, 12, 600.0, 0.5);
  EXPECT_NEAR(sum(blocks_m) / kMetresPerMm, 41.64, 0.005);
  // The k largest blocks of the storm hold the k-block cumulative depth of the book's table.
  std::vector<double> largest = blocks_m;
  std::sort(largest.begin(), largest.end(), std::greater<>());
  double held_m = 0.0;
  for (std::size_t k = 0; k < cumulative_in.size(); ++k) {
    held_m += largest[k];
    EXPECT_NEAR(held_m / kMetresPerInch, cumulative_in[k], 1e-3) << k + 1 << " largest blocks";
  }
}

TEST(Storm, AlternatingBlockCentralBlocksNestTheIdfDepths) {
  // The central k blocks (the peak, then alternately right and left) hold D(k dt).
  const std::vector<double> blocks_m = alternating_block_depths_m(denver_depth_m, 12, 600.0, 0.5);
  int left = 5;
  int right = 5;
  double held_m = blocks_m[5];
  EXPECT_NEAR(held_m, denver_depth_m(600.0), 1e-12);
  for (int k = 2; k <= 11; ++k) {
    held_m += k % 2 == 0 ? blocks_m[static_cast<std::size_t>(++right)]
                         : blocks_m[static_cast<std::size_t>(--left)];
    EXPECT_NEAR(held_m, denver_depth_m(600.0 * k), 1e-12) << k << " blocks";
  }
}

TEST(Storm, AlternatingBlockFillsOneSideWhenThePeakIsEarly) {
  const std::vector<double> blocks_m = alternating_block_depths_m(denver_depth_m, 6, 600.0, 0.2);
  // Peak in block 2: one block fits on its left, so the 3rd largest goes there and the rest run
  // on to the right in decreasing order.
  EXPECT_EQ(std::max_element(blocks_m.begin(), blocks_m.end()) - blocks_m.begin(), 1);
  EXPECT_GT(blocks_m[2], blocks_m[0]);
  EXPECT_GT(blocks_m[0], blocks_m[3]);
  EXPECT_GT(blocks_m[3], blocks_m[4]);
  EXPECT_GT(blocks_m[4], blocks_m[5]);
}

TEST(Storm, IdfBlockStormHoldsTheIdfDepthAndPeaksAtItsPosition) {
  StormSpec spec;
  spec.kind = StormKind::idf_block;
  spec.duration_s = 7200.0;
  spec.step_s = 600.0;
  spec.idf = kChicagoIdf;
  spec.peak_position = 0.25;
  const std::vector<double> depths = storm_depths_m(spec);
  EXPECT_EQ(sum(depths), idf_depth_m(kChicagoIdf, 7200.0));
  EXPECT_EQ(std::max_element(depths.begin(), depths.end()) - depths.begin(), 2);
  EXPECT_NEAR(depths[2], idf_depth_m(kChicagoIdf, 600.0), 1e-15);
}

TEST(Storm, BlockStormIsConstantAndConservesDepth) {
  StormSpec spec;
  spec.kind = StormKind::block;
  spec.depth_m = 0.0123;
  spec.duration_s = 7.0 * 600.0;
  spec.step_s = 600.0;
  const std::vector<double> depths = storm_depths_m(spec);
  ASSERT_EQ(depths.size(), 7u);
  EXPECT_EQ(sum(depths), 0.0123);
  for (double d : depths) EXPECT_NEAR(d, 0.0123 / 7.0, 1e-16);
}

TEST(Storm, DepthIsConservedExactlyForAwkwardNumbers) {
  StormSpec spec = chicago_spec(97, 60.0);
  spec.peak_position = 0.37;
  for (double depth_m : {0.1, 0.0123456789, 3e-5, 0.987654321}) {
    spec.depth_m = depth_m;
    EXPECT_EQ(sum(storm_depths_m(spec)), depth_m) << depth_m;
  }
}

TEST(Storm, WritesPeriodEndingCsv) {
  StormSpec spec;
  spec.kind = StormKind::block;
  spec.depth_m = 0.003;
  spec.duration_s = 900.0;
  spec.step_s = 300.0;
  spec.start = 1748736000;  // 2025-06-01T00:00Z
  std::ostringstream out;
  write_storm_csv(out, spec, 0);
  EXPECT_EQ(out.str(),
            "time,rain_mm\n"
            "2025-06-01T00:05,1\n"
            "2025-06-01T00:10,1\n"
            "2025-06-01T00:15,1\n");
}

TEST(Storm, WritesLocalTimeAndRoundsOnTheRunningTotal) {
  StormSpec spec;
  spec.kind = StormKind::block;
  spec.depth_m = 0.001;
  spec.duration_s = 180.0;
  spec.step_s = 60.0;
  spec.start = 1748736000;  // 2025-06-01T00:00Z
  std::ostringstream out;
  write_storm_csv(out, spec, 3600);
  EXPECT_EQ(out.str(),
            "time,rain_mm\n"
            "2025-06-01T01:01+01:00,0.333333\n"
            "2025-06-01T01:02+01:00,0.333334\n"
            "2025-06-01T01:03+01:00,0.333333\n");
}

TEST(Storm, ParsesEveryKindName) {
  for (StormKind kind :
       {StormKind::nrcs_i, StormKind::nrcs_ia, StormKind::nrcs_ii, StormKind::nrcs_iii,
        StormKind::chicago, StormKind::idf_block, StormKind::block}) {
    EXPECT_EQ(parse_storm_kind(storm_kind_name(kind)), kind);
  }
  EXPECT_EQ(parse_storm_kind("NRCS-ii"), StormKind::nrcs_ii);
}

TEST(Storm, RejectsAnUnknownKind) {
  EXPECT_EQ(input_error_text([] { parse_storm_kind("nrcs-IV"); }),
            "--kind: unknown storm kind 'nrcs-IV'; expected one of nrcs-I, nrcs-IA, nrcs-II, "
            "nrcs-III, chicago, idf-block, block");
}

TEST(Storm, ChicagoNeedsAnIdfCurve) {
  StormSpec spec = chicago_spec(60, 60.0);
  spec.idf.reset();
  EXPECT_EQ(input_error_text([&] { storm_depths_m(spec); }),
            "--idf: chicago storms need an IDF curve i = a / (t + b)^c");
}

TEST(Storm, ChicagoNeedsAPositiveB) {
  StormSpec spec = chicago_spec(60, 60.0);
  spec.idf->b_min = 0.0;
  EXPECT_EQ(input_error_text([&] { storm_depths_m(spec); }),
            "--idf: b must be > 0 for a chicago storm, whose peak is a / b^c (got 0 min)");
}

TEST(Storm, RejectsAnIdfExponentAboveOne) {
  StormSpec spec = chicago_spec(60, 60.0);
  spec.idf->c = 1.2;
  EXPECT_EQ(input_error_text([&] { storm_depths_m(spec); }),
            "--idf: c must be in [0, 1] (got 1.2)");
}

TEST(Storm, RejectsAPeakPositionOutsideTheStorm) {
  StormSpec spec = chicago_spec(60, 60.0);
  spec.peak_position = 1.5;
  EXPECT_EQ(input_error_text([&] { storm_depths_m(spec); }), "--peak: must be in [0, 1] (got 1.5)");
}

TEST(Storm, RejectsAStepOfFractionalSeconds) {
  StormSpec spec = chicago_spec(60, 2.5);
  EXPECT_EQ(input_error_text([&] { storm_depths_m(spec); }),
            "--step: must be a whole number of seconds (got 2.5 s)");
}

TEST(Storm, RejectsADurationThatIsNotAWholeNumberOfSteps) {
  StormSpec spec = chicago_spec(61, 120.0);
  EXPECT_EQ(input_error_text([&] { storm_depths_m(spec); }),
            "--duration: must be a whole number of steps (got 3660 s in steps of 120 s)");
}

TEST(Storm, RejectsANonPositiveDuration) {
  StormSpec spec = chicago_spec(0, 60.0);
  EXPECT_EQ(input_error_text([&] { storm_depths_m(spec); }), "--duration: must be > 0 (got 0 s)");
}

TEST(Storm, RejectsANegativeDepth) {
  StormSpec spec = nrcs_spec(StormKind::nrcs_i, -0.005);
  EXPECT_EQ(input_error_text([&] { storm_depths_m(spec); }), "--depth: must be >= 0 (got -5 mm)");
}

TEST(Storm, BlockNeedsADepthOrAnIdfCurve) {
  StormSpec spec;
  spec.kind = StormKind::block;
  spec.duration_s = 3600.0;
  spec.step_s = 60.0;
  EXPECT_EQ(input_error_text([&] { storm_depths_m(spec); }),
            "--depth: give a depth > 0 or an IDF curve to take it from");
}

}  // namespace
}  // namespace gutterwatt::storm_test
