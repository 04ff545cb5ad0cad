#include "gutterwatt/scenario_edit.hpp"

#include <yaml-cpp/yaml.h>

#include <vector>

#include "gutterwatt/error.hpp"

namespace gutterwatt {
namespace {

namespace fs = std::filesystem;

YAML::Node load(std::string_view text, const std::string& label) {
  try {
    return YAML::Load(std::string(text));
  } catch (const YAML::ParserException& e) {
    throw InputError(label, e.mark.is_null() ? 0 : e.mark.line + 1, "",
                     "YAML syntax error: " + e.msg);
  }
}

/// Where a collection node is written in flow style: its first character is a bracket.
bool is_flow(std::string_view text, const YAML::Node& node) {
  const std::size_t pos = static_cast<std::size_t>(node.Mark().pos);
  return pos < text.size() && (text[pos] == '{' || text[pos] == '[');
}

/// The end of the scalar that starts at `pos`: after its closing quote, or, for a plain scalar,
/// before a comment, the line's end or (in flow style) the next separator, trailing blanks off.
std::size_t scalar_end(std::string_view text, std::size_t pos, bool flow) {
  if (pos < text.size() && (text[pos] == '"' || text[pos] == '\'')) {
    const char quote = text[pos];
    for (std::size_t i = pos + 1; i < text.size(); ++i) {
      if (quote == '"' && text[i] == '\\') {
        ++i;
      } else if (text[i] == quote) {
        if (quote == '\'' && i + 1 < text.size() && text[i + 1] == '\'') {
          ++i;
        } else {
          return i + 1;
        }
      }
    }
    return text.size();
  }
  std::size_t end = pos;
  while (end < text.size() && text[end] != '\n' && text[end] != '\r' &&
         !(flow && (text[end] == ',' || text[end] == '}' || text[end] == ']')) &&
         !(text[end] == '#' && end > pos && (text[end - 1] == ' ' || text[end - 1] == '\t'))) {
    ++end;
  }
  while (end > pos && (text[end - 1] == ' ' || text[end - 1] == '\t')) --end;
  return end;
}

std::vector<std::string> split_path(const std::string& path) {
  std::vector<std::string> parts;
  std::size_t start = 0;
  for (;;) {
    const std::size_t dot = path.find('.', start);
    parts.push_back(path.substr(start, dot - start));
    if (dot == std::string::npos) return parts;
    start = dot + 1;
  }
}

/// Replaces the scalar `node` (inside a collection `parent`) by `value`.
std::string replace_scalar(std::string_view text, const YAML::Node& parent, const YAML::Node& node,
                           const std::string& value) {
  const std::size_t pos = static_cast<std::size_t>(node.Mark().pos);
  const std::size_t end = scalar_end(text, pos, is_flow(text, parent));
  std::string out(text);
  out.replace(pos, end - pos, value);
  return out;
}

}  // namespace

std::string set_scenario_value(std::string_view text, const std::string& path,
                               const std::string& value, const std::string& label) {
  const YAML::Node root = load(text, label);
  const std::vector<std::string> parts = split_path(path);
  YAML::Node section = root;
  std::string at;
  for (std::size_t i = 0; i + 1 < parts.size(); ++i) {
    at += (i > 0 ? "." : "") + parts[i];
    const YAML::Node next = section[parts[i]];
    if (!next.IsDefined() || !next.IsMap()) {
      throw InputError(label, 0, at, "missing section (needed to write " + path + ")");
    }
    section.reset(next);
  }
  const std::string& key = parts.back();
  const YAML::Node current = section[key];
  if (current.IsDefined() && !current.IsNull()) {
    if (!current.IsScalar()) {
      throw InputError(label, current.Mark().line + 1, path, "expected a single value");
    }
    return replace_scalar(text, section, current, value);
  }
  std::string out(text);
  const std::size_t pos = static_cast<std::size_t>(section.Mark().pos);
  if (is_flow(text, section)) {
    const bool empty = section.size() == 0;
    out.insert(pos + 1, key + ": " + value + (empty ? "" : ", "));
    return out;
  }
  // A block section: a line of its own before its first key, at that key's indentation.
  const YAML::Mark first = section.begin()->first.Mark();
  const std::size_t line_start = static_cast<std::size_t>(first.pos - first.column);
  out.insert(line_start,
             std::string(static_cast<std::size_t>(first.column), ' ') + key + ": " + value + "\n");
  return out;
}

std::string relocate_scenario_text(std::string_view text, const fs::path& from_dir,
                                   const fs::path& to_dir, const std::string& label) {
  const auto relocated = [&](const std::string& file) {
    const fs::path p(file);
    if (p.is_absolute()) return file;
    const fs::path from = fs::absolute(from_dir.empty() ? fs::path(".") : from_dir);
    const fs::path to = fs::absolute(to_dir.empty() ? fs::path(".") : to_dir);
    return (from / p).lexically_normal().lexically_relative(to.lexically_normal()).generic_string();
  };
  std::string out(text);
  const YAML::Node rain = load(out, label)["rain"];
  if (!rain.IsDefined() || !rain.IsMap()) return out;
  // Edits run from the end of the text backwards, so earlier positions stay valid.
  std::vector<std::pair<YAML::Node, YAML::Node>> scalars;
  if (rain["file"].IsDefined() && rain["file"].IsScalar()) scalars.push_back({rain, rain["file"]});
  if (rain["files"].IsDefined() && rain["files"].IsSequence()) {
    for (const YAML::Node& item : rain["files"]) {
      if (item.IsScalar()) scalars.push_back({rain["files"], item});
    }
  }
  for (auto it = scalars.rbegin(); it != scalars.rend(); ++it) {
    out = replace_scalar(out, it->first, it->second, relocated(it->second.Scalar()));
  }
  return out;
}

}  // namespace gutterwatt
