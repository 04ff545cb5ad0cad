// The report: which page a folder gets, and writing it. The parts: report_files (reading the
// output files), chart (the chart model), report_format (text), report_page (the frame every page
// shares), report_run and report_sweep (the two pages, one function per section).

#include "gutterwatt/report.hpp"

#include <system_error>

#include "gutterwatt/error.hpp"
#include "gutterwatt/output_folder.hpp"
#include "report_run.hpp"
#include "report_sweep.hpp"

namespace gutterwatt {

namespace fs = std::filesystem;

std::string render_report(const fs::path& dir, std::optional<UnitSystem> units) {
  std::error_code ec;
  const bool run = fs::exists(dir / "timeseries.csv", ec);
  const bool sweep = fs::exists(dir / "sweep.csv", ec);
  if (run && sweep) {
    throw InputError(dir.string(), 0, "",
                     "holds both a run (timeseries.csv) and a sweep (sweep.csv); give each its "
                     "own output folder (--out), or move one set away");
  }
  if (run) return detail::render_run(dir, units);
  if (sweep) return detail::render_sweep(dir, units);
  if (!fs::exists(dir, ec)) throw InputError(dir.string(), 0, "", "no such directory");
  if (!fs::is_directory(dir, ec)) {
    throw InputError(dir.string(), 0, "", "is a file; give the output folder of a run or sweep");
  }
  throw InputError(dir.string(), 0, "",
                   "holds neither timeseries.csv (a run) nor sweep.csv (a sweep)");
}

fs::path write_report(const fs::path& dir, std::optional<UnitSystem> units) {
  std::string page;
  {
    const FolderReadLock reading(dir);
    page = render_report(dir, units);
  }
  OutputFolder folder(dir, "");
  folder.open(kReportFile) << page;
  folder.commit();
  return dir / kReportFile;
}

}  // namespace gutterwatt
