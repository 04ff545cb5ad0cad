#include "gutterwatt/interpolation.hpp"

#include <algorithm>
#include <cassert>
#include <deque>
#include <mutex>
#include <string>

namespace gutterwatt {

UniformTable::UniformTable(double x0, double x1, int n, const std::function<double(double)>& f)
    : x0_(x0), x1_(x1), per_step_(n / (x1 - x0)) {
  assert(n >= 1 && x1 > x0);
  const double step = (x1 - x0) / n;
  std::vector<double> f_at(static_cast<std::size_t>(n) + 3);
  for (int k = -1; k <= n + 1; ++k) f_at[static_cast<std::size_t>(k + 1)] = f(x0 + k * step);
  last_cell_ = n - 1;
  cells_.resize(static_cast<std::size_t>(n));
  for (std::size_t k = 0; k < cells_.size(); ++k) {
    // The Lagrange cubic through f(-1), f(0), f(1), f(2), expanded in powers of t.
    const double* v = &f_at[k];
    cells_[k] = {v[1], -v[0] / 3.0 - v[1] / 2.0 + v[2] - v[3] / 6.0, v[0] / 2.0 - v[1] + v[2] / 2.0,
                 (v[3] - v[0]) / 6.0 + (v[1] - v[2]) / 2.0};
  }
}

namespace {

// How many distinct tables shared_table keeps: a run's few, and a sweep's over a geometry key
// without holding megabytes (a 4096-cell table is 128 KiB).
constexpr std::size_t kKeptTables = 8;

struct KeptTable {
  std::string name;
  std::vector<double> key;  // the figures, then x0, x1 and n
  UniformTable table;
};

}  // namespace

UniformTable shared_table(std::string_view name, std::vector<double> figures, double x0, double x1,
                          int n, const std::function<double(double)>& f) {
  static std::mutex mutex;
  static std::deque<KeptTable> kept;
  figures.insert(figures.end(), {x0, x1, static_cast<double>(n)});
  const auto same = [&](const KeptTable& t) { return t.name == name && t.key == figures; };
  {
    const std::lock_guard<std::mutex> lock(mutex);
    for (const KeptTable& t : kept) {
      if (same(t)) return t.table;
    }
  }
  UniformTable table(x0, x1, n, f);  // outside the lock: another thread may build another
  const std::lock_guard<std::mutex> lock(mutex);
  if (std::none_of(kept.begin(), kept.end(), same)) {
    kept.push_back({std::string(name), std::move(figures), table});
    if (kept.size() > kKeptTables) kept.pop_front();
  }
  return table;
}

}  // namespace gutterwatt
