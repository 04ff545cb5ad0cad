#include "gutterwatt/interpolation.hpp"

#include <cassert>

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

}  // namespace gutterwatt
