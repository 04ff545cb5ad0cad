#pragma once
/// The report: one self-contained HTML page (inline SVG charts, inline CSS, no scripts, nothing
/// loaded from the network) drawn from what a run or a sweep wrote into its output folder.

#include <filesystem>
#include <optional>
#include <string>

#include "gutterwatt/units.hpp"

namespace gutterwatt {

/// The report's file in an output folder. A run or a sweep that publishes into a folder retires
/// an earlier one (OutputFolder::retire): it was drawn from the results they replace.
inline constexpr const char* kReportFile = "report.html";

/// Reads a run folder (timeseries.csv, events.csv, summary.json) or, when it has no
/// timeseries.csv, a sweep folder (sweep.csv, optionally sweep.json), written in either system of
/// units, and returns the page in `units` (default: the units the folder was written in).
/// Throws InputError naming the file (and the line and column or key where there is one) for a
/// missing, unreadable or malformed input, and naming `dir` when it holds neither kind of output
/// or both (a run and a sweep into one folder: which one the page is meant for is not known).
std::string render_report(const std::filesystem::path& dir, std::optional<UnitSystem> units = {});

/// Renders the page, reading the folder's files under its shared lock (FolderReadLock) so that a
/// run publishing into it meanwhile cannot mix two sets, and writes it to `dir`/report.html
/// through an OutputFolder, so a failure leaves any earlier report untouched. Returns the path
/// written.
/// Throws as render_report, InputError when the folder or file cannot be opened for writing, and
/// Error when the write itself fails.
///
///   auto page = gutterwatt::write_report("out/demo");  // out/demo/report.html
std::filesystem::path write_report(const std::filesystem::path& dir,
                                   std::optional<UnitSystem> units = {});

}  // namespace gutterwatt
