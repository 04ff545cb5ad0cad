#pragma once
// The report page of a run folder. Internal to the report.

#include <filesystem>
#include <optional>
#include <string>

#include "gutterwatt/units.hpp"

namespace gutterwatt::detail {

/// The page of a run folder (timeseries.csv, events.csv, summary.json), in `units` (default: those
/// the run was written in). Throws InputError as the readers do.
std::string render_run(const std::filesystem::path& dir, std::optional<UnitSystem> units = {});

}  // namespace gutterwatt::detail
