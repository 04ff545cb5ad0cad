#pragma once
// The scenario loader's internal parts shared by its source files (scenario.cpp reads the tree,
// scenario_checks.cpp checks keys against each other, scenario_keys.cpp reads key names,
// scenario_text.cpp the text before the tree): a value with its path and line, the limits a number
// must fall in, the conversion from a customary twin and the keys seen. Internal (not installed,
// not public API).

#include <yaml-cpp/yaml.h>

#include <charconv>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <functional>
#include <map>
#include <optional>
#include <set>
#include <span>
#include <string>
#include <string_view>
#include <utility>
#include <vector>

#include "detail.hpp"
#include "gutterwatt/calendar.hpp"
#include "gutterwatt/error.hpp"
#include "gutterwatt/scenario.hpp"

namespace gutterwatt::detail {

/// The file name in messages about a `--set` override.
inline const std::string kOverrideLabel = "--set";

/// Shortest text that reads back as `x` (40, 62.5, 1e-10).
inline std::string show(double x) {
  char buf[32];
  const auto result = std::to_chars(buf, buf + sizeof buf, x);
  return std::string(buf, result.ptr);
}

/// The interval a number must fall in; each end may be open, closed or absent.
struct Limits {
  std::optional<double> lo;
  std::optional<double> hi;
  bool lo_open = false;
  bool hi_open = false;

  bool contains(double x) const {
    return (!lo || (lo_open ? x > *lo : x >= *lo)) && (!hi || (hi_open ? x < *hi : x <= *hi));
  }

  std::string describe() const {
    if (lo && hi && !lo_open && !hi_open) {
      return "must be between " + show(*lo) + " and " + show(*hi);
    }
    std::string out = "must be";
    if (lo) out += (lo_open ? " > " : " >= ") + show(*lo);
    if (lo && hi) out += " and";
    if (hi) out += (hi_open ? " < " : " <= ") + show(*hi);
    return out;
  }
};

inline constexpr Limits kAny{};
inline constexpr Limits kPositive{0.0, std::nullopt, true, false};
inline constexpr Limits kNonNegative{0.0, std::nullopt, false, false};
inline constexpr Limits kShare{0.0, 1.0, false, false};     // [0, 1]: state of charge
inline constexpr Limits kFraction{0.0, 1.0, true, false};   // (0, 1]: efficiencies and coefficients
inline constexpr Limits kPartShare{0.0, 1.0, false, true};  // [0, 1): a share lost or kept back
constexpr Limits between(double lo, double hi) { return {lo, hi, false, false}; }

/// How a number given in a key's customary twin (`rim_in` for `rim_mm`) becomes a number in the
/// unit of the key it stands for: x * factor + offset. Inches may be written as fractions.
struct Conversion {
  double factor = 1.0;
  double offset = 0.0;
  bool inches = false;
  std::string_view unit;  ///< the unit as given (`in` for `rim_in`); empty: the key's own

  double to_key(double x) const { return x * factor + offset; }
  /// To 12 significant digits, so that limits read as written (32 F, not 31.999999999999996).
  double to_given(double x) const {
    if (factor == 1.0 && offset == 0.0) return x;
    char buf[32];
    std::snprintf(buf, sizeof buf, "%.12g", (x - offset) / factor);
    return std::strtod(buf, nullptr);
  }
};

/// `3/4` or `1 1/4` (a whole number, a space and a proper fraction), or nullopt.
inline std::optional<double> to_fraction(std::string_view text) {
  const auto whole_number = [](std::string_view digits) -> std::optional<double> {
    if (digits.empty() || digits.find_first_not_of("0123456789") != std::string_view::npos) {
      return std::nullopt;
    }
    return to_number(digits);
  };
  const std::size_t slash = text.find('/');
  if (slash == std::string_view::npos) return std::nullopt;
  std::string_view left = text.substr(0, slash);
  double whole = 0.0;
  const std::size_t space = left.find(' ');
  if (space != std::string_view::npos) {
    const auto w = whole_number(left.substr(0, space));
    if (!w) return std::nullopt;
    whole = *w;
    left = left.substr(space + 1);
  }
  const auto numerator = whole_number(left);
  const auto denominator = whole_number(text.substr(slash + 1));
  if (!numerator || !denominator || *denominator == 0.0) return std::nullopt;
  return whole + *numerator / *denominator;
}

/// One node of the scenario tree with its dotted path and where it was written, so that every
/// conversion reports its errors the same way. A node given in a customary twin carries the
/// conversion to the unit of the key it stands for; its path is the key as written.
class Value {
 public:
  Value(YAML::Node node, std::string path, std::string label, int line, Conversion conversion = {})
      : node_(std::move(node)),
        path_(std::move(path)),
        label_(std::move(label)),
        line_(line),
        conversion_(conversion) {}

  /// The same node read in a customary twin's unit.
  Value converted(const Conversion& conversion) const {
    return Value(node_, path_, label_, line_, conversion);
  }

  const YAML::Node& node() const { return node_; }
  const std::string& path() const { return path_; }
  const std::string& label() const { return label_; }
  int line() const { return line_; }
  /// The text as written; empty unless the node is a scalar.
  const std::string& raw() const { return node_.IsScalar() ? node_.Scalar() : kEmpty; }
  /// The key and its value as written, `reservoir.rim_mm = 62`, for messages about other keys.
  std::string named() const { return path_ + " = " + raw(); }

  [[noreturn]] void fail(const std::string& message) const {
    throw InputError(label_, line_, path_, message);
  }

  /// Fails with `rule (got <the value as written>)` unless `ok`.
  void expect(bool ok, const std::string& rule) const {
    if (!ok) fail(rule + " (got " + raw() + ")");
  }

  /// The node as a message shows it: `"abc"`, `a list`, `a section`, `nothing`.
  std::string got() const {
    if (node_.IsScalar()) return "\"" + node_.Scalar() + "\"";
    if (node_.IsSequence()) return "a list";
    if (node_.IsMap()) return "a section";
    return "nothing";
  }

  /// The number in the unit of the key it is given for (converted from a twin's unit).
  double number(const Limits& limits = kAny) const { return read_number("a number", limits); }

  /// A number, or nullopt when the text is `word`.
  std::optional<double> number_or(const std::string& word, const Limits& limits) const {
    if (raw() == word) return std::nullopt;
    return read_number("a number or " + word, limits);
  }

  /// A number in the key's unit shown in the unit it was given in, for messages.
  std::string shown(double key_value) const {
    char buf[32];
    std::snprintf(buf, sizeof buf, "%.12g", conversion_.to_given(key_value));
    return buf;
  }

  /// A number in the key's unit, whose name is `key_unit`, shown with its unit in the unit it
  /// was given in: `0.1 m` for length_m, `0.328083989501 ft` for length_ft.
  std::string shown_with_unit(double key_value, std::string_view key_unit) const {
    if (conversion_.unit.empty()) return show(key_value) + " " + std::string(key_unit);
    return shown(key_value) + " " + std::string(conversion_.unit);
  }

  /// Text that is shown or written (a name, a column name): UTF-8, not empty.
  std::string text() const {
    const std::string& s = path_text();
    if (const auto at = detail::first_non_utf8(s)) {
      char byte[8];
      std::snprintf(byte, sizeof byte, "\\x%02X", static_cast<unsigned char>(s[*at]));
      fail("not UTF-8 text (byte " + std::string(byte) + " after \"" + s.substr(0, *at) +
           "\"); save the scenario as UTF-8");
    }
    return s;
  }

  /// A file name: any bytes the system takes, not empty.
  std::string path_text() const {
    const std::string& s = scalar("a text");
    if (s.empty()) fail("must not be empty");
    return s;
  }

  double duration_s(const Limits& limits) const {
    const auto d = parse_duration_s(scalar("a duration"));
    if (!d) fail("expected a duration with a unit such as 30s, 5min, 1h or 1d, got " + got());
    expect(*d == std::floor(*d), std::string(kWholeSecondsRule));
    check(*d, limits);
    return *d;
  }

  int utc_offset_s() const {
    const auto offset = parse_utc_offset(scalar("a UTC offset"));
    if (!offset) fail("expected a UTC offset such as +02:00, got " + got());
    return *offset;
  }

  /// An IANA time zone name the system's tz database holds.
  TimeZone time_zone() const {
    const auto zone = TimeZone::named(scalar("a time zone name"));
    if (!zone) {
      fail("unknown time zone " + got() +
           "; give an IANA name such as America/Los_Angeles (the system's tz database)");
    }
    return *zone;
  }

  /// An ISO 8601 date-time; a naive stamp is local time on the clock of `zone` (in an hour the
  /// clocks repeat, the first time it is shown; one they skip is refused).
  Instant time(const TimeZone& zone) const {
    const auto t = parse_iso8601(scalar("a date-time"), zone.fixed() ? zone.offset_s(0) : 0);
    if (!t) fail("expected an ISO 8601 date-time such as 2025-03-01T00:00, got " + got());
    if (t->has_offset || zone.fixed()) return t->instant;
    const LocalInstants at = zone.from_local(t->local);
    if (at.count == 0) {
      fail("is not a time in " + zone.name() + ": the clocks skip it (got " + raw() + ")");
    }
    return at.first;
  }

  template <class T>
  T choice(std::initializer_list<std::pair<std::string_view, T>> options) const {
    return choice(std::span<const std::pair<std::string_view, T>>(options.begin(), options.size()));
  }

  /// As above, for a list made at run time.
  template <class T>
  T choice(std::span<const std::pair<std::string_view, T>> options) const {
    for (const auto& [name, option] : options) {
      if (node_.IsScalar() && node_.Scalar() == name) return option;
    }
    std::string names;
    std::size_t i = 0;
    for (const auto& option : options) {
      if (i > 0) names += i + 1 == options.size() ? " or " : ", ";
      names += option.first;
      ++i;
    }
    fail((options.size() > 1 ? "expected one of " : "expected ") + names + ", got " + got());
  }

  /// The elements of a list, each with its own path (`key[2]`) and line.
  std::vector<Value> items() const {
    if (!node_.IsSequence()) fail("expected a list, got " + got());
    if (node_.size() > kMaxScenarioListItems) {
      fail("a list of " + std::to_string(node_.size()) + " items; a scenario list holds at most " +
           std::to_string(kMaxScenarioListItems));
    }
    std::vector<Value> out;
    for (std::size_t i = 0; i < node_.size(); ++i) {
      const YAML::Node item = node_[i];
      // A value from an override has no line; its elements have none either.
      const int line = line_ > 0 && !item.Mark().is_null() ? item.Mark().line + 1 : line_;
      out.emplace_back(item, path_ + "[" + std::to_string(i) + "]", label_, line, conversion_);
    }
    return out;
  }

  std::vector<double> numbers(const Limits& limits) const {
    std::vector<double> out;
    for (const Value& item : items()) out.push_back(item.number(limits));
    return out;
  }

  std::vector<std::string> path_texts() const {
    std::vector<std::string> out;
    for (const Value& item : items()) out.push_back(item.path_text());
    return out;
  }

 private:
  static inline const std::string kEmpty;

  const std::string& scalar(const std::string& expected) const {
    if (!node_.IsScalar()) fail("expected " + expected + ", got " + got());
    return node_.Scalar();
  }

  void check(double x, const Limits& limits) const {
    expect(limits.contains(x), limits.describe());
  }

  /// Reads the text as a number (inches also as fractions), checks it against `limits` (in the
  /// key's unit, shown in the unit given) and converts it to the key's unit.
  double read_number(const std::string& expected, const Limits& limits) const {
    const std::string& text = scalar(expected);
    auto x = to_number(text);
    if (!x && to_fraction(text)) {
      if (!conversion_.inches) {
        fail("expected " + expected + ", got " + got() +
             " (fractions such as 3/4 are read only for inches, keys ending in _in)");
      }
      x = to_fraction(text);
    }
    if (!x) fail("expected " + expected + ", got " + got());
    Limits given = limits;
    if (given.lo) given.lo = conversion_.to_given(*given.lo);
    if (given.hi) given.hi = conversion_.to_given(*given.hi);
    check(*x, given);
    return conversion_.to_key(*x);
  }

  YAML::Node node_;
  std::string path_;
  std::string label_;
  int line_;
  Conversion conversion_;
};

/// Every key and section present in the tree, by dotted path, for the checks across keys.
class Seen {
 public:
  /// Adds a key or section under its path in SI units (the key a twin stands for).
  void add(const std::string& path, const Value& v) { values_.emplace(path, v); }
  bool has(const std::string& path) const { return values_.count(path) > 0; }
  const Value& at(const std::string& path) const { return values_.at(path); }
  double number(const std::string& path) const { return at(path).number(); }
  /// The text as written, or `fallback` when the key is absent (for choices with a default).
  std::string text_or(const std::string& path, const std::string& fallback) const {
    return has(path) ? at(path).raw() : fallback;
  }

  /// Throws when `path` is absent; the line is that of its section.
  void require(const std::string& path, const std::string& why) const {
    if (has(path)) return;
    const Value& section = at(path.substr(0, path.find('.')));
    throw InputError(section.label(), section.line(), path, "missing required key (" + why + ")");
  }

  void exclusive(const std::string& a, const std::string& b) const {
    if (has(a) && has(b)) {
      at(b).fail("give either " + at(a).path() + " or " + at(b).path() + ", not both");
    }
  }

 private:
  std::map<std::string, Value> values_;
};

/// Converts one key's value into the scenario; checks that need only this value happen here.
using Apply = void (*)(const Value&, Scenario&);

/// One key of a section: its name, whether it is required, and its conversion.
struct Key {
  std::string_view name;
  bool required;
  Apply apply;
};

inline constexpr bool kRequired = true;
inline constexpr bool kOptional = false;

// Nested sections and shared conversions (scenario_sections.cpp).

/// A duration in whole seconds from `lo_s` to `hi_s`.
Instant whole_seconds(const Value& v, Instant lo_s, Instant hi_s);

/// Hours as whole seconds.
Instant hours_as_seconds(const Value& v, const Limits& limits);

/// release.builds: a list of named, measured siphon builds.
void apply_builds(const Value& v, Scenario& s);

/// rain.where: a section of column names and the text each must hold for a row to be kept.
void apply_where(const Value& v, Scenario& s);

/// rain.disaggregate, a small section inside rain: its keys are read and checked here, with the
/// same messages as the loader's. rain.format comes before it in the schema, so it is known here.
void apply_disaggregate(const Value& v, Scenario& s);

/// Checks that involve several keys, and defaults that depend on other keys (scenario_checks.cpp).
void check_combinations(const Seen& seen, Scenario& s);

// The text before the tree (scenario_text.cpp).

/// Throws for a carriage return that ends a line alone (old Mac line ends): YAML would read the
/// whole file as one line.
void check_line_ends(std::string_view text, const std::string& file_label);

/// The first line up to `last_line` (all lines when 0) whose indentation holds a tab, or 0.
int tab_indented_line(std::string_view text, int last_line);

/// Applies each `key.path=value` to the tree, creating missing sections; returns the paths of
/// every key and section an override wrote or created.
std::set<std::string> apply_overrides(YAML::Node& root, const std::vector<std::string>& overrides);

// Key names (scenario_keys.cpp).

/// True when `a` and `b` name the same quantity in the two systems (`rim_mm` and `rim_in`).
bool are_twins(std::string_view a, std::string_view b);

/// Fails on `item` when its key `name` is not one of `valid`, suggesting the nearest.
void reject_unknown_key(const Value& item, const std::string& name,
                        const std::vector<std::string_view>& valid);

/// Makes the Value of one entry of a section from its key and value nodes.
using MakeChild = std::function<Value(const Value&, const YAML::Node&, const YAML::Node&)>;

/// The entries of a section by name, a customary twin under the name of the key it stands for,
/// after rejecting unknown and repeated keys (and both twins of one key) in file order.
std::map<std::string, Value> read_entries(const Value& section,
                                          const std::vector<std::string_view>& valid,
                                          const MakeChild& child);

}  // namespace gutterwatt::detail
