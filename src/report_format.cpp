// Text on the report page (see report_format.hpp).

#include "report_format.hpp"

#include <algorithm>
#include <array>
#include <cctype>
#include <cmath>
#include <cstdio>

#include "detail.hpp"
#include "gutterwatt/calendar.hpp"
#include "gutterwatt/units.hpp"

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

namespace {

/// `text` (a fixed-point number) with the digits before the point grouped in threes.
std::string group_thousands(std::string text) {
  const std::size_t start = text[0] == '-' ? 1 : 0;
  std::size_t point = text.find('.');
  if (point == std::string::npos) point = text.size();
  for (std::size_t i = point; i > start + 3; i -= 3) text.insert(i - 3, "\xE2\x80\xAF");
  return text;
}

}  // namespace

std::string grouped(double v, int decimals) { return group_thousands(fixed(v, decimals)); }

std::string pretty(double v, Medium medium) {
  constexpr int kFigures = 3;
  if (std::isnan(v)) return medium == Medium::html ? "&ndash;" : "-";
  if (std::isinf(v)) return v > 0.0 ? "inf" : "-inf";
  const double a = std::fabs(v);
  if (a == 0.0) return "0";
  int exponent = static_cast<int>(std::floor(std::log10(a)));
  if (a < 0.001) {
    // Rounding the mantissa can carry it to 10 (9.996e-4 -> 1e-3): one more power of ten then.
    if (std::fabs(std::round(v / std::pow(10.0, exponent - kFigures + 1))) >=
        std::pow(10.0, kFigures)) {
      ++exponent;
    }
    const std::string mantissa = fixed_trimmed(v / std::pow(10.0, exponent), kFigures - 1);
    if (medium != Medium::html) return mantissa + "e" + std::to_string(exponent);
    return mantissa + "&times;10<sup>" + std::to_string(exponent) + "</sup>";
  }
  const std::string text = fixed_trimmed(v, std::max(0, kFigures - 1 - exponent));
  return medium == Medium::terminal ? text : group_thousands(text);
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

std::string period_label(std::int64_t start, std::int64_t end) {
  const std::string dash = "\xE2\x80\x93";  // an en dash, as in 2012–2015
  const std::int64_t last = std::max(start, end - 1);
  const CivilTime a = to_civil(start);
  const CivilTime b = to_civil(last);
  const std::string ya = std::to_string(a.year);
  const std::string yb = std::to_string(b.year);
  const bool whole_months = a.day == 1 && to_civil(last + kDay_s).day == 1;
  if (whole_months && a.month == 1 && b.month == 12) {
    return a.year == b.year ? ya : ya + dash + yb;
  }
  if (b.year > a.year + 1 || (b.year > a.year && end - start > 366 * kDay_s)) {
    return ya + dash + yb;
  }
  if (whole_months) {
    const std::string ma(month_name(static_cast<unsigned>(a.month)));
    const std::string mb(month_name(static_cast<unsigned>(b.month)));
    if (a.year != b.year) return ma + " " + ya + " " + dash + " " + mb + " " + yb;
    return (a.month == b.month ? ma : ma + dash + mb) + " " + ya;
  }
  if (a.year != b.year) return date_label(start) + " " + dash + " " + date_label(last);
  if (a.month != b.month) return day_label(start) + " " + dash + " " + date_label(last);
  if (a.day != b.day) return std::to_string(a.day) + dash + date_label(last);
  return date_label(start);
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
  for (double v : values)
    labels.push_back(decimals < 6 ? fixed(v, decimals) : pretty(v, Medium::svg));
  return labels;
}

}  // namespace gutterwatt::detail

namespace gutterwatt::detail {

std::string key_label(std::string_view key) {
  std::string_view section;
  std::string_view name = key;
  if (const std::size_t dot = key.rfind('.'); dot != std::string_view::npos) {
    section = key.substr(0, dot);
    name = key.substr(dot + 1);
  }
  // A percentile of a realization spread ends the name, after its unit.
  std::string qualifier;
  for (const auto& [suffix, words] : {std::pair<std::string_view, std::string_view>{"_p10", "P10"},
                                      {"_p50", "median"},
                                      {"_p90", "P90"}}) {
    if (name.ends_with(suffix)) {
      name.remove_suffix(suffix.size());
      qualifier = " (" + std::string(words) + ")";
    }
  }
  // The unit a name ends with: the twins' names first (longest first there), then the rest.
  std::string_view unit;
  const auto ends_with_unit = [&](std::string_view u) {
    if (name.size() > u.size() && name.ends_with(u) && name[name.size() - u.size() - 1] == '_') {
      unit = u;
      return true;
    }
    return false;
  };
  bool found = false;
  for (const UnitTwin& t : kUnitTwins) {
    if (ends_with_unit(t.si) || ends_with_unit(t.us)) {
      found = true;
      break;
    }
  }
  if (!found) {
    for (const std::string_view u : {"Wh", "W", "V", "Ah", "h", "s", "min", "rpm"}) {
      if (ends_with_unit(u)) break;
    }
  }
  if (!unit.empty()) name.remove_suffix(unit.size() + 1);
  // Words, with the abbreviations spelt out.
  static constexpr std::array<std::pair<std::string_view, std::string_view>, 4> kWords{{
      {"soc", "state of charge"},
      {"cd", "discharge coefficient"},
      {"k", "K"},
      {"rtol", "relative tolerance"},
  }};
  std::string words;
  std::size_t from = 0;
  while (from <= name.size()) {
    const std::size_t to = std::min(name.find('_', from), name.size());
    std::string_view word = name.substr(from, to - from);
    for (const auto& [abbreviation, spelt] : kWords) {
      if (word == abbreviation) word = spelt;
    }
    if (!word.empty()) words += (words.empty() ? "" : " ") + std::string(word);
    from = to + 1;
  }
  std::string lead(section);
  std::replace(lead.begin(), lead.end(), '_', ' ');
  std::replace(lead.begin(), lead.end(), '.', ' ');
  std::string label = lead.empty() ? words : lead + ": " + words;
  if (!label.empty())
    label[0] = static_cast<char>(std::toupper(static_cast<unsigned char>(label[0])));
  if (!unit.empty()) label += ", " + unit_label(unit);
  return label + qualifier;
}

}  // namespace gutterwatt::detail
