// The sites file of a regional sweep (see sweep.hpp, SweepSites): a site's name, then its
// scenario keys, one row per site.

#include <yaml-cpp/yaml.h>

#include <algorithm>
#include <filesystem>
#include <iterator>
#include <set>

#include "detail.hpp"
#include "gutterwatt/error.hpp"
#include "gutterwatt/scenario.hpp"
#include "gutterwatt/sweep.hpp"
#include "report_files.hpp"

namespace gutterwatt {
namespace {

// Keys whose values are paths: a sites file gives them relative to itself.
constexpr std::string_view kPathKeys[] = {"rain.file", "rain.files",
                                          "rain.disaggregate.calibrate_with.file"};

/// A cell of a path key with each relative path made absolute from `dir`: one path, or a YAML
/// flow list of them (`[a.csv, b.csv]`).
std::string absolute_paths(const std::string& cell, const std::filesystem::path& dir,
                           const std::string& file, int line, const std::string& column) {
  YAML::Node node;
  try {
    node = YAML::Load(cell);
  } catch (const YAML::Exception& e) {
    throw InputError(file, line, column, "cannot read the value: " + e.msg);
  }
  const auto absolute = [&](const std::string& path) {
    const std::filesystem::path p(path);
    return (p.is_absolute() ? p : std::filesystem::absolute(dir / p)).lexically_normal().string();
  };
  YAML::Emitter out;
  out.SetStringFormat(YAML::DoubleQuoted);
  if (node.IsScalar()) {
    out << absolute(node.Scalar());
  } else if (node.IsSequence()) {
    out << YAML::Flow << YAML::BeginSeq;
    for (const YAML::Node& item : node) {
      if (!item.IsScalar()) throw InputError(file, line, column, "expected a list of file names");
      out << absolute(item.Scalar());
    }
    out << YAML::EndSeq;
  } else {
    throw InputError(file, line, column, "expected a file name or a list [a.csv, b.csv]");
  }
  return out.c_str();
}

}  // namespace

SweepSites read_sweep_sites(std::string_view text, const std::string& file) {
  const detail::Csv csv = detail::parse_csv(text, file);
  SweepSites sites;
  sites.file = file;
  sites.text = std::string(text);
  if (csv.header.front() != "site") {
    throw InputError(file, 1, "column 1",
                     "expected \"site\" (the site's name) first, then scenario keys such as "
                     "rain.file (got \"" +
                         csv.header.front() + "\")");
  }
  for (std::size_t c = 1; c < csv.header.size(); ++c) {
    const std::string& key = csv.header[c];
    const std::string column = "column " + std::to_string(c + 1) + " (" + key + ")";
    if (key.empty()) throw InputError(file, 1, "column " + std::to_string(c + 1), "no key named");
    if (std::find(sites.keys.begin(), sites.keys.end(), key) != sites.keys.end()) {
      throw InputError(file, 1, column, "is given twice");
    }
    try {
      check_scenario_key(key, file);
    } catch (const InputError& e) {
      throw InputError(file, 1, column, e.message());
    }
    sites.keys.push_back(key);
  }
  const std::filesystem::path dir = std::filesystem::path(file).parent_path();
  std::set<std::string> names;
  for (std::size_t r = 0; r < csv.rows.size(); ++r) {
    const std::vector<std::string>& cells = csv.rows[r];
    SweepSite site;
    site.name = cells.front();
    site.line = csv.lines[r];
    if (site.name.empty()) throw InputError(file, site.line, "column 1 (site)", "no site name");
    if (!names.insert(site.name).second) {
      throw InputError(file, site.line, "column 1 (site)",
                       "the site \"" + site.name + "\" is listed twice");
    }
    for (std::size_t c = 1; c < cells.size(); ++c) {
      if (cells[c].empty()) continue;
      const std::string& key = sites.keys[c - 1];
      const bool path =
          std::find(std::begin(kPathKeys), std::end(kPathKeys), key) != std::end(kPathKeys);
      const std::string column = "column " + std::to_string(c + 1) + " (" + key + ")";
      site.overrides.push_back(
          key + "=" + (path ? absolute_paths(cells[c], dir, file, site.line, column) : cells[c]));
    }
    sites.sites.push_back(std::move(site));
  }
  if (sites.sites.empty()) throw InputError(file, 0, "", "no site (only a header line)");
  return sites;
}

}  // namespace gutterwatt
