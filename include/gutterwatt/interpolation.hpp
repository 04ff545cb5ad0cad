#pragma once
/// Tables of smooth functions solved once and read back cheaply on the solver's hot path.

#include <array>
#include <cstddef>
#include <functional>
#include <string_view>
#include <vector>

namespace gutterwatt {

/// A function tabulated at uniformly spaced nodes x0 + k h, k = -1 .. n + 1, over [x0, x1], and
/// read back by 4-point Lagrange (cubic) interpolation through the nodes around x: exact for
/// cubics, error O(h^4 f'''') for smooth f (Abramowitz & Stegun 1964, 25.2.13). Each cell's
/// cubic is stored in powers of the local coordinate, so a read is one Horner evaluation.
class UniformTable {
 public:
  UniformTable() = default;
  /// Tabulates `f` with `n` (>= 1) cells over [x0, x1] (x1 > x0); f is also evaluated one node
  /// beyond each end.
  UniformTable(double x0, double x1, int n, const std::function<double(double)>& f);

  /// True when x lies in [x0, x1] (and the table is not empty).
  bool covers(double x) const { return !cells_.empty() && x >= x0_ && x <= x1_; }

  /// The interpolated value; x must be covered. Inline: it runs at every solver stage.
  double operator()(double x) const {
    const double u = (x - x0_) * per_step_;
    const auto k = u < last_cell_ ? static_cast<std::size_t>(u) : cells_.size() - 1;
    const double t = u - static_cast<double>(k);
    const Cell& c = cells_[k];
    return c[0] + t * (c[1] + t * (c[2] + t * c[3]));
  }

 private:
  /// The cubic through the nodes -1, 0, 1, 2 around a cell, in powers of t in [0, 1].
  using Cell = std::array<double, 4>;

  double x0_ = 0.0;
  double x1_ = -1.0;
  double per_step_ = 0.0;
  double last_cell_ = 0.0;   ///< index of the last cell, as a double
  std::vector<Cell> cells_;  ///< one per cell [x0 + k h, x0 + (k + 1) h], k = 0 .. n - 1
};

/// UniformTable(x0, x1, n, f), built once per process for each distinct table and copied from
/// there after: `name` names f and `figures` holds every figure f depends on (beyond x0, x1 and
/// n), which the caller must list in full. A run builds its reservoir's and plant's tables for
/// the run, again for the design's figures and for a cycle's energy, and a sweep for every
/// combination (issue 16). The last few distinct tables are kept; safe to call from several
/// threads.
UniformTable shared_table(std::string_view name, std::vector<double> figures, double x0, double x1,
                          int n, const std::function<double(double)>& f);

}  // namespace gutterwatt
