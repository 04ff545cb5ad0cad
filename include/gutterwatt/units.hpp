#pragma once
/// Shared physical constants and unit conversions. Everything inside gutterwatt is SI; input and
/// output in other units pass through these named factors once, at the edges.

#include <cmath>
#include <optional>
#include <string>
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
inline constexpr double kLitresPerCubicMetre = 1e3;
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
    {"m_per_s", "ft_per_s", kMetresPerFoot},
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

/// `si` or `us`.
inline std::string_view unit_system_name(UnitSystem units) {
  return units == UnitSystem::us ? "us" : "si";
}

/// The system named `si` or `us`, or nullopt.
inline std::optional<UnitSystem> parse_unit_system(std::string_view name) {
  if (name == "si") return UnitSystem::si;
  if (name == "us") return UnitSystem::us;
  return std::nullopt;
}

/// The twin whose SI unit is `unit` itself (`mm`, `L_per_min`), or nullptr.
inline const UnitTwin* twin_of_unit(std::string_view unit) {
  for (const UnitTwin& t : kUnitTwins) {
    if (t.si == unit) return &t;
  }
  return nullptr;
}

/// A value in a unit, as a table shows it.
struct InUnits {
  double value;
  std::string_view unit;
};

/// `in_si` in `si_unit` (`mm`, `L`, `Wh`), shown in `units`: the US twin of a unit that has
/// one (x_us = (x_si - si_offset) / si_per_us), else the value as it is.
inline InUnits in_units(UnitSystem units, double in_si, std::string_view si_unit) {
  const UnitTwin* t = units == UnitSystem::us ? twin_of_unit(si_unit) : nullptr;
  if (t == nullptr) return {in_si, si_unit};
  return {(in_si - t->si_offset) / t->si_per_us, t->us};
}

/// A unit as a person reads it: `L_per_min` -> `L/min`, `in_per_h` -> `in/h`.
inline std::string unit_label(std::string_view unit) {
  std::string out(unit);
  for (std::size_t at = out.find("_per_"); at != std::string::npos; at = out.find("_per_")) {
    out.replace(at, 5, "/");
  }
  return out;
}

/// The label of `si_unit` (`mm`, `L`, `L_per_s`) in `units`: `mm` or `in`, `L/s` or `gpm`.
inline std::string unit_in(UnitSystem units, std::string_view si_unit) {
  return unit_label(in_units(units, 0.0, si_unit).unit);
}

/// A column named with its SI unit (`rain_mm`, `peak_flow_L_per_s`) as `units` names it
/// (`rain_in`, `peak_flow_gpm`); a name without a twin unit (`power_W`) stays.
inline std::string column_name(UnitSystem units, std::string_view si_name) {
  const UnitTwin* t = units == UnitSystem::us ? si_unit_of(si_name) : nullptr;
  if (t == nullptr) return std::string(si_name);
  return std::string(si_name.substr(0, si_name.size() - t->si.size())) + std::string(t->us);
}

/// The value of column `si_name` given in SI, in the column's unit in `units`.
inline double column_value(UnitSystem units, std::string_view si_name, double in_si) {
  const UnitTwin* t = units == UnitSystem::us ? si_unit_of(si_name) : nullptr;
  return t == nullptr ? in_si : (in_si - t->si_offset) / t->si_per_us;
}

/// A value read from column `si_name` written in `units`, back in SI.
inline double column_si_value(UnitSystem units, std::string_view si_name, double value) {
  const UnitTwin* t = units == UnitSystem::us ? si_unit_of(si_name) : nullptr;
  return t == nullptr ? value : value * t->si_per_us + t->si_offset;
}

/// Decimals for column `si_name` in `units` that keep at least the resolution of `si_decimals`
/// in SI: one more for each power of ten the US unit is larger (in: 2 more than mm, gal: 1 more
/// than L, ft: as m).
inline int column_decimals(UnitSystem units, std::string_view si_name, int si_decimals) {
  const UnitTwin* t = units == UnitSystem::us ? si_unit_of(si_name) : nullptr;
  if (t == nullptr || t->si_per_us <= 1.0) return si_decimals;
  return si_decimals + static_cast<int>(std::ceil(std::log10(t->si_per_us)));
}

}  // namespace gutterwatt
