#pragma once
/// Shared physical constants and unit conversions. Everything inside gutterwatt is SI; input and
/// output in other units pass through these named factors once, at the edges.

#include <string_view>

namespace gutterwatt {

/// Standard gravity (exact): 3rd CGPM (1901); ISO 80000-3.
inline constexpr double kGravity_m_per_s2 = 9.80665;
/// Standard atmosphere (exact): ISO 2533.
inline constexpr double kStandardAtmosphere_Pa = 101325.0;
inline constexpr double kPi = 3.14159265358979323846;

inline constexpr double kMetresPerMm = 1e-3;
/// International inch (exact): 1959 yard and pound agreement.
inline constexpr double kMetresPerInch = 0.0254;
inline constexpr double kCubicMetresPerLitre = 1e-3;
/// US liquid gallon, 231 cubic inches (exact): NIST Handbook 44, appendix C.
inline constexpr double kLitresPerUsGallon = 3.785411784;
inline constexpr double kJoulesPerWh = 3600.0;
inline constexpr double kSecondsPerMinute = 60.0;
/// One litre per minute in m3/s.
inline constexpr double kLitrePerMinute_m3_per_s = kCubicMetresPerLitre / kSecondsPerMinute;
inline constexpr double kSecondsPerHour = 3600.0;
inline constexpr double kSecondsPerDay = 86400.0;
inline constexpr double kZeroCelsius_K = 273.15;

/// Millimetres in an inch (exact): 1959 yard and pound agreement; NIST Handbook 44, Appendix C.
inline constexpr double kMillimetresPerInch = 25.4;
/// International foot (exact): 1959 yard and pound agreement; NIST Handbook 44, Appendix C.
inline constexpr double kMetresPerFoot = 0.3048;
/// Square foot (exact): 0.3048^2 m^2.
inline constexpr double kSquareMetresPerSquareFoot = 0.09290304;
/// Degree Fahrenheit: t_C = (t_F - 32) * 5 / 9 (definition).
inline constexpr double kCelsiusPerFahrenheit = 5.0 / 9.0;
inline constexpr double kFahrenheitAtZeroCelsius = 32.0;

/// The system of units of tables, CSV columns and the report (summary.json is SI always).
enum class UnitSystem { si, us };

/// An SI unit in key and column names and its US customary twin: a name ending in `_<si>` has a
/// twin ending in `_<us>`, and x_si = x_us * si_per_us + si_offset.
struct UnitTwin {
  std::string_view si;
  std::string_view us;
  double si_per_us;
  double si_offset = 0.0;
};

/// Every unit with a customary twin, longest SI names first so that a name matches one at most.
inline constexpr UnitTwin kUnitTwins[] = {
    {"L_per_min", "gpm", kLitresPerUsGallon},
    {"L_per_s", "gpm", kLitresPerUsGallon / kSecondsPerMinute},
    {"mm_per_day", "in_per_day", kMillimetresPerInch},
    {"mm_per_h", "in_per_h", kMillimetresPerInch},
    {"m2", "ft2", kSquareMetresPerSquareFoot},
    {"mm", "in", kMillimetresPerInch},
    {"m", "ft", kMetresPerFoot},
    {"L", "gal", kLitresPerUsGallon},
    {"C", "F", kCelsiusPerFahrenheit, -kFahrenheitAtZeroCelsius* kCelsiusPerFahrenheit},
};

/// The twin whose SI unit ends `name` (after an underscore), or nullptr.
inline const UnitTwin* si_unit_of(std::string_view name) {
  for (const UnitTwin& t : kUnitTwins) {
    if (name.size() > t.si.size() && name.ends_with(t.si) &&
        name[name.size() - t.si.size() - 1] == '_') {
      return &t;
    }
  }
  return nullptr;
}

}  // namespace gutterwatt
