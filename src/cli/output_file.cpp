#include "output_file.hpp"

#include <algorithm>
#include <filesystem>
#include <iostream>

#include "gutterwatt/error.hpp"
#include "gutterwatt/output_folder.hpp"
#include "gutterwatt/report.hpp"

namespace gutterwatt {
namespace {

namespace fs = std::filesystem;

// The file --out names is replaced by renaming a finished temporary file onto it: refuse a
// folder, and a device or pipe, which the rename would replace instead of writing to.
void check_output_file(const fs::path& file) {
  std::error_code ec;
  const fs::file_status status = fs::status(file, ec);
  if (fs::exists(status) && !fs::is_regular_file(status)) {
    throw InputError(
        file.string(), 0, "--out",
        std::string(fs::is_directory(status) ? "is a folder" : "is not a regular file") +
            "; give the name of a file to write");
  }
}

}  // namespace

// Writes one CSV to standard output (`out` empty or "-") or, whole or not at all, to the file
// `out` names.
void write_csv_to(const std::string& out, const std::function<void(std::ostream&)>& write) {
  if (out.empty() || out == "-") {
    write(std::cout);
    return;
  }
  const fs::path file(out);
  check_output_file(file);
  OutputFolder folder(file.parent_path().empty() ? fs::path(".") : file.parent_path());
  write(folder.open(file.filename().string()));
  folder.commit();
}

void print_retired_report(std::ostream& out, const OutputFolder& folder) {
  const auto& removed = folder.removed();
  if (std::find(removed.begin(), removed.end(), kReportFile) == removed.end()) return;
  out << "removed " << (folder.dir() / kReportFile).string()
      << ", drawn from the earlier results; gutterwatt report " << folder.dir().string()
      << " draws one from these\n";
}

}  // namespace gutterwatt
