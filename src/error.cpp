#include "gutterwatt/error.hpp"

#include <utility>

namespace gutterwatt {
namespace {

std::string format_input_error(const std::string& file, int line, const std::string& field,
                               const std::string& message) {
  std::string out;
  if (!file.empty()) {
    out += file;
    if (line > 0) out += ":" + std::to_string(line);
    out += ": ";
  }
  if (!field.empty()) out += field + ": ";
  out += message;
  return out;
}

}  // namespace

InputError::InputError(std::string file, int line, std::string field, std::string message)
    : Error(format_input_error(file, line, field, message)),
      file_(std::move(file)),
      line_(line),
      field_(std::move(field)),
      message_(std::move(message)) {}

std::string InputError::text() const { return format_input_error(file_, line_, field_, message_); }

}  // namespace gutterwatt
