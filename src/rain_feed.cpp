#include "gutterwatt/rain_feed.hpp"

#include <algorithm>

namespace gutterwatt {

namespace {

// Brings `to` up to `from`, which only appends spans and extends its last one.
void update_covered(std::vector<TimeSpan>& to, const std::vector<TimeSpan>& from) {
  const std::size_t keep = to.empty() ? 0 : to.size() - 1;
  to.resize(keep);
  to.insert(to.end(), from.begin() + static_cast<std::ptrdiff_t>(keep), from.end());
}

// Passed pulses are dropped once they are this many and at least half the buffer.
constexpr std::size_t kCompactAfter = 4096;

}  // namespace

void RainFeed::append_new_pulses(const RainSeries& read) {
  if (taking_) {
    pending_.insert(pending_.end(),
                    read.pulses.begin() + static_cast<std::ptrdiff_t>(published_pulses_),
                    read.pulses.end());
  }
  published_pulses_ = read.pulses.size();
}

void RainFeed::publish(const RainSeries& so_far) {
  {
    std::unique_lock lock(mutex_);
    changed_.wait(lock, [&] { return cancelled_ || !taking_ || pending_.size() < kMaxBacklog; });
    if (cancelled_) throw Cancelled{};
    append_new_pulses(so_far);
    update_covered(covered_, so_far.covered);
    if (!covered_.empty()) final_before_ = std::max(final_before_, covered_.back().end);
  }
  changed_.notify_all();
}

void RainFeed::finish(const RainSeries& whole) {
  {
    std::lock_guard lock(mutex_);
    append_new_pulses(whole);
    covered_ = whole.covered;
    final_before_ = kAllFinal;
  }
  changed_.notify_all();
}

void RainFeed::fail(std::exception_ptr error) {
  {
    std::lock_guard lock(mutex_);
    error_ = std::move(error);
  }
  changed_.notify_all();
}

void RainFeed::cancel() {
  {
    std::lock_guard lock(mutex_);
    cancelled_ = true;
  }
  changed_.notify_all();
}

void RainFeed::stop_taking() {
  {
    std::lock_guard lock(mutex_);
    taking_ = false;
    pending_ = {};
  }
  changed_.notify_all();
}

std::exception_ptr RainFeed::error() const {
  std::lock_guard lock(mutex_);
  return error_;
}

Instant RainFeed::take(Instant t, std::vector<RainPulse>& pulses, std::vector<TimeSpan>& covered) {
  std::unique_lock lock(mutex_);
  for (;;) {
    // What is published is taken at once, which also frees a reader waiting on the backlog.
    if (pulses.empty()) {
      pulses.swap(pending_);  // the two buffers take turns, so memory holds one backlog
    } else {
      pulses.insert(pulses.end(), pending_.begin(), pending_.end());
    }
    pending_.clear();
    changed_.notify_all();
    if (error_) std::rethrow_exception(error_);
    if (final_before_ >= t) break;
    changed_.wait(lock);
  }
  update_covered(covered, covered_);
  return final_before_;
}

RainView::RainView(const RainSeries& whole)
    : whole_(&whole), policy_(whole.policy), final_before_(kAllFinal) {}

RainView::RainView(RainFeed& feed) : feed_(&feed), policy_(feed.policy()) {}

void RainView::need(Instant t) {
  if (final_before_ >= t) return;
  final_before_ = feed_->take(t, pulses_, covered_);
}

void RainView::need_data() {
  while (covered().empty() && !complete()) {
    need(final_before_ + 1);
  }
}

std::span<const RainPulse> RainView::pulses_from(Instant t) {
  const std::vector<RainPulse>& all = whole_ ? whole_->pulses : pulses_;
  while (first_ < all.size() && all[first_].end <= t) ++first_;
  if (!whole_ && first_ == pulses_.size()) {
    pulses_.clear();
    first_ = 0;
  } else if (!whole_ && first_ >= kCompactAfter && 2 * first_ >= pulses_.size()) {
    pulses_.erase(pulses_.begin(), pulses_.begin() + static_cast<std::ptrdiff_t>(first_));
    first_ = 0;
  }
  return std::span<const RainPulse>(all).subspan(first_);
}

}  // namespace gutterwatt
