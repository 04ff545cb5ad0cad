#pragma once
/// A rain record handed from a reading thread to the simulation while it is still being read, so
/// that reading and simulating a long record share the machine's cores.

#include <condition_variable>
#include <cstddef>
#include <exception>
#include <limits>
#include <mutex>
#include <span>
#include <vector>

#include "gutterwatt/rain_input.hpp"

namespace gutterwatt {

/// No time before this instant: a record final before it is not final anywhere.
inline constexpr Instant kNeverFinal = std::numeric_limits<Instant>::min();
/// Every time is before this instant: a complete record is final before it.
inline constexpr Instant kAllFinal = std::numeric_limits<Instant>::max();

/// What passes between the two threads. The reader publishes the record read so far; the
/// simulation takes it through a RainView. The record is "final before T" when no later
/// publication adds a pulse that starts before T or changes a covered span before T.
class RainFeed {
 public:
  /// Thrown in the reader by publish() once the consumer has cancelled: it stops reading.
  struct Cancelled {};

  /// Published pulses not yet taken at which the reader waits.
  static constexpr std::size_t kMaxBacklog = 1 << 14;

  explicit RainFeed(GapPolicy policy) : policy_(policy) {}
  RainFeed(const RainFeed&) = delete;
  RainFeed& operator=(const RainFeed&) = delete;

  GapPolicy policy() const { return policy_; }

  /// Reader: `so_far` is the record read so far, append-only between calls (new pulses at the
  /// end; covered spans appended, the last one possibly extended). It is final before the end of
  /// its last covered span. Waits while kMaxBacklog pulses are published but not taken, so that
  /// a reader ahead of the simulation does not hold a second copy of the record. Throws
  /// Cancelled after cancel().
  void publish(const RainSeries& so_far);
  /// Reader: the record is complete; `whole` is all of it.
  void finish(const RainSeries& whole);
  /// Reader: reading failed; the consumer's next wait rethrows `error`.
  void fail(std::exception_ptr error);

  /// Consumer: stop the reader at its next publication.
  void cancel();
  /// Consumer: it takes nothing more; the reader reads on without waiting or keeping pulses.
  void stop_taking();
  /// The reader's error, once it has failed (null otherwise).
  std::exception_ptr error() const;

 private:
  friend class RainView;
  /// Waits until the record is final before `t`, complete or failed (rethrows the error), then
  /// appends the pulses published since the last call to `pulses` and brings `covered` up to date.
  /// Returns the time before which the record is final (kAllFinal once complete).
  Instant take(Instant t, std::vector<RainPulse>& pulses, std::vector<TimeSpan>& covered);
  /// Under the lock: queues the pulses of `read` not yet published, unless nobody takes them.
  void append_new_pulses(const RainSeries& read);

  const GapPolicy policy_;
  mutable std::mutex mutex_;
  std::condition_variable changed_;
  std::vector<RainPulse> pending_;  ///< published, not yet taken
  std::size_t published_pulses_ = 0;
  std::vector<TimeSpan> covered_;  ///< all covered spans published
  Instant final_before_ = kNeverFinal;
  bool cancelled_ = false;
  bool taking_ = true;
  std::exception_ptr error_;
};

/// The simulation's window on a rain record: whole and in memory, or arriving through a
/// RainFeed. It keeps only the pulses not yet passed.
class RainView {
 public:
  explicit RainView(const RainSeries& whole);
  explicit RainView(RainFeed& feed);

  GapPolicy policy() const { return policy_; }
  /// Waits until the record is final before `t` (at once for a whole record); rethrows the
  /// reader's error.
  void need(Instant t);
  /// Waits until the record holds some data or is complete.
  void need_data();
  Instant final_before() const { return final_before_; }
  bool complete() const { return final_before_ == kAllFinal; }
  /// Covered spans known so far, sorted; all but the last are final.
  const std::vector<TimeSpan>& covered() const { return whole_ ? whole_->covered : covered_; }
  /// The known pulses that end after `t`, in order; `t` may not decrease from call to call. The
  /// span lasts until the next call of need() or pulses_from().
  std::span<const RainPulse> pulses_from(Instant t);

 private:
  const RainSeries* whole_ = nullptr;
  RainFeed* feed_ = nullptr;
  GapPolicy policy_;
  std::vector<RainPulse> pulses_;  ///< from the feed: the pulses not yet passed, and some before
  std::vector<TimeSpan> covered_;  ///< from the feed
  std::size_t first_ = 0;          ///< first pulse that ends after the last `t` asked about
  Instant final_before_ = kNeverFinal;
};

}  // namespace gutterwatt
