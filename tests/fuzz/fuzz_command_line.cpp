// libFuzzer target: the command line's argument handling (parse_command_line, every subcommand's
// options) on arbitrary arguments, without running anything or touching a file.
//
// Input: the arguments after the program's name, each ended by a NUL byte
// (`run\0demo.yaml\0--set\0roof.area_m2=3`). Any exception, a broken promise of the result
// (command_line.hpp) or a sanitizer report is a crash.

#include <cstddef>
#include <cstdint>
#include <string>
#include <string_view>
#include <vector>

#include "../../src/cli/command_line.hpp"
#include "../../src/detail.hpp"
#include "fuzz_checks.hpp"

namespace {

using gutterwatt::fuzz::require;

// A line for a person's terminal: no control characters, no bytes that are not UTF-8.
void check_printable(std::string_view text, const char* promise) {
  require(!gutterwatt::detail::first_non_utf8(text), promise);
  for (const char c : text) require(static_cast<unsigned char>(c) >= 0x20 && c != 0x7F, promise);
}

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  using namespace gutterwatt;
  const std::string_view all(reinterpret_cast<const char*>(data), size);
  std::vector<std::string> args = {"gutterwatt"};
  for (std::size_t at = 0; at < all.size();) {
    const std::size_t nul = all.find('\0', at);
    args.emplace_back(all.substr(at, nul == all.npos ? all.npos : nul - at));
    at = nul == all.npos ? all.size() : nul + 1;
  }
  std::vector<const char*> argv;
  for (const std::string& a : args) argv.push_back(a.c_str());
  argv.push_back(nullptr);

  const CommandLine cl = parse_command_line(static_cast<int>(args.size()), argv.data());
  if (cl.command != Command::none) {
    require(cl.status == 0 && cl.error.empty() && cl.out.empty(),
            "a command to run carries no message");
    if (cl.command == Command::sweep) {
      require(!cl.sweep.vary.empty(), "a sweep varies something");
    }
    if (cl.command == Command::merge) {
      require(!cl.merge.out.empty() && !cl.merge.shards.empty(), "a merge has shards and a folder");
    }
    return 0;
  }
  require(cl.status == 0 || cl.status == 2, "nothing to run: exit 0 (help, version) or 2");
  if (cl.status == 2) {
    require(!cl.error.empty(), "a bad command line says what is wrong");
    check_printable(cl.error, "a command-line error is one printable line");
  } else {
    require(!cl.out.empty(), "help and version print something");
  }
  check_printable(one_line(all), "one_line leaves one printable line");
  return 0;
}
