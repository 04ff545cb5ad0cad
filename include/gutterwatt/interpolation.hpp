#pragma once
/// Tables of smooth functions solved once and read back cheaply on the solver's hot path.

#include <cstddef>
#include <functional>
#include <vector>

namespace gutterwatt {

/// A function tabulated at uniformly spaced nodes x0 + k h, k = -1 .. n + 1, over [x0, x1], and
/// read back by 4-point Lagrange (cubic) interpolation through the nodes around x: exact for
/// cubics, error O(h^4 f'''') for smooth f (Abramowitz & Stegun 1964, 25.2.13).
class UniformTable {
 public:
  UniformTable() = default;
  /// Tabulates `f` with `n` (>= 1) cells over [x0, x1] (x1 > x0); f is also evaluated one node
  /// beyond each end.
  UniformTable(double x0, double x1, int n, const std::function<double(double)>& f);

  /// True when x lies in [x0, x1] (and the table is not empty).
  bool covers(double x) const { return !values_.empty() && x >= x0_ && x <= x1_; }

  /// The interpolated value; x must be covered. Inline: it runs at every solver stage.
  double operator()(double x) const {
    const double u = (x - x0_) * per_step_;
    const std::size_t last_cell = values_.size() - 4;
    const auto k = u < static_cast<double>(last_cell) ? static_cast<std::size_t>(u) : last_cell;
    // Lagrange basis on the nodes -1, 0, 1, 2 around the cell [k, k + 1], t in [0, 1].
    const double t = u - static_cast<double>(k);
    const double* f = &values_[k];
    const double a = t + 1.0, b = t - 1.0, c = t - 2.0;
    return (-t * b * c * f[0] + 3.0 * a * b * c * f[1] - 3.0 * a * t * c * f[2] +
            a * t * b * f[3]) /
           6.0;
  }

 private:
  double x0_ = 0.0;
  double x1_ = -1.0;
  double per_step_ = 0.0;
  std::vector<double> values_;  ///< f at x0 + (k - 1) h, k = 0 .. n + 2
};

}  // namespace gutterwatt
