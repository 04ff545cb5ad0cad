#include "gutterwatt/siphon.hpp"

#include <gtest/gtest.h>

#include <cmath>
#include <initializer_list>

#include "gutterwatt/hydraulics.hpp"
#include "gutterwatt/units.hpp"

namespace gutterwatt::siphon_test {
namespace {

// An invented bell siphon: lip 50 mm, bell rim 8 mm, 19 mm standpipe, primes at 3 L/min.
ReleaseConfig bell() {
  ReleaseConfig c;
  c.kind = ReleaseKind::bell;
  c.trigger_level_m = 0.050;
  c.break_level_m = 0.008;
  c.standpipe_diameter_m = 0.019;
  c.priming_flow_m3_per_s = 3e-3 / 60.0;
  c.lip_coefficient = 1.77;
  return c;
}

constexpr double kFullFlow = 1.5e-4;  // m3/s, what the conveyance carries (invented)

TEST(Siphon, LipIsACircularWeir) {
  const BellSiphon s(bell());
  // Weir Q = C L h^1.5 over the lip circumference L = pi d (ISO 1438 thin-plate form,
  // REFERENCES.md section 6, lumped C 1.77), by hand: 1.77 x pi x 0.019 x 0.004^1.5
  // = 2.672802e-5 m3/s (4 mm, below the drowned mouth's 7.25 mm).
  EXPECT_NEAR(s.lip_flow_m3_per_s(0.054), 2.672802e-5, 1e-11);
  EXPECT_EQ(s.lip_flow_m3_per_s(0.050), 0.0);
  EXPECT_EQ(s.lip_flow_m3_per_s(0.02), 0.0);
}

// Hand computation for the invented standpipe (C_w 1.77 m^0.5/s, C_d 0.61, d 19 mm, g 9.80665):
//   transition  h_t = C_d d sqrt(2 g) / (4 C_w) = 0.61 * 0.019 * 4.428690 / 7.08 = 7.249791 mm;
//   weir at 4 mm:     1.77 * pi * 0.019 * 0.004^1.5             = 2.672802e-5 m3/s;
//   orifice at 4 mm:  0.61 * 2.835287e-4 * sqrt(2 g 0.004)       = 4.844314e-5 m3/s (not taken);
//   orifice at 20 mm: 0.61 * 2.835287e-4 * 0.626309              = 1.083221e-4 m3/s;
//   weir at 20 mm:    1.77 * pi * 0.019 * 0.02^1.5               = 2.988283e-4 m3/s (not taken);
//   both at h_t:                                                  = 6.521763e-5 m3/s.
TEST(Siphon, StandpipeTakesTheSmallerOfWeirAndOrificeFlow) {
  EXPECT_NEAR(standpipe_transition_head_m(1.77, 0.61, 0.019), 7.249791e-3, 1e-9);
  EXPECT_NEAR(standpipe_inflow_m3_per_s(1.77, 0.61, 0.019, 0.004), 2.672802e-5, 1e-11);
  EXPECT_NEAR(standpipe_inflow_m3_per_s(1.77, 0.61, 0.019, 0.020), 1.083221e-4, 1e-10);
  EXPECT_EQ(standpipe_inflow_m3_per_s(1.77, 0.61, 0.019, 0.0), 0.0);
  EXPECT_EQ(standpipe_inflow_m3_per_s(1.77, 0.61, 0.019, -0.01), 0.0);
}

TEST(Siphon, WeirAndOrificeMeetContinuously) {
  const double h_t = 7.249791e-3;
  const double below = standpipe_inflow_m3_per_s(1.77, 0.61, 0.019, h_t - 1e-9);
  const double above = standpipe_inflow_m3_per_s(1.77, 0.61, 0.019, h_t + 1e-9);
  EXPECT_NEAR(below, 6.521763e-5, 1e-10);
  EXPECT_NEAR(above, 6.521763e-5, 1e-10);
  EXPECT_LT(above - below, 1e-10);  // the slope, about 0.013 m2/s, times 2e-9 m
}

// Inverse at 6 L/min = 1e-4 m3/s, above the transition flow: weir head (1e-4 / 0.105652)^(2/3)
// = 9.640114 mm, orifice head (1e-4 / (0.61 * 2.835287e-4))^2 / (2 g) = 17.044941 mm; the
// orifice controls, so the larger head is the answer.
TEST(Siphon, HeadForAFlowAboveTheTransitionIsTheOrificeHead) {
  EXPECT_NEAR(standpipe_head_for_flow_m(1.77, 0.61, 0.019, 1e-4), 17.044941e-3, 1e-9);
  EXPECT_NEAR(standpipe_head_for_flow_m(1.77, 0.61, 0.019, 2.672802e-5), 0.004, 1e-9);
  EXPECT_EQ(standpipe_head_for_flow_m(1.77, 0.61, 0.019, 0.0), 0.0);
}

TEST(Siphon, PrimingAboveTheTransitionWaitsForTheDrownedMouth) {
  ReleaseConfig c = bell();
  c.priming_flow_m3_per_s = 1e-4;
  const BellSiphon s(c);
  EXPECT_NEAR(s.priming_level_m(), 0.050 + 17.044941e-3, 1e-9);
  EXPECT_NEAR(s.lip_flow_m3_per_s(0.070), 1.083221e-4, 1e-10);
}

TEST(Siphon, PrimingLevelIsLipPlusWeirHeadOfThePrimingFlow) {
  const BellSiphon s(bell());
  // Inverse of the weir law (ISO 1438 form), by hand: h = (Q / (C pi d))^(2/3)
  // = (5e-5 / (1.77 x pi x 0.019))^(2/3) = 6.072891 mm above the 50 mm lip.
  EXPECT_NEAR(s.priming_level_m(), 0.056072891, 1e-9);
  EXPECT_NEAR(s.lip_flow_m3_per_s(s.priming_level_m()), 5e-5, 1e-17);
}

TEST(Siphon, StartsIdleBelowTheLipAndDribblingAboveIt) {
  const BellSiphon s(bell());
  EXPECT_EQ(s.initial_state(0.0), ReleaseState::idle);
  EXPECT_EQ(s.initial_state(0.050), ReleaseState::idle);
  EXPECT_EQ(s.initial_state(0.052), ReleaseState::dribble);
}

TEST(Siphon, IdlePassesNoWater) {
  const BellSiphon s(bell());
  EXPECT_EQ(s.outflow_m3_per_s(ReleaseState::idle, 0.055, kFullFlow), 0.0);
}

TEST(Siphon, DribbleIsTheLipFlowCappedByTheConveyance) {
  const BellSiphon s(bell());
  // 4 mm over the lip: 2.672802e-5 m3/s by hand (LipIsACircularWeir).
  EXPECT_NEAR(s.outflow_m3_per_s(ReleaseState::dribble, 0.054, kFullFlow), 2.672802e-5, 1e-11);
  EXPECT_EQ(s.outflow_m3_per_s(ReleaseState::dribble, 0.054, 1e-6), 1e-6);
  EXPECT_EQ(s.outflow_m3_per_s(ReleaseState::dribble, 0.049, kFullFlow), 0.0);
}

TEST(Siphon, RunningPassesTheFullFlow) {
  const BellSiphon s(bell());
  EXPECT_EQ(s.outflow_m3_per_s(ReleaseState::running, 0.03, kFullFlow), kFullFlow);
  EXPECT_TRUE(s.is_running(ReleaseState::running));
  EXPECT_FALSE(s.is_running(ReleaseState::dribble));
  EXPECT_FALSE(s.is_running(ReleaseState::idle));
}

TEST(Siphon, IdleStartsDribblingAboveTheHoldHead) {
  const BellSiphon s(bell());
  Guard g[Release::kMaxGuards];
  ASSERT_EQ(s.guards(ReleaseState::idle, 0.050, g), 1);
  EXPECT_GT(g[0].value, 0.0);
  EXPECT_EQ(g[0].next, ReleaseState::dribble);
  s.guards(ReleaseState::idle, 0.050 + 0.99 * kHoldHead_m, g);
  EXPECT_GT(g[0].value, 0.0);
  s.guards(ReleaseState::idle, 0.050 + 1.01 * kHoldHead_m, g);
  EXPECT_LT(g[0].value, 0.0);
}

TEST(Siphon, PrimesOnlyAtThePrimingLevel) {
  const BellSiphon s(bell());
  const double h = s.priming_level_m();
  Guard g[Release::kMaxGuards];
  ASSERT_EQ(s.guards(ReleaseState::dribble, h - 1e-9, g), 2);
  EXPECT_EQ(g[0].next, ReleaseState::running);
  EXPECT_GT(g[0].value, 0.0);
  s.guards(ReleaseState::dribble, h + 1e-9, g);
  EXPECT_LT(g[0].value, 0.0);
  // Well above the lip but below the priming level it does not prime.
  s.guards(ReleaseState::dribble, 0.5 * (0.050 + h), g);
  EXPECT_GT(g[0].value, 0.0);
  EXPECT_GT(g[1].value, 0.0);
}

TEST(Siphon, DribbleStopsAtHalfTheHoldHead) {
  const BellSiphon s(bell());
  Guard g[Release::kMaxGuards];
  s.guards(ReleaseState::dribble, 0.050 + 0.6 * kHoldHead_m, g);
  EXPECT_EQ(g[1].next, ReleaseState::idle);
  EXPECT_GT(g[1].value, 0.0);
  s.guards(ReleaseState::dribble, 0.050 + 0.4 * kHoldHead_m, g);
  EXPECT_LT(g[1].value, 0.0);
}

TEST(Siphon, BreaksAtTheBellRim) {
  const BellSiphon s(bell());
  Guard g[Release::kMaxGuards];
  ASSERT_EQ(s.guards(ReleaseState::running, 0.008 + 1e-9, g), 1);
  EXPECT_EQ(g[0].next, ReleaseState::idle);
  EXPECT_GT(g[0].value, 0.0);
  s.guards(ReleaseState::running, 0.008 - 1e-9, g);
  EXPECT_LT(g[0].value, 0.0);
  // Running on below the lip: the siphon only breaks at the rim.
  s.guards(ReleaseState::running, 0.03, g);
  EXPECT_GT(g[0].value, 0.0);
}

TEST(Siphon, RestsOnlyWhenIdle) {
  const BellSiphon s(bell());
  EXPECT_EQ(s.rest_ceiling_m(ReleaseState::idle), 0.050 + kHoldHead_m);
  EXPECT_LT(s.rest_ceiling_m(ReleaseState::dribble), 0.0);
  EXPECT_LT(s.rest_ceiling_m(ReleaseState::running), 0.0);
}

TEST(Siphon, MakeReleaseBuildsABellForKindBell) {
  const auto r = make_release(bell());
  EXPECT_NE(dynamic_cast<const BellSiphon*>(r.get()), nullptr);
}

TEST(Siphon, NamesEveryReleaseState) {
  EXPECT_EQ(release_state_name(ReleaseState::idle), "idle");
  EXPECT_EQ(release_state_name(ReleaseState::dribble), "dribble");
  EXPECT_EQ(release_state_name(ReleaseState::running), "running");
  EXPECT_EQ(release_state_name(ReleaseState::closed), "closed");
  EXPECT_EQ(release_state_name(ReleaseState::open), "open");
}

}  // namespace
}  // namespace gutterwatt::siphon_test
