#pragma once
/// Edits of a scenario's YAML text that keep everything else as written (comments, order,
/// block or flow style): what `fit` uses to write a scenario with fitted values.

#include <filesystem>
#include <string>
#include <string_view>

namespace gutterwatt {

/// `text` with the scalar at `path` (dotted, e.g. `drop_pipe.minor_loss_k`) set to `value`: the
/// value as written is replaced, or, where the key is absent, `key: value` is added as the first
/// entry of its section (a line of its own in a block section, after the brace in a flow one).
/// Throws InputError naming `label` when a section on the path is missing or not a section, or
/// the key holds a list or a section.
///
///   set_scenario_value("nozzle: {diameter_mm: 6}\n", "nozzle.discharge_coefficient", "0.9", "s")
///   // "nozzle: {discharge_coefficient: 0.9, diameter_mm: 6}\n"
std::string set_scenario_value(std::string_view text, const std::string& path,
                               const std::string& value, const std::string& label);

/// `text` as it must read from `to_dir` to mean what it meant in `from_dir`: every relative
/// path under `rain.file` and `rain.files` is rewritten relative to `to_dir`.
std::string relocate_scenario_text(std::string_view text, const std::filesystem::path& from_dir,
                                   const std::filesystem::path& to_dir, const std::string& label);

}  // namespace gutterwatt
