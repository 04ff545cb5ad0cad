#pragma once
// One output file of a command, written whole or not at all.

#include <functional>
#include <ostream>
#include <string>

namespace gutterwatt {

/// Writes one file to standard output (`out` empty or "-") or, through a temporary renamed into
/// place, to the file `out` names. Throws InputError naming `--out` when `out` is a folder, a
/// device or a pipe (which the rename would replace instead of writing to).
void write_csv_to(const std::string& out, const std::function<void(std::ostream&)>& write);

}  // namespace gutterwatt
