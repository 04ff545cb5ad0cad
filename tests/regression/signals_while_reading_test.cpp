// A signal while a record is read stops the command promptly with status 130 (issue 14, item 5).
// The record comes through a named pipe that the test fills 64 KiB at a time, so the reading is
// still going on when the signal arrives, however fast the reader.

#include <fcntl.h>
#include <gtest/gtest.h>
#include <signal.h>
#include <sys/stat.h>
#include <unistd.h>

#include <chrono>
#include <filesystem>
#include <optional>
#include <string>
#include <thread>
#include <vector>

#include "cli_support.hpp"
#include "gutterwatt/calendar.hpp"

namespace fs = std::filesystem;
using namespace gutterwatt::cli_support;

namespace {

// Invented rows of 10-minute rain from 2025-06-01, `bytes` of them or a little more.
std::string rows(std::size_t& row, std::size_t bytes) {
  std::string text;
  const gutterwatt::Instant start = 1748736000;  // 2025-06-01T00:00Z
  while (text.size() < bytes) {
    ++row;
    text += gutterwatt::format_iso8601(start + static_cast<gutterwatt::Instant>(row) * 600) +
            (row % 5 == 0 ? ",0.4\n" : ",0\n");
  }
  return text;
}

// Starts `args` on the fixture site with its rain file a named pipe, feeds 1 MiB of record,
// signals SIGINT and keeps feeding 64 KiB every 20 ms: the command must end within 2 s with
// status 130 and the interrupted message, having printed nothing on stdout.
void expect_prompt_stop_while_reading(const std::string& name, std::vector<std::string> args) {
  ::signal(SIGPIPE, SIG_IGN);  // the pipe's reader goes away while the test still writes
  const fs::path site = fixture_site(name);
  const fs::path pipe = site / "rain-10min.csv";
  fs::remove(pipe);
  ASSERT_EQ(::mkfifo(pipe.c_str(), 0600), 0);
  for (std::string& a : args) {
    if (a == "SCENARIO") a = (site / "shed.yaml").string();
    if (a == "OUT") a = (site / "out").string();
  }
  Child child(args, site);
  ASSERT_TRUE(child.started());
  int fd = -1;
  const auto deadline = std::chrono::steady_clock::now() + std::chrono::seconds(30);
  while (fd < 0 && std::chrono::steady_clock::now() < deadline &&
         !child.wait_for(std::chrono::milliseconds(0))) {
    fd = ::open(pipe.c_str(), O_WRONLY | O_NONBLOCK);  // fails until the reader has opened it
    if (fd < 0) std::this_thread::sleep_for(std::chrono::milliseconds(2));
  }
  ASSERT_GE(fd, 0) << "the command never opened the record: " << child.outcome().err;
  ::fcntl(fd, F_SETFL, 0);
  std::size_t row = 0;
  const auto feed = [&](std::size_t bytes) {
    const std::string text = rows(row, bytes);
    return ::write(fd, text.data(), text.size()) == static_cast<ssize_t>(text.size());
  };
  const std::string header = "time,rain_mm\n";
  ASSERT_EQ(::write(fd, header.data(), header.size()), static_cast<ssize_t>(header.size()));
  ASSERT_TRUE(feed(1 << 20));
  const auto sent = std::chrono::steady_clock::now();
  child.signal(SIGINT);
  std::optional<int> status;
  while (!status && std::chrono::steady_clock::now() - sent < std::chrono::seconds(10)) {
    feed(64 << 10);
    status = child.wait_for(std::chrono::milliseconds(20));
  }
  ::close(fd);
  // Prompt means: it stopped while the record was still coming, not at its end. The 10 s is only
  // a guard against a hang; no timing is asserted (a busy machine must not fail the test).
  ASSERT_TRUE(status) << "still reading 10 s after SIGINT";
  EXPECT_EQ(*status, 130) << child.outcome().err;
  EXPECT_EQ(child.outcome().out, "");
  EXPECT_EQ(child.outcome().err,
            "gutterwatt: error: interrupted; earlier results in the output folder are "
            "untouched\n");
}

}  // namespace

TEST(SignalsWhileReading, SigintStopsCheckWhileItReadsTheRecord) {
  expect_prompt_stop_while_reading("signal-check", {"check", "SCENARIO"});
}

TEST(SignalsWhileReading, SigintStopsSweepWhileItReadsTheRecord) {
  expect_prompt_stop_while_reading(
      "signal-sweep",
      {"sweep", "SCENARIO", "--vary", "roof.area_m2=30,40", "--quiet", "--out", "OUT"});
}

TEST(SignalsWhileReading, SigintStopsARunWhileItReadsTheRecord) {
  expect_prompt_stop_while_reading("signal-run", {"run", "SCENARIO", "--quiet", "--out", "OUT"});
}
