#include "gutterwatt/rain_files.hpp"

#include <algorithm>
#include <fstream>
#include <numeric>
#include <optional>
#include <thread>

#include "gutterwatt/disaggregation.hpp"
#include "gutterwatt/error.hpp"
#include "gutterwatt/fragments.hpp"

namespace gutterwatt {

RainSeries join_rain(std::vector<RainSeries> parts, const std::vector<std::string>& labels) {
  if (parts.size() == 1) return std::move(parts.front());
  std::vector<std::size_t> order(parts.size());
  std::iota(order.begin(), order.end(), 0);
  const auto first = [&](std::size_t k) {
    return parts[k].covered.empty() ? Instant{0} : parts[k].covered.front().start;
  };
  std::sort(order.begin(), order.end(),
            [&](std::size_t a, std::size_t b) { return first(a) < first(b); });
  RainSeries out;
  out.policy = parts.front().policy;
  const char* const gap_fate =
      out.policy == GapPolicy::zero ? ", counted as dry" : ", left out of the simulation";
  std::size_t previous = order.front();
  for (std::size_t n = 0; n < order.size(); ++n) {
    const std::size_t k = order[n];
    RainSeries& p = parts[k];
    if (p.covered.empty()) continue;
    if (!out.covered.empty() && p.covered.front().start < out.covered.back().end) {
      throw InputError(labels[k], 0, "rain.files",
                       "overlaps " + labels[previous] + " from " +
                           format_iso8601(p.covered.front().start) + " to " +
                           format_iso8601(std::min(out.covered.back().end, p.covered.back().end)) +
                           " (UTC); each period must come from one file");
    }
    if (!out.covered.empty() && p.covered.front().start > out.covered.back().end) {
      const TimeSpan gap{out.covered.back().end, p.covered.front().start};
      const std::string text = "gap between the files from " + format_iso8601(gap.start) + " to " +
                               format_iso8601(gap.end) + " (UTC, " +
                               format_duration(gap.end - gap.start) + ") after " + labels[previous];
      if (out.policy == GapPolicy::error) {
        throw InputError(labels[k], 0, "rain.files",
                         text +
                             "; set rain.gaps: zero to count gaps as dry, or rain.gaps: skip to "
                             "leave them out");
      }
      out.gaps.push_back(gap);
      out.warnings.push_back(labels[k] + ": " + text + gap_fate);
    }
    for (const TimeSpan& c : p.covered) {
      if (!out.covered.empty() && out.covered.back().end == c.start) {
        out.covered.back().end = c.end;
      } else {
        out.covered.push_back(c);
      }
    }
    out.pulses.insert(out.pulses.end(), p.pulses.begin(), p.pulses.end());
    out.gaps.insert(out.gaps.end(), p.gaps.begin(), p.gaps.end());
    out.step_s = out.step_s == 0 ? p.step_s : std::min(out.step_s, p.step_s);
    // Readers put the file in their own warnings; one said by several files is said once.
    for (std::string& w : p.warnings) {
      if (std::find(out.warnings.begin(), out.warnings.end(), w) == out.warnings.end()) {
        out.warnings.push_back(std::move(w));
      }
    }
    previous = k;
  }
  std::sort(out.gaps.begin(), out.gaps.end(),
            [](const TimeSpan& a, const TimeSpan& b) { return a.start < b.start; });
  out.total_depth_m = sum_depths_m(out.pulses);
  return out;
}

namespace {

// Bytes read between two looks at the stop flag.
constexpr std::size_t kStopCheckBytes = std::size_t{64} << 10;

// Opens `file` for reading, or throws naming it.
std::ifstream open_rain_file(const std::filesystem::path& file) {
  const std::string label = file.string();
  std::error_code ec;
  if (!std::filesystem::exists(file, ec)) {
    throw InputError(label, 0, "rain.file", "no such file");
  }
  if (std::filesystem::is_directory(file, ec)) {
    throw InputError(label, 0, "rain.file", "is a folder, not a file");
  }
  std::ifstream in(file, std::ios::binary);
  if (!in) throw InputError(label, 0, "rain.file", "cannot be read");
  return in;
}

// A stream buffer over another that ends the input once `stop` is set, looking at it every
// kStopCheckBytes; stopped() then tells a cut record from a whole one.
class StoppableBuf : public std::streambuf {
 public:
  StoppableBuf(std::streambuf& source, const std::atomic<bool>* stop)
      : source_(source), stop_(stop), buffer_(kStopCheckBytes) {}
  bool stopped() const { return stopped_; }

 protected:
  int_type underflow() override {
    if (stop_ != nullptr && stop_->load()) {
      stopped_ = true;
      return traits_type::eof();
    }
    const std::streamsize n =
        source_.sgetn(buffer_.data(), static_cast<std::streamsize>(buffer_.size()));
    if (n <= 0) return traits_type::eof();
    setg(buffer_.data(), buffer_.data(), buffer_.data() + n);
    return traits_type::to_int_type(buffer_.front());
  }

 private:
  std::streambuf& source_;
  const std::atomic<bool>* stop_;
  std::vector<char> buffer_;
  bool stopped_ = false;
};

// A rain file open for reading that stops soon after `stop` is set.
class RainFile {
 public:
  RainFile(const std::filesystem::path& file, const std::atomic<bool>* stop)
      : label_(file.string()),
        in_(open_rain_file(file)),
        buf_(*in_.rdbuf(), stop),
        stream_(&buf_) {}

  const std::string& label() const { return label_; }

  /// `read(stream, label)`'s result; Interrupted when the stop flag cut the reading short,
  /// whatever the reader made of the cut.
  template <class Read>
  auto read(Read&& read) {
    try {
      auto result = read(stream_, label_);
      if (buf_.stopped()) throw Interrupted();
      return result;
    } catch (const InputError&) {
      if (buf_.stopped()) throw Interrupted();
      throw;
    }
  }

 private:
  std::string label_;
  std::ifstream in_;
  StoppableBuf buf_;
  std::istream stream_;
};

}  // namespace

RainSeries load_rain_as_read(const RainConfig& config, const std::filesystem::path& override_file,
                             const std::atomic<bool>* stop) {
  std::vector<std::filesystem::path> files = config.files;
  if (!override_file.empty()) files = {override_file};
  if (files.empty()) throw InputError("", 0, "rain.file", "no rain file given");
  if (config.format == RainFormat::tips) {
    // The tips of several files are one stream: a file's first tip follows the last tip of
    // the file before it.
    std::vector<TipLog> logs;
    for (const std::filesystem::path& file : files) {
      logs.push_back(RainFile(file, stop).read([&](std::istream& in, const std::string& label) {
        return read_tip_log(in, label, config.series);
      }));
    }
    return spread_tips(logs, config.tips, config.series.gaps);
  }
  std::vector<RainSeries> parts;
  std::vector<std::string> labels;
  for (const std::filesystem::path& file : files) {
    parts.push_back(RainFile(file, stop).read([&](std::istream& in, const std::string& label) {
      return config.format == RainFormat::daily
                 ? read_rain_daily(in, label, config.series,
                                   config.disaggregate ? config.disaggregate->window : DayWindow{})
                 : read_rain_series(in, label, config.series);
    }));
    labels.push_back(file.string());
  }
  return join_rain(std::move(parts), labels);
}

namespace {

// A fragment library for each interval length of `as_read` longer than `step_s`, cut at the
// phase of the first interval of that length. A `series` record read on a clock with daylight
// saving has calendar days (23 or 25 h across a change: see read_rain_series); they count as
// 24 h and are cut on the same clock (library_length_s). `daily` records have days of standard
// time, 24 h each, and are cut in elapsed time.
std::vector<FragmentLibrary> fragment_libraries(const RainConfig& config, const RainSeries& as_read,
                                                const RainSeries& fine, Instant step_s) {
  std::optional<TimeZone> calendar;
  if (config.format == RainFormat::series && !config.series.zone.fixed()) {
    calendar = config.series.zone;
  }
  std::vector<FragmentLibrary> out;
  for (const RainPulse& p : as_read.pulses) {
    const Instant length_s = library_length_s(calendar, p.start, p.end);
    if (length_s <= step_s || std::any_of(out.begin(), out.end(), [&](const FragmentLibrary& l) {
          return l.length_s == length_s;
        })) {
      continue;
    }
    out.push_back(build_fragment_library(fine, length_s, p.start, step_s, calendar));
  }
  return out;
}

}  // namespace

std::optional<Disaggregation> calibrated_disaggregation(const RainConfig& config,
                                                        const RainSeries& as_read,
                                                        const std::atomic<bool>* stop) {
  if (!config.disaggregate) return config.disaggregate;
  Disaggregation how = *config.disaggregate;
  if (how.idf && how.method == DisaggregationMethod::cascade) {
    how.intermittency = fit_intermittency(as_read, how, *how.idf);
    return how;
  }
  if (!config.calibrate_with) return how;
  const CalibrationRecord& c = *config.calibrate_with;
  const std::string key = "rain.disaggregate.calibrate_with";
  std::error_code ec;
  if (!std::filesystem::is_regular_file(c.file, ec)) {
    throw InputError(c.file.string(), 0, key + ".file", "no such file");
  }
  const RainSeries fine =
      RainFile(c.file, stop).read([&](std::istream& in, const std::string& label) {
        return read_rain_series(in, label, c.format);
      });
  const std::string label = c.file.string();
  if (fine.step_s > how.step_s) {
    throw InputError(label, 0, key,
                     "the record's step (" + format_duration(fine.step_s) +
                         ") is coarser than rain.disaggregate.step (" +
                         format_duration(how.step_s) +
                         "): a calibration record must have the target step or a finer one");
  }
  const bool fragments = how.method == DisaggregationMethod::fragments;
  if (fragments && how.step_s % fine.step_s != 0) {
    throw InputError(label, 0, key,
                     "the record's step (" + format_duration(fine.step_s) +
                         ") does not divide rain.disaggregate.step (" +
                         format_duration(how.step_s) +
                         "): method: fragments adds the record up to the target step");
  }
  if (fine.pulses.empty()) {
    throw InputError(label, 0, key,
                     std::string("no interval with rain: a dry record cannot calibrate the ") +
                         (fragments ? "fragments" : "cascade"));
  }
  if (fragments) {
    how.fragments = fragment_libraries(config, as_read, fine, how.step_s);
    for (const FragmentLibrary& library : how.fragments) {
      if (library.intervals.empty()) {
        throw InputError(label, 0, key,
                         "no whole interval of " + format_duration(library.length_s) +
                             " with rain (the record's intervals of that length, as the "
                             "target record's are cut, are all dry or not covered in full); "
                             "give a longer record");
      }
    }
    return how;
  }
  Instant longest_s = 0;
  for (const RainPulse& p : as_read.pulses) longest_s = std::max(longest_s, p.end - p.start);
  how.levels = estimate_cascade(fine, std::max(longest_s, 2 * fine.step_s));
  if (how.levels.empty()) {
    throw InputError(label, 0, key,
                     "too few wet intervals: fewer than " + std::to_string(kMinCalibrationBoxes) +
                         " wet boxes of " + format_duration(2 * fine.step_s) +
                         " to estimate the cascade from; give a longer record");
  }
  return how;
}

RainSeries load_rain(const RainConfig& config, const std::filesystem::path& override_file,
                     const std::atomic<bool>* stop) {
  RainSeries as_read = load_rain_as_read(config, override_file, stop);
  const std::optional<Disaggregation> how = calibrated_disaggregation(config, as_read, stop);
  if (!how) return as_read;
  return disaggregate(as_read, *how);
}

RainSeries load_rain_while(const RainConfig& config, const std::filesystem::path& override_file,
                           const std::function<void(RainView&)>& consume,
                           const std::atomic<bool>* stop) {
  const bool one_series = config.format == RainFormat::series && !config.disaggregate &&
                          (!override_file.empty() || config.files.size() == 1);
  if (!one_series) {
    RainSeries whole = load_rain(config, override_file, stop);
    RainView view(whole);
    consume(view);
    return whole;
  }
  const std::filesystem::path file = override_file.empty() ? config.files.front() : override_file;
  RainFile rain_file(file, stop);
  RainFeed feed(config.series.gaps);
  std::optional<RainSeries> whole;
  std::thread reader([&] {
    try {
      whole = rain_file.read([&](std::istream& in, const std::string& label) {
        return read_rain_series(in, label, config.series,
                                [&](const RainSeries& so_far) { feed.publish(so_far); });
      });
      feed.finish(*whole);
    } catch (const RainFeed::Cancelled&) {
    } catch (...) {
      feed.fail(std::current_exception());
    }
  });
  // Lets the reader finish (the run may end before the record does) and throws its error.
  const auto finish_reading = [&] {
    feed.stop_taking();
    reader.join();
    if (const std::exception_ptr error = feed.error()) std::rethrow_exception(error);
  };
  try {
    RainView view(feed);
    consume(view);
  } catch (const Interrupted&) {
    feed.cancel();
    reader.join();
    throw;
  } catch (...) {
    finish_reading();
    throw;
  }
  finish_reading();
  return std::move(*whole);
}

}  // namespace gutterwatt
