#pragma once
/// Shared physical constants and unit conversions. Everything inside gutterwatt is SI; input and
/// output in other units pass through these named factors once, at the edges.

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
inline constexpr double kSecondsPerHour = 3600.0;
inline constexpr double kSecondsPerDay = 86400.0;
inline constexpr double kZeroCelsius_K = 273.15;

}  // namespace gutterwatt
