#pragma once
/// Opens the rain files a scenario names, reads each in its format and joins them in time.

#include <atomic>
#include <filesystem>
#include <functional>
#include <optional>
#include <vector>

#include "gutterwatt/rain_feed.hpp"
#include "gutterwatt/rain_input.hpp"
#include "gutterwatt/scenario.hpp"

namespace gutterwatt {

/// The record as read: `config.files` (or `override_file` in their place when it is not empty),
/// each day of a daily record one pulse over its window, nothing disaggregated. Throws
/// InputError naming the file for one that is missing or unreadable, and naming both files for
/// records that overlap in time. Throws Interrupted soon after `stop` (when given) is set: the
/// files are read in pieces of 64 KiB and the flag looked at between them.
RainSeries load_rain_as_read(const RainConfig& config,
                             const std::filesystem::path& override_file = {},
                             const std::atomic<bool>* stop = nullptr);

/// `config.disaggregate` (nullopt without one) with its cascade calibrated when the scenario
/// asks: by rain.disaggregate.calibrate_with, the fine record read and its parameters estimated
/// (estimate_cascade) for intervals up to the longest of `as_read`; by rain.disaggregate.idf, the
/// intermittency fitted to the curve (fit_intermittency on `as_read`). Throws InputError naming the
/// calibration file and `rain.disaggregate.calibrate_with` for a record coarser than
/// rain.disaggregate.step, one without rain or one with too few wet intervals to estimate from.
std::optional<Disaggregation> calibrated_disaggregation(const RainConfig& config,
                                                        const RainSeries& as_read,
                                                        const std::atomic<bool>* stop = nullptr);

/// load_rain_as_read, then disaggregated by calibrated_disaggregation when there is one.
RainSeries load_rain(const RainConfig& config, const std::filesystem::path& override_file = {},
                     const std::atomic<bool>* stop = nullptr);

/// load_rain, with `consume` at work on the record while it is read. A record of one `series` file
/// that is not disaggregated is read on a second thread and reaches `consume` through the view as
/// it is read; any other record is read whole first. Returns the whole record once `consume` has
/// returned and the reading has ended. When both fail, the reading error is thrown, as it would
/// have been had the record been read first, except that an Interrupted from `consume` stops the
/// reading at once. `stop` stops the reading as in load_rain.
RainSeries load_rain_while(const RainConfig& config, const std::filesystem::path& override_file,
                           const std::function<void(RainView&)>& consume,
                           const std::atomic<bool>* stop = nullptr);

/// Joins records read separately into one, in time order. Throws InputError naming both labels
/// and the overlap when two records cover the same time.
RainSeries join_rain(std::vector<RainSeries> parts, const std::vector<std::string>& labels);

}  // namespace gutterwatt
