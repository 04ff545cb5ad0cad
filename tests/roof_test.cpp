#include "gutterwatt/roof.hpp"

#include <gtest/gtest.h>

#include <cmath>

namespace gutterwatt::roof_test {
namespace {

// An invented 40 m2 roof under 36 mm/h (1e-5 m/s): 4e-4 m3/s of rain on it.
constexpr double kRain_m_per_s = 1e-5;

RoofConfig roof(double coefficient, double loss_m, double lag_s) {
  RoofConfig r;
  r.area_m2 = 40.0;
  r.runoff_coefficient = coefficient;
  r.initial_loss_m = loss_m;
  r.drying_m_per_s = 3e-3 / 86400.0;  // 3 mm a day
  r.lag_s = lag_s;
  return r;
}

const FirstFlushConfig kNoDiverter{};

TEST(RoofSpan, InitialLossFillsFirstThenTheCoefficientTakesItsShare) {
  const RoofSpan span(roof(0.9, 0.5e-3, 0.0), kNoDiverter, kRain_m_per_s, RoofStores{});
  // By hand: 0.5 mm at 0.01 mm/s fill in 50 s; then 0.9 x 4e-4 m3/s runs off for 550 s.
  const RoofFlows f = span.flows(600.0);
  EXPECT_NEAR(f.rain_m3, 0.24, 1e-15);
  EXPECT_NEAR(f.loss_m3, 4e-4 * 50.0 + 0.1 * 4e-4 * 550.0, 1e-15);
  EXPECT_NEAR(f.runoff_m3, 0.9 * 4e-4 * 550.0, 1e-15);
  EXPECT_EQ(span.to_reservoir_m3_per_s(49.0), 0.0);
  EXPECT_NEAR(span.to_reservoir_m3_per_s(51.0), 3.6e-4, 1e-18);
  EXPECT_NEAR(span.stores(20.0).loss_filled_m, 0.2e-3, 1e-18);
  EXPECT_EQ(span.stores(60.0).loss_filled_m, 0.5e-3);
}

TEST(RoofSpan, InitialLossDriesAtItsRateWithoutRain) {
  RoofStores start;
  start.loss_filled_m = 0.4e-3;
  const RoofSpan span(roof(0.9, 0.5e-3, 60.0), kNoDiverter, 0.0, start);
  // By hand: 3 mm a day dry 0.25 mm in 2 h, and the 0.4 mm are gone after 3.2 h.
  EXPECT_NEAR(span.stores(7200.0).loss_filled_m, 0.15e-3, 1e-15);
  EXPECT_EQ(span.stores(4.0 * 3600.0).loss_filled_m, 0.0);
  EXPECT_EQ(span.flows(7200.0).runoff_m3, 0.0);
}

TEST(RoofSpan, LinearReservoirEmptiesExponentially) {
  RoofStores start;
  start.roof_m3 = 6e-3;
  const RoofSpan span(roof(0.9, 0.5e-3, 60.0), kNoDiverter, 0.0, start);
  // S(t) = S0 exp(-t/k) (Chow, Maidment & Mays 1988, section 8.5): after one lag 6 L / e.
  EXPECT_NEAR(span.stores(60.0).roof_m3, 6e-3 / std::exp(1.0), 1e-15);
  EXPECT_NEAR(span.runoff_m3(60.0), 6e-3 * (1.0 - 1.0 / std::exp(1.0)), 1e-15);
  EXPECT_NEAR(span.to_reservoir_m3_per_s(0.0), 1e-4, 1e-18);  // S/k = 6 L / 60 s
}

TEST(RoofSpan, LinearReservoirRisesTowardsInflowTimesLag) {
  const RoofSpan span(roof(1.0, 0.0, 60.0), kNoDiverter, kRain_m_per_s, RoofStores{});
  // From empty under E = 4e-4 m3/s: S(k) = E k (1 - 1/e), runoff E k - S(k) = E k / e.
  EXPECT_NEAR(span.stores(60.0).roof_m3, 0.024 * (1.0 - 1.0 / std::exp(1.0)), 1e-15);
  EXPECT_NEAR(span.runoff_m3(60.0), 0.024 / std::exp(1.0), 1e-15);
  EXPECT_NEAR(span.to_reservoir_m3_per_s(1e6), 4e-4, 1e-15);  // at equilibrium outflow = inflow
}

TEST(RoofSpan, TinyLagIsNoRoutingWithinInflowTimesLag) {
  const RoofSpan none(roof(1.0, 0.0, 0.0), kNoDiverter, kRain_m_per_s, RoofStores{});
  const RoofSpan tiny(roof(1.0, 0.0, 1e-3), kNoDiverter, kRain_m_per_s, RoofStores{});
  // After many lags the store holds E k = 4e-7 m3 and the rest has run off.
  EXPECT_NEAR(none.runoff_m3(60.0), 0.024, 1e-15);
  EXPECT_NEAR(tiny.runoff_m3(60.0), 0.024 - 4e-7, 1e-15);
  EXPECT_NEAR(tiny.to_reservoir_m3_per_s(60.0), 4e-4, 1e-15);
}

TEST(RoofSpan, DiverterTakesTheFirstRunoffUntilFull) {
  FirstFlushConfig flush;
  flush.volume_m3 = 10e-3;
  RoofStores start;
  start.diverted_m3 = 2e-3;
  const RoofSpan span(roof(1.0, 0.0, 0.0), flush, kRain_m_per_s, start);
  // 8 L of room at 4e-4 m3/s fill in 20 s; the reservoir takes the rest.
  EXPECT_EQ(span.to_reservoir_m3_per_s(19.0), 0.0);
  EXPECT_NEAR(span.to_reservoir_m3_per_s(21.0), 4e-4, 1e-18);
  EXPECT_NEAR(span.to_reservoir_m3(60.0), 0.024 - 8e-3, 1e-15);
  EXPECT_NEAR(span.stores(10.0).diverted_m3, 6e-3, 1e-15);
  EXPECT_NEAR(span.stores(60.0).diverted_m3, 10e-3, 1e-15);
  EXPECT_NEAR(span.flows(60.0).diverted_m3, 8e-3, 1e-15);
}

// The law the solver's linear reference takes for the inflow over a step: what the inflow tends
// to and at what rate. Worked by hand for the invented roof: with the loss full, C i A = 0.9 x
// 4e-4 = 3.6e-4 m3/s at 1/60 per second, and the inflow a later time on follows it, E + (q - E)
// e^(-t / k); while the loss fills the roof only drains (toward 0); with no lag, or while the
// diverter takes the runoff, the inflow stays as it is.
TEST(RoofSpan, InflowTrendIsTheLawInForce) {
  RoofStores wet;
  wet.loss_filled_m = 0.5e-3;
  wet.roof_m3 = 6e-3;  // 1e-4 m3/s out at a 60 s lag
  const RoofSpan lagged(roof(0.9, 0.5e-3, 60.0), kNoDiverter, kRain_m_per_s, wet);
  const auto trend = lagged.inflow_trend(10.0);
  EXPECT_NEAR(trend[0], 3.6e-4, 1e-18);
  EXPECT_DOUBLE_EQ(trend[1], 1.0 / 60.0);
  const double q = lagged.to_reservoir_m3_per_s(10.0);
  EXPECT_NEAR(lagged.to_reservoir_m3_per_s(40.0), 3.6e-4 + (q - 3.6e-4) * std::exp(-30.0 / 60.0),
              1e-17);

  const RoofSpan filling(roof(0.9, 0.5e-3, 60.0), kNoDiverter, kRain_m_per_s, RoofStores{});
  EXPECT_EQ(filling.inflow_trend(10.0)[0], 0.0);  // 0.5 mm fills in 50 s
  EXPECT_DOUBLE_EQ(filling.inflow_trend(10.0)[1], 1.0 / 60.0);
  EXPECT_NEAR(filling.inflow_trend(60.0)[0], 3.6e-4, 1e-18);

  const RoofSpan direct(roof(0.9, 0.0, 0.0), kNoDiverter, kRain_m_per_s, RoofStores{});
  EXPECT_NEAR(direct.inflow_trend(5.0)[0], 3.6e-4, 1e-18);
  EXPECT_EQ(direct.inflow_trend(5.0)[1], 0.0);

  FirstFlushConfig diverter;
  diverter.volume_m3 = 0.05;
  const RoofSpan diverting(roof(0.9, 0.0, 60.0), diverter, kRain_m_per_s, RoofStores{});
  EXPECT_EQ(diverting.inflow_trend(30.0)[0], 0.0);  // the diverter still takes it all
  EXPECT_EQ(diverting.inflow_trend(30.0)[1], 0.0);
}

TEST(RoofSpan, WaterBalanceCloses) {
  FirstFlushConfig flush;
  flush.volume_m3 = 10e-3;
  RoofStores start;
  start.loss_filled_m = 0.3e-3;
  start.roof_m3 = 2e-3;
  const RoofSpan span(roof(0.9, 0.5e-3, 45.0), flush, kRain_m_per_s, start);
  for (const double t : {10.0, 30.0, 100.0, 900.0}) {
    const RoofFlows f = span.flows(t);
    const double held = span.stores(t).roof_m3 - start.roof_m3;
    EXPECT_NEAR(f.rain_m3 - f.loss_m3 - held - f.runoff_m3, 0.0, 1e-15) << t;
    EXPECT_NEAR(f.runoff_m3 - f.diverted_m3 - span.to_reservoir_m3(t), 0.0, 1e-15) << t;
  }
}

}  // namespace
}  // namespace gutterwatt::roof_test
