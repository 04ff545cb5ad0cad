// The scenario loader's key names (see scenario_value.hpp): which keys a section may hold, a
// customary twin (`rim_in`, `capacity_Ah`) read as the key it stands for, and the nearest valid
// name suggested for a misspelt one.

#include <algorithm>
#include <functional>
#include <map>
#include <string>
#include <string_view>
#include <vector>

#include "gutterwatt/units.hpp"
#include "scenario_value.hpp"

namespace gutterwatt::detail {
namespace {

/// Levenshtein edit distance.
std::size_t edit_distance(std::string_view a, std::string_view b) {
  std::vector<std::size_t> row(b.size() + 1);
  for (std::size_t j = 0; j <= b.size(); ++j) row[j] = j;
  for (std::size_t i = 1; i <= a.size(); ++i) {
    std::size_t diagonal = row[0];
    row[0] = i;
    for (std::size_t j = 1; j <= b.size(); ++j) {
      const std::size_t above = row[j];
      row[j] = std::min({row[j] + 1, row[j - 1] + 1, diagonal + (a[i - 1] == b[j - 1] ? 0 : 1)});
      diagonal = above;
    }
  }
  return row[b.size()];
}

/// The valid name nearest to `name`; the first one listed wins a tie.
std::string_view nearest(std::string_view name, const std::vector<std::string_view>& valid) {
  std::string_view best;
  std::size_t best_distance = std::string_view::npos;
  for (std::string_view candidate : valid) {
    const std::size_t d = edit_distance(name, candidate);
    if (d < best_distance) {
      best = candidate;
      best_distance = d;
    }
  }
  return best;
}

bool is_valid(std::string_view name, const std::vector<std::string_view>& valid) {
  return std::find(valid.begin(), valid.end(), name) != valid.end();
}

/// Battery capacity in ampere-hours stands for watt-hours at the battery's nominal voltage.
constexpr std::string_view kAmpereHours = "capacity_Ah";
constexpr std::string_view kWattHours = "capacity_Wh";
constexpr std::string_view kVoltage = "voltage_V";

/// The key among `valid` that `name` is the customary twin of (`rim_in` of `rim_mm`,
/// `capacity_Ah` of `capacity_Wh`), or an empty string.
std::string twin_of(std::string_view name, const std::vector<std::string_view>& valid) {
  if (name == kAmpereHours && is_valid(kWattHours, valid)) return std::string(kWattHours);
  for (const UnitTwin& t : kUnitTwins) {
    if (name.size() <= t.us.size() + 1 || !name.ends_with(t.us) ||
        name[name.size() - t.us.size() - 1] != '_') {
      continue;
    }
    std::string si(name.substr(0, name.size() - t.us.size()));
    si += t.si;
    if (is_valid(si, valid)) return si;
  }
  return "";
}

/// The conversion of `item`, given as the customary twin `name` in `section`, to the unit of the
/// key `si` it stands for.
Conversion twin_conversion(const Value& section, std::string_view name, std::string_view si,
                           const Value& item, const MakeChild& child) {
  if (name == kAmpereHours) {
    const YAML::Node& node = section.node();
    const YAML::Node voltage = node[std::string(kVoltage)];
    if (!voltage) {
      item.fail("needs " + section.path() + "." + std::string(kVoltage) +
                " to turn ampere-hours into watt-hours");
    }
    const auto key = std::find_if(node.begin(), node.end(), [](const auto& entry) {
      return entry.first.IsScalar() && entry.first.Scalar() == kVoltage;
    });
    return {child(section, key->first, key->second).number(kPositive), 0.0, false, "Ah"};
  }
  const UnitTwin* t = si_unit_of(si);
  return {t->si_per_us, t->si_offset, t->us == "in", t->us};
}

}  // namespace

/// True when `a` and `b` name the same quantity in the two systems.
bool are_twins(std::string_view a, std::string_view b) {
  return a != b && (twin_of(a, {b}) == b || twin_of(b, {a}) == a);
}

/// Fails on `item` when its key `name` is not one of `valid`, suggesting the nearest.
void reject_unknown_key(const Value& item, const std::string& name,
                        const std::vector<std::string_view>& valid) {
  if (is_valid(name, valid)) return;
  for (std::string_view key : valid) {
    const UnitTwin* t = si_unit_of(key);
    if (t == nullptr) continue;
    const std::string_view base = key.substr(0, key.size() - t->si.size());
    // A short or per-something ending is a unit; longer words are names misspelt.
    const std::string_view ending =
        std::string_view(name).substr(std::min(name.size(), base.size()));
    if (name.starts_with(base) && !ending.empty() &&
        (ending.size() <= 4 || ending.find("_per_") != std::string_view::npos)) {
      item.fail("unknown unit suffix _" + std::string(ending) + "; give " + std::string(key) +
                " or " + std::string(base) + std::string(t->us));
    }
  }
  if (!name.empty() && name.find_first_not_of("0123456789") == std::string::npos) {
    // `{temperature_C: 12,5}` reads as a key `5` after the value 12.
    item.fail(
        "unknown key; a number is not a key name (a decimal comma? write decimals with a point, "
        "such as 12.5)");
  }
  item.fail("unknown key; did you mean " + std::string(nearest(name, valid)) + "?");
}

/// The entries of a section by name, a customary twin under the name of the key it stands for,
/// after rejecting unknown and repeated keys (and both twins of one key) in file order.
std::map<std::string, Value> read_entries(const Value& section,
                                          const std::vector<std::string_view>& valid,
                                          const MakeChild& child) {
  std::map<std::string, Value> out;
  if (!section.node().IsMap()) return out;
  for (auto it = section.node().begin(); it != section.node().end(); ++it) {
    Value item = child(section, it->first, it->second);
    std::string name = it->first.Scalar();
    if (const std::string si = twin_of(name, valid); !si.empty() && !is_valid(name, valid)) {
      item = item.converted(twin_conversion(section, name, si, item, child));
      name = si;
    }
    reject_unknown_key(item, name, valid);
    const auto [first, inserted] = out.emplace(name, item);
    if (inserted) continue;
    const std::string first_line = std::to_string(first->second.line());
    if (first->second.path() == item.path()) {
      item.fail("duplicate key (first given on line " + first_line + ")");
    }
    item.fail("give either " + first->second.path() + " (line " + first_line + ") or " +
              item.path() + " (line " + std::to_string(item.line()) + "), not both");
  }
  return out;
}

}  // namespace gutterwatt::detail
