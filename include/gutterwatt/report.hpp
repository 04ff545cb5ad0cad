#pragma once
/// The report: one self-contained HTML page (inline SVG charts, inline CSS, no scripts, nothing
/// loaded from the network) drawn from what a run or a sweep wrote into its output folder.

#include <cstddef>
#include <filesystem>
#include <string>
#include <vector>

namespace gutterwatt {

/// Reads a run folder (timeseries.csv, events.csv, summary.json) or, when it has no
/// timeseries.csv, a sweep folder (sweep.csv, optionally sweep.json) and returns the page.
/// Throws InputError naming the file (and the line and column or key where there is one) for a
/// missing, unreadable or malformed input, and naming `dir` when it holds neither kind of output.
std::string render_report(const std::filesystem::path& dir);

/// Renders the page, reading the folder's files under its shared lock (FolderReadLock) so that a
/// run publishing into it meanwhile cannot mix two sets, and writes it to `dir`/report.html
/// through an OutputFolder, so a failure leaves any earlier report untouched. Returns the path
/// written.
/// Throws as render_report, InputError when the folder or file cannot be opened for writing, and
/// Error when the write itself fails.
///
///   auto page = gutterwatt::write_report("out/demo");  // out/demo/report.html
std::filesystem::path write_report(const std::filesystem::path& dir);

/// Min/max-per-bucket thinning for display: splits `values` into `buckets` runs of consecutive
/// samples and keeps, from each, the index of its smallest and of its largest value (once when
/// they coincide), plus the first and last sample overall. Returns increasing indices. NaN samples
/// are never kept. With `values.size() <= 2 * buckets` (or `buckets == 0`) every index of a
/// non-NaN sample is returned, so short series pass through unchanged. Peaks and troughs survive.
std::vector<std::size_t> thin_min_max(const std::vector<double>& values, std::size_t buckets);

}  // namespace gutterwatt
