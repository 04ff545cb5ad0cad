#pragma once
// The report page of a sweep folder. Internal to the report.

#include <filesystem>
#include <optional>
#include <string>

#include "gutterwatt/units.hpp"

namespace gutterwatt::detail {

/// The page of a sweep folder (sweep.csv, optionally sweep.json), in `units` (default: those the
/// sweep was written in). Throws InputError as the readers do.
std::string render_sweep(const std::filesystem::path& dir, std::optional<UnitSystem> units = {});

}  // namespace gutterwatt::detail
