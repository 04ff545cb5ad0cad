#pragma once
/// Opens the rain files a scenario names, reads each in its format and joins them in time.

#include <filesystem>
#include <vector>

#include "gutterwatt/rain_input.hpp"
#include "gutterwatt/scenario.hpp"

namespace gutterwatt {

/// Reads `config.files` (or `override_file` in their place when it is not empty). Throws
/// InputError naming the file for one that is missing or unreadable, and naming both files for
/// records that overlap in time.
RainSeries load_rain(const RainConfig& config, const std::filesystem::path& override_file = {});

/// Joins records read separately into one, in time order. Throws InputError naming both labels
/// and the overlap when two records cover the same time.
RainSeries join_rain(std::vector<RainSeries> parts, const std::vector<std::string>& labels);

}  // namespace gutterwatt
