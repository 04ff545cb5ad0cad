#pragma once
// The report page of a run folder. Internal to the report.

#include <filesystem>
#include <string>

namespace gutterwatt::detail {

/// The page of a run folder (timeseries.csv, events.csv, summary.json). Throws InputError as the
/// readers do.
std::string render_run(const std::filesystem::path& dir);

}  // namespace gutterwatt::detail
