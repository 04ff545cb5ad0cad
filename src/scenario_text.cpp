// The scenario's text before its tree is read (see scenario_value.hpp): line ends and tab
// indentation YAML would misread, and the `--set` overrides written into the tree.

#include <algorithm>
#include <set>
#include <string>
#include <string_view>
#include <utility>
#include <vector>

#include "scenario_value.hpp"

namespace gutterwatt::detail {
namespace {

/// Splits `key.path=value`; throws for anything else.
std::pair<std::vector<std::string>, std::string> split_override(const std::string& text) {
  const std::size_t eq = text.find('=');
  std::vector<std::string> parts;
  if (eq != std::string::npos) {
    std::string_view key(text.data(), eq);
    while (true) {
      const std::size_t dot = key.find('.');
      parts.emplace_back(key.substr(0, dot));
      if (dot == std::string_view::npos) break;
      key.remove_prefix(dot + 1);
    }
  }
  const auto empty = [](const std::string& part) { return part.empty(); };
  if (parts.empty() || std::any_of(parts.begin(), parts.end(), empty)) {
    throw InputError(kOverrideLabel, 0, "", "expected key.path=value, got \"" + text + "\"");
  }
  return {parts, text.substr(eq + 1)};
}

}  // namespace

/// Throws for a carriage return that ends a line alone (old Mac line ends): YAML would read the
/// whole file as one line.
void check_line_ends(std::string_view text, const std::string& file_label) {
  for (std::size_t at = text.find('\r'); at != std::string_view::npos;
       at = text.find('\r', at + 1)) {
    if (at + 1 < text.size() && text[at + 1] == '\n') continue;
    const auto line =
        1 + std::count(text.begin(), text.begin() + static_cast<std::ptrdiff_t>(at), '\n');
    throw InputError(file_label, static_cast<int>(line), "",
                     "this line ends with a carriage return alone (CR line ends, as old Mac "
                     "files have); save the file with LF or CRLF line ends");
  }
}

/// The first line up to `last_line` (all lines when 0) whose indentation holds a tab, or 0.
int tab_indented_line(std::string_view text, int last_line) {
  int line = 1;
  for (std::size_t begin = 0; begin < text.size() && (last_line == 0 || line <= last_line);
       ++line) {
    const std::size_t end = std::min(text.find('\n', begin), text.size());
    const std::string_view row = text.substr(begin, end - begin);
    const std::size_t content = row.find_first_not_of(" \t");
    if (content != std::string_view::npos && row[content] != '#' &&
        row.substr(0, content).find('\t') != std::string_view::npos) {
      return line;
    }
    begin = end + 1;
  }
  return 0;
}

/// Applies each `key.path=value` to the tree, creating missing sections; returns the paths of
/// every key and section an override wrote or created.
std::set<std::string> apply_overrides(YAML::Node& root, const std::vector<std::string>& overrides) {
  std::set<std::string> written;
  if (!overrides.empty() && root.IsNull()) root.reset(YAML::Node(YAML::NodeType::Map));
  for (const std::string& text : overrides) {
    const auto [parts, value_text] = split_override(text);
    const std::string key = text.substr(0, text.find('='));
    YAML::Node value;
    if (trim(value_text).starts_with('%')) {
      // YAML reads a leading % as a directive; a strftime format (rain.time_format=%m/%d/%Y
      // %I:%M %p) is meant as text, so it is taken as written, unquoted.
      value = YAML::Node(std::string(trim(value_text)));
    } else {
      try {
        value = YAML::Load(value_text);
      } catch (const YAML::ParserException& e) {
        // A list or a section is meant as one; other text may hold a character YAML reserves.
        const bool structure =
            trim(value_text).starts_with('[') || trim(value_text).starts_with('{');
        throw InputError(
            kOverrideLabel, 0, key,
            "cannot read the value: " + e.msg +
                (structure ? ""
                           : "; quote text that holds YAML's special characters: --set '" + key +
                                 "=\"...\"'"));
      }
    }
    if (value.IsMap()) {
      throw InputError(kOverrideLabel, 0, key,
                       "expected a single value or a list such as [1, 2], got a section");
    }
    if (!root.IsMap()) return written;  // the loader reports a top level that is not a section
    YAML::Node node = root;
    std::string path;
    for (std::size_t i = 0; i + 1 < parts.size(); ++i) {
      path += (i > 0 ? "." : "") + parts[i];
      YAML::Node next = node[parts[i]];
      if (!next.IsDefined() || next.IsNull()) {
        next = YAML::Node(YAML::NodeType::Map);
        written.insert(path);
      } else if (!next.IsMap()) {
        throw InputError(kOverrideLabel, 0, key, path + " is a single value, not a section");
      }
      node.reset(next);
    }
    // A value for one twin replaces one written for the other.
    std::vector<std::string> twins;
    for (auto it = node.begin(); it != node.end(); ++it) {
      if (it->first.IsScalar() && are_twins(it->first.Scalar(), parts.back())) {
        twins.push_back(it->first.Scalar());
      }
    }
    for (const std::string& twin : twins) node.remove(twin);
    node[parts.back()] = value;
    written.insert(key);
  }
  return written;
}

}  // namespace gutterwatt::detail
