// Text on the report page (see report_format.hpp).

#include "report_format.hpp"

#include <array>
#include <cmath>
#include <cstdio>

#include "detail.hpp"
#include "gutterwatt/calendar.hpp"

namespace gutterwatt::detail {

std::string escape(std::string_view s) {
  std::string out;
  out.reserve(s.size());
  for (const char c : s) {
    switch (c) {
      case '&':
        out += "&amp;";
        break;
      case '<':
        out += "&lt;";
        break;
      case '>':
        out += "&gt;";
        break;
      case '"':
        out += "&quot;";
        break;
      case '\'':
        out += "&#39;";
        break;
      default:
        out += c;
    }
  }
  return out;
}

std::string grouped(double v, int decimals) {
  std::string out = fixed(v, decimals);
  const std::size_t start = out[0] == '-' ? 1 : 0;
  std::size_t point = out.find('.');
  if (point == std::string::npos) point = out.size();
  for (std::size_t i = point; i > start + 3; i -= 3) out.insert(i - 3, "\xE2\x80\xAF");
  return out;
}

std::string pretty(double v, bool html) {
  if (std::isnan(v)) return html ? "&ndash;" : "-";
  const double a = std::fabs(v);
  if (a == 0.0) return "0";
  if (a >= 1000.0 || (a < 1e15 && v == std::round(v))) return grouped(v, 0);
  if (a >= 100.0) return fixed(v, 0);
  if (a >= 10.0) return fixed(v, 1);
  if (a >= 1.0) return fixed(v, 2);
  if (a >= 0.001) return fixed(v, 2 - static_cast<int>(std::floor(std::log10(a))));
  const int exponent = static_cast<int>(std::floor(std::log10(a)));
  const std::string mantissa = fixed(v / std::pow(10.0, exponent), 1);
  if (!html) return mantissa + "e" + std::to_string(exponent);
  return mantissa + "&times;10<sup>" + std::to_string(exponent) + "</sup>";
}

std::string px(double v) { return fixed(v, 1); }

std::string percent_of(double part, double whole) {
  if (!(whole > 0.0)) return "&ndash;";
  return pretty(100.0 * part / whole) + kNbsp + "%";
}

std::string duration_text(double seconds) {
  const auto s = static_cast<std::int64_t>(std::llround(seconds));
  if (s > 0 && s % kDay_s == 0) return std::to_string(s / kDay_s) + std::string(kNbsp) + "d";
  if (s > 0 && s % kHour_s == 0) return std::to_string(s / kHour_s) + std::string(kNbsp) + "h";
  if (seconds >= 2.0 * kHour_s) return pretty(seconds / kHour_s) + std::string(kNbsp) + "h";
  if (s > 0 && s % 60 == 0) return std::to_string(s / 60) + std::string(kNbsp) + "min";
  if (seconds >= 120.0) return pretty(seconds / 60.0) + std::string(kNbsp) + "min";
  return pretty(seconds) + std::string(kNbsp) + "s";
}

std::string_view month_name(unsigned month) {
  static constexpr std::array<const char*, 12> kMonthNames{
      "Jan", "Feb", "Mar", "Apr", "May", "Jun", "Jul", "Aug", "Sep", "Oct", "Nov", "Dec"};
  return kMonthNames[month - 1];
}

std::string day_label(std::int64_t t) {
  const CivilTime c = to_civil(t);
  return std::to_string(c.day) + " " + std::string(month_name(c.month));
}

std::string date_label(std::int64_t t) {
  return day_label(t) + " " + std::to_string(to_civil(t).year);
}

std::string clock_label(std::int64_t t) {
  const CivilTime c = to_civil(t);
  char buf[8];
  std::snprintf(buf, sizeof buf, "%02d:%02d", c.hour, c.minute);
  return buf;
}

std::string stamp_label(std::int64_t t) { return date_label(t) + " " + clock_label(t); }

std::string number_label(double v) {
  if (std::fabs(v - std::round(v)) < 1e-9 && std::fabs(v) < 1e15) return fixed(v, 0);
  return pretty(v, false);
}

std::vector<std::string> shared_decimal_labels(const std::vector<double>& values) {
  int decimals = 0;
  for (; decimals < 6; ++decimals) {
    const double scale = std::pow(10.0, decimals);
    bool exact = true;
    for (double v : values) exact = exact && std::fabs(v * scale - std::round(v * scale)) < 1e-6;
    if (exact) break;
  }
  std::vector<std::string> labels;
  for (double v : values) labels.push_back(decimals < 6 ? fixed(v, decimals) : number_label(v));
  return labels;
}

}  // namespace gutterwatt::detail
