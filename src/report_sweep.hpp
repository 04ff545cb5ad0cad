#pragma once
// The report page of a sweep folder. Internal to the report.

#include <filesystem>
#include <string>

namespace gutterwatt::detail {

/// The page of a sweep folder (sweep.csv, optionally sweep.json). Throws InputError as the
/// readers do.
std::string render_sweep(const std::filesystem::path& dir);

}  // namespace gutterwatt::detail
