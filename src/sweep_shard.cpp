#include "gutterwatt/sweep_shard.hpp"

#include <algorithm>
#include <cstring>
#include <map>
#include <nlohmann/json.hpp>
#include <optional>

#include "detail.hpp"
#include "gutterwatt/error.hpp"
#include "gutterwatt/output_folder.hpp"
#include "gutterwatt/units.hpp"
#include "report_files.hpp"

namespace gutterwatt {
namespace {

namespace fs = std::filesystem;
using nlohmann::ordered_json;

const std::string kShardLabel = "--shard";
const std::string kShardJson = "shard.json";
const std::string kShardCsv = "shard.csv";
// shard.json's format; a merge refuses folders of another.
constexpr int kShardFormat = 1;

/// FNV-1a 64-bit offset basis and prime (draft-eastlake-fnv).
constexpr std::uint64_t kFnvOffset = 14695981039346656037ULL;
constexpr std::uint64_t kFnvPrime = 1099511628211ULL;

/// FNV-1a fed piece by piece.
class Fnv1a {
 public:
  void add(const void* data, std::size_t size) {
    const auto* bytes = static_cast<const unsigned char*>(data);
    for (std::size_t i = 0; i < size; ++i) {
      hash_ ^= bytes[i];
      hash_ *= kFnvPrime;
    }
  }
  template <typename T>
  void add_value(const T& value) {
    add(&value, sizeof value);
  }
  std::string hex() const {
    static constexpr char kHex[] = "0123456789abcdef";
    std::string out(16, '0');
    for (int i = 0; i < 16; ++i) out[15 - i] = kHex[(hash_ >> (4 * i)) & 0xF];
    return out;
  }

 private:
  std::uint64_t hash_ = kFnvOffset;
};

/// The whole of `text` as a count, or nullopt.
std::optional<std::size_t> to_count(std::string_view text) {
  if (text.empty() || text.size() > 9 ||
      !std::all_of(text.begin(), text.end(), [](char c) { return c >= '0' && c <= '9'; })) {
    return std::nullopt;
  }
  return static_cast<std::size_t>(std::stoul(std::string(text)));
}

/// The record files a site's rain names: name and size (-1 when it cannot be seen; reading the
/// record reports why).
ordered_json record_files(const Scenario& site) {
  std::vector<fs::path> files = site.rain.files;
  if (site.rain.calibrate_with) files.push_back(site.rain.calibrate_with->file);
  ordered_json out = ordered_json::array();
  for (const fs::path& file : files) {
    std::error_code ec;
    const std::uintmax_t size = fs::file_size(file, ec);
    out.push_back(
        {{"name", file.filename().string()}, {"bytes", ec ? -1 : static_cast<std::int64_t>(size)}});
  }
  return out;
}

/// "site A, key=v, key=v": a cell as a person names it.
std::string describe_cell(const SweepPlan& plan, std::size_t cell) {
  std::string text = plan.sites.empty() ? "" : "site " + plan.sites[plan.site_of(cell)].name;
  const std::vector<std::string>& values = plan.combinations[cell % plan.combinations.size()];
  for (std::size_t k = 0; k < plan.axes.size(); ++k) {
    text += (text.empty() ? "" : ", ") + plan.axes[k].key + "=" + values[k];
  }
  return text;
}

/// The columns of shard.csv after `cell`, the site and the varied keys.
std::vector<std::string> shard_columns() {
  std::vector<std::string> columns{"status", "reason"};
  for (const std::string& m : sweep_metric_names()) columns.push_back(m);
  for (const char* p : {"rank_p10", "rank_p50", "rank_p90"}) columns.emplace_back(p);
  return columns;
}

/// The plan of a shard.json, rebuilt enough to write the sweep's files.
SweepPlan plan_of(const ordered_json& j, const std::string& file) {
  SweepPlan plan;
  try {
    plan.scenario_label = j.at("scenario").get<std::string>();
    plan.base.site.name = j.at("site").get<std::string>();
    const std::string units = j.at("units").get<std::string>();
    plan.base.site.units = parse_unit_system(units).value_or(UnitSystem::si);
    plan.base_overrides = j.at("set").get<std::vector<std::string>>();
    for (const auto& key : j.at("vary")) {
      SweepAxis axis;
      axis.key = key.get<std::string>();
      axis.values = j.at("values").at(axis.key).get<std::vector<std::string>>();
      plan.axes.push_back(std::move(axis));
    }
    plan.rank.metric = j.at("rank").get<std::string>();
    plan.rank.descending = j.at("order").get<std::string>() == "descending";
    if (j.contains("sites")) {
      plan.sites_file = j.at("sites").get<std::string>();
      for (const auto& name : j.at("site_names"))
        plan.sites.push_back({name.get<std::string>(), {}, 0});
    }
  } catch (const nlohmann::json::exception& e) {
    throw InputError(file, 0, "plan", std::string("not a plan this gutterwatt wrote: ") + e.what());
  }
  plan.combinations = expand_combinations(plan.axes);
  return plan;
}

/// One shard folder as read.
struct ShardFolder {
  fs::path dir;
  ordered_json json;
  std::string digest;
  SweepShard shard;
};

ShardFolder read_shard_json(const fs::path& dir) {
  ShardFolder f;
  f.dir = dir;
  const fs::path path = dir / kShardJson;
  const std::string file = path.string();
  std::error_code ec;
  if (!fs::exists(path, ec)) {
    throw InputError(file, 0, "",
                     "no such file: " + dir.string() +
                         " is not a shard folder (give the folders sweep --shard wrote)");
  }
  f.json = ordered_json::parse(detail::read_text(path), nullptr, false);
  if (!f.json.is_object() || !f.json.contains("format") || f.json["format"] != kShardFormat) {
    throw InputError(file, 0, "format",
                     "not a shard.json of format " + std::to_string(kShardFormat) +
                         " (written by another gutterwatt?)");
  }
  try {
    f.digest = f.json.at("plan_digest").get<std::string>();
    f.shard.index = f.json.at("shard").get<std::size_t>();
    f.shard.count = f.json.at("shards").get<std::size_t>();
    f.json.at("plan");
  } catch (const nlohmann::json::exception& e) {
    throw InputError(file, 0, "", std::string("incomplete shard description: ") + e.what());
  }
  return f;
}

}  // namespace

SweepShard parse_shard(const std::string& text,
                       const std::function<const char*(const char*)>& env) {
  const std::size_t slash = text.find('/');
  const std::string k_text = text.substr(0, slash);
  const std::optional<std::size_t> n =
      slash == std::string::npos ? std::nullopt : to_count(text.substr(slash + 1));
  if (!n || *n == 0) {
    throw InputError("", 0, kShardLabel,
                     "expected K/N (shard K of N, 1 <= K <= N) or auto/N (got \"" + text + "\")");
  }
  SweepShard shard;
  shard.count = *n;
  std::string source = "K";
  std::string index_text = k_text;
  if (k_text == "auto") {
    std::string names;
    const char* found = nullptr;
    for (const ArrayIndexVariable& v : kArrayIndexVariables) {
      names += (names.empty() ? "" : ", ") + std::string(v.name);
      const std::string name(v.name);
      if (found == nullptr && env(name.c_str()) != nullptr) {
        found = env(name.c_str());
        source = name;
      }
    }
    if (found == nullptr) {
      throw InputError("", 0, kShardLabel,
                       "auto takes K from an array job's index, but none of " + names +
                           " is set; give K/N outside an array job");
    }
    index_text = found;
  }
  const std::optional<std::size_t> k = to_count(index_text);
  if (!k || *k == 0 || *k > *n) {
    throw InputError("", 0, kShardLabel,
                     source + " is \"" + index_text + "\"; expected 1 to " + std::to_string(*n) +
                         " (submit the array as 1-" + std::to_string(*n) + ")");
  }
  shard.index = *k;
  return shard;
}

std::pair<std::size_t, std::size_t> shard_cells(std::size_t cells, const SweepShard& shard) {
  const auto at = [&](std::size_t k) {
    return k * cells / shard.count;  // below 1e5 cells by 1e9 shards: no overflow
  };
  return {at(shard.index - 1), at(shard.index)};
}

std::string fnv1a_hex(std::string_view bytes) {
  Fnv1a h;
  h.add(bytes.data(), bytes.size());
  return h.hex();
}

std::string shard_plan_json(const SweepPlan& plan, std::size_t realizations) {
  ordered_json j;
  j["scenario"] = fs::path(plan.scenario_label).filename().string();
  j["scenario_digest"] = fnv1a_hex(plan.scenario_text);
  j["site"] = plan.base.site.name;
  j["set"] = plan.base_overrides;
  ordered_json vary = ordered_json::array();
  ordered_json values = ordered_json::object();
  for (const SweepAxis& axis : plan.axes) {
    vary.push_back(axis.key);
    values[axis.key] = axis.values;
  }
  j["vary"] = vary;
  j["values"] = values;
  if (!plan.sites.empty()) {
    j["sites"] = fs::path(plan.sites_file).filename().string();
    j["sites_digest"] = fnv1a_hex(plan.sites_text);
    ordered_json names = ordered_json::array();
    for (const SweepSite& site : plan.sites) names.push_back(site.name);
    j["site_names"] = names;
  }
  ordered_json records = ordered_json::array();
  for (std::size_t s = 0; s < plan.site_count(); ++s) {
    records.push_back(record_files(plan.site_scenario(s)));
  }
  j["record_files"] = records;
  j["rank"] = plan.rank.metric;
  j["order"] = plan.rank.descending ? "descending" : "ascending";
  j["units"] = unit_system_name(plan.base.site.units);
  j["realizations"] = realizations;
  j["cells"] = plan.cell_count();
  return j.dump(2, ' ', false, ordered_json::error_handler_t::replace);
}

std::string record_digest(const std::vector<RainSeries>& records) {
  Fnv1a h;
  for (const RainSeries& r : records) {
    h.add_value(r.step_s);
    h.add_value(r.pulses.size());
    for (const RainPulse& p : r.pulses) {
      h.add_value(p.start);
      h.add_value(p.end);
      h.add_value(p.depth_m);
    }
    h.add_value(r.covered.size());
    for (const TimeSpan& span : r.covered) {
      h.add_value(span.start);
      h.add_value(span.end);
    }
  }
  return h.hex();
}

void write_shard(OutputFolder& folder, const SweepPlan& plan, const ShardRun& run,
                 const SweepResult& result) {
  const std::string plan_text = shard_plan_json(plan, run.realizations);
  const auto [first, end] = shard_cells(plan.cell_count(), run.shard);
  ordered_json j;
  j["format"] = kShardFormat;
  j["shard"] = run.shard.index;
  j["shards"] = run.shard.count;
  j["first_cell"] = first;
  j["end_cell"] = end;
  j["plan_digest"] = fnv1a_hex(plan_text);
  ordered_json records = ordered_json::array();
  for (const auto& [site, digest] : run.record_digests) {
    records.push_back({{"site", plan.sites.empty() ? plan.base.site.name : plan.sites[site].name},
                       {"digest", digest}});
  }
  j["records"] = records;
  j["plan"] = ordered_json::parse(plan_text);

  folder.open(kShardJson) << j.dump(2, ' ', false, ordered_json::error_handler_t::replace) << '\n';
  std::ostream& csv = folder.open(kShardCsv);
  std::string header = "cell,site,";
  for (const SweepAxis& axis : plan.axes) header += detail::csv_cell(axis.key) + ",";
  for (const std::string& c : shard_columns()) header += c + ",";
  header.back() = '\n';
  csv << header;
  const std::vector<std::string> metrics = sweep_metric_names();
  for (const SweepRow& row : result.rows) {
    std::string line = std::to_string(row.cell) + "," +
                       detail::csv_cell(plan.sites.empty() ? "" : plan.sites[row.site].name) + ",";
    for (const std::string& v : row.values) line += detail::csv_cell(v) + ",";
    line += std::string(sweep_status_name(row.status)) + "," + detail::csv_cell(row.reason) + ",";
    const bool ok = row.status == SweepStatus::ok;
    for (const std::string& m : metrics) {
      line += (ok ? format_metric(sweep_metric(row.metrics, m)) : "") + ",";
    }
    for (const double v : {row.rank_spread ? row.rank_spread->p10 : 0.0,
                           row.rank_spread ? row.rank_spread->p50 : 0.0,
                           row.rank_spread ? row.rank_spread->p90 : 0.0}) {
      line += (ok && row.rank_spread ? format_metric(v) : "") + ",";
    }
    line.back() = '\n';
    csv << line;
  }
  folder.commit();
}

MergedSweep merge_shards(const std::vector<fs::path>& dirs) {
  if (dirs.empty()) throw InputError("", 0, "", "give the shard folders to merge");
  std::vector<ShardFolder> folders;
  for (const fs::path& dir : dirs) folders.push_back(read_shard_json(dir));
  const ShardFolder& first = folders.front();
  for (const ShardFolder& f : folders) {
    if (f.digest != first.digest) {
      throw InputError((f.dir / kShardJson).string(), 0, "plan_digest",
                       f.digest + " differs from " + first.digest + " in " +
                           (first.dir / kShardJson).string() +
                           ": the shards come from different sweeps (the scenario, the sites "
                           "file, a record file's size, --vary, --set, --rank, --units or "
                           "--realizations differ)");
    }
    if (f.shard.count != first.shard.count) {
      throw InputError((f.dir / kShardJson).string(), 0, "shards",
                       "shard " + std::to_string(f.shard.index) + " of " +
                           std::to_string(f.shard.count) + ", but " + first.dir.string() +
                           " is one of " + std::to_string(first.shard.count));
    }
  }
  MergedSweep merged;
  const std::string first_file = (first.dir / kShardJson).string();
  merged.plan = plan_of(first.json.at("plan"), first_file);
  SweepPlan& plan = merged.plan;
  const std::size_t cells = plan.cell_count();
  if (first.json.at("plan").value("cells", std::size_t{0}) != cells) {
    throw InputError(first_file, 0, "plan.cells", "does not match the sites and values");
  }
  merged.result.realizations = first.json.at("plan").value("realizations", std::size_t{1});

  std::vector<std::optional<SweepRow>> rows(cells);
  std::vector<const fs::path*> from(cells, nullptr);
  std::map<std::string, std::pair<std::string, const fs::path*>> record_seen;
  const std::vector<std::string> metrics = sweep_metric_names();
  for (const ShardFolder& f : folders) {
    for (const auto& r : f.json.value("records", ordered_json::array())) {
      const std::string site = r.value("site", "");
      const std::string digest = r.value("digest", "");
      const auto [it, fresh] = record_seen.try_emplace(site, digest, &f.dir);
      if (!fresh && it->second.first != digest) {
        throw InputError((f.dir / kShardJson).string(), 0, "records",
                         "the record of " + site + " reads as " + digest + " here but as " +
                             it->second.first + " in " + it->second.second->string() +
                             ": it changed between shards");
      }
    }
    const fs::path csv_path = f.dir / kShardCsv;
    const std::string file = csv_path.string();
    const detail::Csv csv = detail::parse_csv(detail::read_text(csv_path), file);
    const std::size_t keys = plan.axes.size();
    if (csv.header.size() != 2 + keys + shard_columns().size()) {
      throw InputError(file, 1, "", "not the columns of this plan's shard.csv");
    }
    for (std::size_t r = 0; r < csv.rows.size(); ++r) {
      const std::vector<std::string>& cell_text = csv.rows[r];
      const int line = csv.lines[r];
      const std::optional<std::size_t> cell = to_count(cell_text[0]);
      if (!cell || *cell >= cells) {
        throw InputError(file, line, "cell", "expected a cell below " + std::to_string(cells));
      }
      SweepRow row;
      row.cell = *cell;
      row.site = plan.site_of(*cell);
      row.values.assign(cell_text.begin() + 2, cell_text.begin() + 2 + static_cast<long>(keys));
      const std::string site = plan.sites.empty() ? "" : plan.sites[row.site].name;
      if (cell_text[1] != site ||
          row.values != plan.combinations[*cell % plan.combinations.size()]) {
        throw InputError(file, line, "",
                         "the row is not the plan's cell " + std::to_string(*cell) + " (" +
                             describe_cell(plan, *cell) + ")");
      }
      if (from[*cell] != nullptr) {
        throw InputError(file, line, "",
                         "the combination " + describe_cell(plan, *cell) + " is also in " +
                             from[*cell]->string() + "; give each shard once");
      }
      const std::string& status = cell_text[2 + keys];
      if (status == "skipped") {
        row.status = SweepStatus::skipped;
      } else if (status == "failed") {
        row.status = SweepStatus::failed;
      } else if (status != "ok") {
        throw InputError(file, line, "status", "expected ok, skipped or failed");
      }
      row.reason = cell_text[3 + keys];
      if (row.status == SweepStatus::ok) {
        for (std::size_t m = 0; m < metrics.size(); ++m) {
          sweep_metric(row.metrics, metrics[m]) =
              detail::parse_number(cell_text[4 + keys + m], file, line, metrics[m]);
        }
        if (merged.result.realizations > 1) {
          const std::size_t at = 4 + keys + metrics.size();
          row.rank_spread = Spread{detail::parse_number(cell_text[at], file, line, "rank_p10"),
                                   detail::parse_number(cell_text[at + 1], file, line, "rank_p50"),
                                   detail::parse_number(cell_text[at + 2], file, line, "rank_p90")};
        }
      }
      rows[*cell] = std::move(row);
      from[*cell] = &f.dir;
    }
  }
  for (std::size_t cell = 0; cell < cells; ++cell) {
    if (rows[cell]) continue;
    std::size_t owner = 1;
    while (shard_cells(cells, {owner, first.shard.count}).second <= cell) ++owner;
    throw InputError("", 0, "",
                     "the combination " + describe_cell(plan, cell) +
                         " is missing: it is in shard " + std::to_string(owner) + " of " +
                         std::to_string(first.shard.count) +
                         ", whose folder was not given (or has not finished)");
  }
  merged.result.rows.reserve(cells);
  for (std::optional<SweepRow>& row : rows) merged.result.rows.push_back(std::move(*row));
  finish_sweep(plan, merged.result);
  return merged;
}

}  // namespace gutterwatt
