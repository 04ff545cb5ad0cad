#include "gutterwatt/interpolation.hpp"

#include <cassert>

namespace gutterwatt {

UniformTable::UniformTable(double x0, double x1, int n, const std::function<double(double)>& f)
    : x0_(x0), x1_(x1), per_step_(n / (x1 - x0)) {
  assert(n >= 1 && x1 > x0);
  const double step = (x1 - x0) / n;
  values_.resize(static_cast<std::size_t>(n) + 3);
  for (int k = -1; k <= n + 1; ++k) values_[static_cast<std::size_t>(k + 1)] = f(x0 + k * step);
}

}  // namespace gutterwatt
