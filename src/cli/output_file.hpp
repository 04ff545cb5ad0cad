#pragma once
// One output file of a command, written whole or not at all.

#include <functional>
#include <ostream>
#include <string>

#include "gutterwatt/output_folder.hpp"

namespace gutterwatt {

/// After `folder`'s commit: the line saying that an earlier report.html went with the results it
/// was drawn from, and how to draw one from the new ones, or nothing when there was none.
void print_retired_report(std::ostream& out, const OutputFolder& folder);

/// Writes one file to standard output (`out` empty or "-") or, through a temporary renamed into
/// place, to the file `out` names. Throws InputError naming `--out` when `out` is a folder, a
/// device or a pipe (which the rename would replace instead of writing to).
void write_csv_to(const std::string& out, const std::function<void(std::ostream&)>& write);

}  // namespace gutterwatt
