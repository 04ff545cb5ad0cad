#pragma once
/// Error types of gutterwatt. Library code throws; only the command line catches and exits.

#include <stdexcept>
#include <string>

namespace gutterwatt {

/// Base of every error the library throws.
class Error : public std::runtime_error {
 public:
  using std::runtime_error::runtime_error;
};

/// Bad input: a file, a line (0 when there is none) and a field (empty when there is none).
/// what() reads `file:line: field: message`, leaving out the parts that are absent.
class InputError : public Error {
 public:
  InputError(std::string file, int line, std::string field, std::string message);

  const std::string& file() const { return file_; }
  int line() const { return line_; }
  const std::string& field() const { return field_; }
  const std::string& message() const { return message_; }
  /// The whole text, as what() reads it but whole even when a message quotes a NUL byte.
  std::string text() const;

 private:
  std::string file_;
  int line_;
  std::string field_;
  std::string message_;
};

/// The simulation could not go on, or its accounts do not close; the message carries the
/// simulated time, the mode and the state.
class SimulationError : public Error {
 public:
  using Error::Error;
};

/// The run was interrupted by a signal (SIGINT, SIGTERM) before it finished.
class Interrupted : public Error {
 public:
  Interrupted() : Error("interrupted") {}
};

}  // namespace gutterwatt
