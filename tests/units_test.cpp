#include "gutterwatt/units.hpp"

#include <gtest/gtest.h>

namespace gutterwatt::units_test {
namespace {

// The exact factors of NIST Handbook 44, Appendix C (1959 yard and pound agreement):
// 1 in = 25.4 mm, 1 ft = 0.3048 m, 1 US gal = 231 in^3 = 3.785411784 L.
TEST(Units, InchAndFootAreTheExactInternationalValues) {
  EXPECT_EQ(kMillimetresPerInch, 25.4);
  EXPECT_EQ(kMetresPerInch, 0.0254);
  EXPECT_EQ(kMetresPerFoot, 0.3048);
  EXPECT_DOUBLE_EQ(kMetresPerFoot, 12.0 * kMetresPerInch);
}

TEST(Units, SquareFootIsTheFootSquared) {
  // 0.3048^2 = 0.09290304 m^2 exactly (REFERENCES.md section 11).
  EXPECT_EQ(kSquareMetresPerSquareFoot, 0.09290304);
  EXPECT_NEAR(kSquareMetresPerSquareFoot, kMetresPerFoot * kMetresPerFoot, 1e-17);
}

TEST(Units, UsGallonIs231CubicInches) {
  EXPECT_EQ(kLitresPerUsGallon, 3.785411784);
  // 231 in^3 with 1 in = 0.254 dm: 231 * 0.254^3 = 3.785411784 dm^3 (NIST Handbook 44).
  EXPECT_NEAR(231.0 * 0.254 * 0.254 * 0.254, kLitresPerUsGallon, 1e-15);
}

TEST(Units, FahrenheitToCelsius) {
  // t_C = (t_F - 32) * 5 / 9: 32 F = 0 C, 212 F = 100 C, 50 F = 10 C (definition).
  const UnitTwin* t = si_unit_of("temperature_C");
  ASSERT_NE(t, nullptr);
  EXPECT_EQ(t->us, "F");
  EXPECT_NEAR(32.0 * t->si_per_us + t->si_offset, 0.0, 1e-13);
  EXPECT_NEAR(212.0 * t->si_per_us + t->si_offset, 100.0, 1e-13);
  EXPECT_NEAR(50.0 * t->si_per_us + t->si_offset, 10.0, 1e-13);
}

TEST(Units, WorkedConversionsOfTheReferences) {
  // REFERENCES.md section 11, worked: 600 ft^2 = 55.741824 m^2; 3/4 in = 19.05 mm;
  // 12 ft = 3.6576 m; 0.5 gpm = 1.892705892 L/min.
  EXPECT_NEAR(600.0 * si_unit_of("area_m2")->si_per_us, 55.741824, 1e-12);
  EXPECT_NEAR(0.75 * si_unit_of("diameter_mm")->si_per_us, 19.05, 1e-12);
  EXPECT_NEAR(12.0 * si_unit_of("drop_m")->si_per_us, 3.6576, 1e-12);
  EXPECT_NEAR(0.5 * si_unit_of("priming_flow_L_per_min")->si_per_us, 1.892705892, 1e-12);
  // 1 gpm = 3.785411784 / 60 L/s.
  EXPECT_NEAR(si_unit_of("peak_flow_L_per_s")->si_per_us, 3.785411784 / 60.0, 1e-15);
}

TEST(Units, EachNameHasAtMostOneTwin) {
  EXPECT_EQ(si_unit_of("rim_mm")->us, "in");
  EXPECT_EQ(si_unit_of("length_m")->us, "ft");
  EXPECT_EQ(si_unit_of("area_m2")->us, "ft2");
  EXPECT_EQ(si_unit_of("volume_L")->us, "gal");
  EXPECT_EQ(si_unit_of("drying_mm_per_day")->us, "in_per_day");
  EXPECT_EQ(si_unit_of("power_W"), nullptr);
  EXPECT_EQ(si_unit_of("mm"), nullptr);
}

TEST(Units, OutputColumnsTakeTheirUsTwinNames) {
  EXPECT_EQ(column_name(UnitSystem::us, "rain_mm"), "rain_in");
  EXPECT_EQ(column_name(UnitSystem::us, "reservoir_level_mm"), "reservoir_level_in");
  EXPECT_EQ(column_name(UnitSystem::us, "nozzle_L"), "nozzle_gal");
  EXPECT_EQ(column_name(UnitSystem::us, "head_m"), "head_ft");
  EXPECT_EQ(column_name(UnitSystem::us, "peak_flow_L_per_s"), "peak_flow_gpm");
  EXPECT_EQ(column_name(UnitSystem::us, "jet_velocity_m_per_s"), "jet_velocity_ft_per_s");
  EXPECT_EQ(column_name(UnitSystem::us, "energy_Wh"), "energy_Wh");
  EXPECT_EQ(column_name(UnitSystem::us, "power_W"), "power_W");
  EXPECT_EQ(column_name(UnitSystem::si, "rain_mm"), "rain_mm");
  EXPECT_EQ(unit_label("L_per_min"), "L/min");
  EXPECT_EQ(unit_label(in_units(UnitSystem::us, 0.0, "mm_per_h").unit), "in/h");
  EXPECT_EQ(unit_in(UnitSystem::us, "mm_per_h"), "in/h");
  EXPECT_EQ(unit_in(UnitSystem::us, "L_per_s"), "gpm");
  EXPECT_EQ(unit_in(UnitSystem::si, "L_per_s"), "L/s");
  EXPECT_EQ(unit_in(UnitSystem::us, "Wh"), "Wh");
}

TEST(Units, OutputValuesGoByTheExactFactors) {
  // NIST Handbook 44, Appendix C: 1 in = 25.4 mm, 1 ft = 0.3048 m, 1 US gal = 3.785411784 L.
  EXPECT_NEAR(column_value(UnitSystem::us, "rain_mm", 25.4), 1.0, 1e-15);
  EXPECT_NEAR(column_value(UnitSystem::us, "head_m", 3.6576), 12.0, 1e-13);
  EXPECT_NEAR(column_value(UnitSystem::us, "nozzle_L", 3.785411784), 1.0, 1e-15);
  EXPECT_NEAR(column_value(UnitSystem::us, "peak_flow_L_per_s", 3.785411784 / 60.0), 1.0, 1e-15);
  EXPECT_NEAR(in_units(UnitSystem::us, 10.0, "C").value, 50.0, 1e-12);  // 10 C = 50 F
  EXPECT_EQ(in_units(UnitSystem::us, 7.5, "Wh").value, 7.5);
  EXPECT_EQ(column_value(UnitSystem::si, "rain_mm", 25.4), 25.4);
  // Back to SI, as the report reads a US file.
  EXPECT_NEAR(column_si_value(UnitSystem::us, "volume_L", 2.0), 7.570823568, 1e-12);
}

TEST(Units, UsColumnsKeepAtLeastTheSiResolution) {
  // 0.001 mm is 0.00004 in: two more decimals; 0.001 L is 0.00026 gal: one more; a foot is
  // longer than a metre by less than ten: as many as in metres.
  EXPECT_EQ(column_decimals(UnitSystem::us, "rain_mm", 3), 5);
  EXPECT_EQ(column_decimals(UnitSystem::us, "nozzle_L", 3), 4);
  EXPECT_EQ(column_decimals(UnitSystem::us, "head_m", 4), 4);
  EXPECT_EQ(column_decimals(UnitSystem::us, "power_W", 4), 4);
  EXPECT_EQ(column_decimals(UnitSystem::si, "rain_mm", 3), 3);
}

}  // namespace
}  // namespace gutterwatt::units_test
