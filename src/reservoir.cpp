#include "gutterwatt/reservoir.hpp"

#include <algorithm>
#include <cmath>

#include "gutterwatt/hydraulics.hpp"

namespace gutterwatt {

double circular_segment_area_m2(double radius_m, double depth_m) {
  // Area of a circular segment of height h: r^2 acos((r-h)/r) - (r-h) sqrt(2rh - h^2)
  // (standard plane geometry; e.g. CRC Standard Mathematical Tables, "circular segment").
  const double h = std::clamp(depth_m, 0.0, 2.0 * radius_m);
  const double r = radius_m;
  const double d = r - h;
  return r * r * std::acos(std::clamp(d / r, -1.0, 1.0)) -
         d * std::sqrt(std::max(0.0, 2.0 * r * h - h * h));
}

namespace {

double segment_width_m(double radius_m, double depth_m) {
  const double h = std::clamp(depth_m, 0.0, 2.0 * radius_m);
  return 2.0 * std::sqrt(std::max(0.0, 2.0 * radius_m * h - h * h));
}

}  // namespace

ReservoirGeometry::ReservoirGeometry(const ReservoirConfig& config)
    : shape_(config.shape),
      width_m_(config.width_m),
      length_m_(config.length_m),
      rim_m_(config.rim_m),
      weir_coefficient_(config.overflow_coefficient),
      weir_length_m_(config.overflow_length_m > 0.0 ? config.overflow_length_m : config.length_m),
      levels_m_(config.table_level_m),
      areas_m2_(config.table_area_m2) {
  if (shape_ == ReservoirShape::table) {
    volumes_m3_.assign(levels_m_.size(), 0.0);
    for (std::size_t k = 1; k < levels_m_.size(); ++k) {
      volumes_m3_[k] = volumes_m3_[k - 1] +
                       0.5 * (areas_m2_[k - 1] + areas_m2_[k]) * (levels_m_[k] - levels_m_[k - 1]);
    }
  }
  if (shape_ == ReservoirShape::half_round) {
    const double r = 0.5 * width_m_;
    // The level at w = A^(2/3), analytic in w down to 0 (the first node mirrors w < 0).
    const double w_top = std::pow(circular_segment_area_m2(r, rim_m_), 2.0 / 3.0);
    shallow_table_ = UniformTable(0.0, w_top, 512, [this](double w) {
      const double h = solve_half_round_level_m(std::abs(w) * std::sqrt(std::abs(w)));
      return w < 0.0 ? -h : h;
    });
    // Above a shallow start the level is smooth in the volume: a uniform table in V serves there
    // without the cube root and the Newton step the shallow part needs.
    const double volume_table_start_m3 = circular_segment_area_m2(r, 0.1 * r) * length_m_;
    if (rim_m_ > 0.1 * r) {
      volume_table_ =
          UniformTable(volume_table_start_m3, circular_segment_area_m2(r, rim_m_) * length_m_, 4096,
                       [this](double v) { return solve_half_round_level_m(v / length_m_); });
    }
  }
  rim_area_m2_ = section_area_m2(rim_m_);
  rim_volume_m3_ = section_volume_m3(rim_m_);
}

double ReservoirGeometry::surface_area_m2(double level_m) const {
  return level_m >= rim_m_ ? rim_area_m2_ : section_area_m2(std::max(0.0, level_m));
}

double ReservoirGeometry::volume_m3(double level_m) const {
  const double h = std::max(0.0, level_m);
  return h > rim_m_ ? rim_volume_m3_ + (h - rim_m_) * rim_area_m2_ : section_volume_m3(h);
}

double ReservoirGeometry::section_area_m2(double h) const {
  switch (shape_) {
    case ReservoirShape::half_round:
      return segment_width_m(0.5 * width_m_, h) * length_m_;
    case ReservoirShape::rectangular:
      return width_m_ * length_m_;
    case ReservoirShape::table: {
      if (h >= levels_m_.back()) return areas_m2_.back();
      const auto it = std::upper_bound(levels_m_.begin(), levels_m_.end(), h);
      const std::size_t k = static_cast<std::size_t>(it - levels_m_.begin());
      const double f = (h - levels_m_[k - 1]) / (levels_m_[k] - levels_m_[k - 1]);
      return areas_m2_[k - 1] + f * (areas_m2_[k] - areas_m2_[k - 1]);
    }
  }
  return 0.0;
}

double ReservoirGeometry::section_volume_m3(double h) const {
  switch (shape_) {
    case ReservoirShape::half_round:
      return circular_segment_area_m2(0.5 * width_m_, h) * length_m_;
    case ReservoirShape::rectangular:
      return width_m_ * h * length_m_;
    case ReservoirShape::table: {
      if (h >= levels_m_.back())
        return volumes_m3_.back() + (h - levels_m_.back()) * areas_m2_.back();
      const auto it = std::upper_bound(levels_m_.begin(), levels_m_.end(), h);
      const std::size_t k = static_cast<std::size_t>(it - levels_m_.begin());
      const double dh = h - levels_m_[k - 1];
      const double slope = (areas_m2_[k] - areas_m2_[k - 1]) / (levels_m_[k] - levels_m_[k - 1]);
      return volumes_m3_[k - 1] + areas_m2_[k - 1] * dh + 0.5 * slope * dh * dh;
    }
  }
  return 0.0;
}

double ReservoirGeometry::level_m(double volume_m3) const {
  const double v = std::max(0.0, volume_m3);
  if (v == 0.0) return 0.0;
  if (v >= rim_volume_m3_) return rim_m_ + (v - rim_volume_m3_) / rim_area_m2_;
  switch (shape_) {
    case ReservoirShape::rectangular:
      return v / (width_m_ * length_m_);
    case ReservoirShape::table: {
      const auto it = std::upper_bound(volumes_m3_.begin(), volumes_m3_.end(), v);
      if (it == volumes_m3_.end())
        return levels_m_.back() + (v - volumes_m3_.back()) / areas_m2_.back();
      const std::size_t k = static_cast<std::size_t>(it - volumes_m3_.begin());
      const double a0 = areas_m2_[k - 1];
      const double slope = (areas_m2_[k] - a0) / (levels_m_[k] - levels_m_[k - 1]);
      const double dv = v - volumes_m3_[k - 1];
      // Solve a0 dh + slope dh^2 / 2 = dv in the cancellation-free form.
      const double dh = 2.0 * dv / (a0 + std::sqrt(a0 * a0 + 2.0 * slope * dv));
      return levels_m_[k - 1] + dh;
    }
    case ReservoirShape::half_round:
      break;
  }
  if (volume_table_.covers(v)) return volume_table_(v);
  // Half-round, shallow: the level is an analytic function of w = A^(2/3) (A ~ (4/3) sqrt(2r)
  // h^1.5 for h << r), tabulated once; one Newton step on A(h) = A polishes the value.
  const double r = 0.5 * width_m_;
  const double area = v / length_m_;
  const double w = std::cbrt(area) * std::cbrt(area);
  double h = shallow_table_(w);
  h = std::clamp(h, 0.0, rim_m_);
  const double width = segment_width_m(r, h);
  if (width > 0.0) h -= (circular_segment_area_m2(r, h) - area) / width;
  return std::clamp(h, 0.0, rim_m_);
}

double ReservoirGeometry::solve_half_round_level_m(double area_m2) const {
  // Newton on A(h) = area, bracketed in [0, 2r]; start from the shallow-segment approximation.
  const double r = 0.5 * width_m_;
  double lo = 0.0;
  double hi = 2.0 * r;
  const double guess = std::cbrt(3.0 * area_m2 / (4.0 * std::sqrt(2.0 * r)));
  double h = std::min(hi, guess * guess);
  for (int iter = 0; iter < 100; ++iter) {
    const double f = circular_segment_area_m2(r, h) - area_m2;
    if (f > 0.0) {
      hi = h;
    } else {
      lo = h;
    }
    const double width = segment_width_m(r, h);
    double next = width > 0.0 ? h - f / width : 0.5 * (lo + hi);
    if (!(next > lo && next < hi)) next = 0.5 * (lo + hi);
    if (std::abs(next - h) <= 1e-15 * r) return next;
    h = next;
  }
  return h;
}

double ReservoirGeometry::overflow_m3_per_s(double level_m) const {
  // Weir over the rim, Q = C L h^1.5: the broad-crested/sharp-crested weir form with a lumped
  // coefficient C = Cd (2/3)^1.5 sqrt(g) ~ 1.7 m^0.5/s (ISO 3846; Bos 1989).
  return weir_flow_m3_per_s(weir_coefficient_, weir_length_m_, level_m - rim_m_);
}

}  // namespace gutterwatt
