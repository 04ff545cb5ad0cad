#include "gutterwatt/reservoir.hpp"

#include <algorithm>
#include <cmath>

#include "detail.hpp"
#include "gutterwatt/hydraulics.hpp"
#include "gutterwatt/units.hpp"

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

CrossSection CrossSection::trapezoid(double floor_width_m, double top_width_m, double depth_m) {
  return CrossSection(Kind::trapezoid, floor_width_m, top_width_m, depth_m);
}

CrossSection CrossSection::box(double width_m, double depth_m) {
  return trapezoid(width_m, width_m, depth_m);
}

CrossSection CrossSection::half_round(double diameter_m) {
  return CrossSection(Kind::circle, 0.0, diameter_m, 0.5 * diameter_m);
}

double CrossSection::top_width_m(double depth_m) const {
  const double y = std::clamp(depth_m, 0.0, depth_m_);
  if (kind_ == Kind::circle) return segment_width_m(depth_m_, y);
  // The walls of a trapezoid spread linearly from the floor to the top.
  return floor_width_m_ + (top_width_m_ - floor_width_m_) * y / depth_m_;
}

double CrossSection::area_m2(double depth_m) const {
  const double y = std::clamp(depth_m, 0.0, depth_m_);
  const double above = std::max(0.0, depth_m - depth_m_) * top_width_m_;
  if (kind_ == Kind::circle) return circular_segment_area_m2(depth_m_, y) + above;
  // Trapezoid: the mean of the floor width and the width at y, times y (plane geometry).
  return 0.5 * (floor_width_m_ + top_width_m(y)) * y + above;
}

double CrossSection::wetted_perimeter_m(double depth_m) const {
  const double y = std::clamp(depth_m, 0.0, depth_m_);
  const double above = 2.0 * std::max(0.0, depth_m - depth_m_);
  if (kind_ == Kind::circle) {
    // Arc length r theta with the central angle theta = 2 acos((r - y) / r) (plane geometry).
    const double r = depth_m_;
    return 2.0 * r * std::acos(std::clamp((r - y) / r, -1.0, 1.0)) + above;
  }
  // The floor and two sloping walls, each the hypotenuse over y and half the widening.
  const double spread = 0.5 * (top_width_m(y) - floor_width_m_);
  return floor_width_m_ + 2.0 * std::hypot(y, spread) + above;
}

double CrossSection::area_integral_m3_per_m(double depth_m) const {
  const double y = std::clamp(depth_m, 0.0, depth_m_);
  double integral = 0.0;
  if (kind_ == Kind::circle) {
    // With u = r - y: integral of the segment area = r^2 sqrt(r^2 - u^2) - r^2 u acos(u/r)
    // - (r^2 - u^2)^1.5 / 3, from the antiderivatives of acos and of u sqrt(r^2 - u^2)
    // (standard integral tables, e.g. CRC Standard Mathematical Tables).
    const double r = depth_m_;
    const double u = r - y;
    const double s2 = std::max(0.0, r * r - u * u);
    const double s = std::sqrt(s2);
    integral = r * r * s - r * r * u * std::acos(std::clamp(u / r, -1.0, 1.0)) - s2 * s / 3.0;
  } else {
    // Integral of b y + k y^2 / 2 with k = (top - floor) / depth.
    const double k = (top_width_m_ - floor_width_m_) / depth_m_;
    integral = 0.5 * floor_width_m_ * y * y + k * y * y * y / 6.0;
  }
  const double above = std::max(0.0, depth_m - depth_m_);
  return integral + area_m2(y) * above + 0.5 * top_width_m_ * above * above;
}

std::optional<CrossSection> k_style_section(double size_m) {
  // Trade K-style profiles: top width, floor width and depth of the 5-inch and 6-inch sizes
  // (common practice, no source); the metric sizes keep the same proportions.
  struct Profile {
    double size_m, floor_m, depth_m;
  };
  static const Profile kProfiles[] = {
      {5.0 * kMetresPerInch, 3.5 * kMetresPerInch, 3.375 * kMetresPerInch},
      {6.0 * kMetresPerInch, 4.25 * kMetresPerInch, 4.5 * kMetresPerInch},
      {0.125, 0.125 * 3.5 / 5.0, 0.125 * 3.375 / 5.0},
      {0.150, 0.150 * 4.25 / 6.0, 0.150 * 4.5 / 6.0},
  };
  for (const Profile& p : kProfiles) {
    if (std::abs(size_m - p.size_m) <= 1e-9) {
      return CrossSection::trapezoid(p.floor_m, p.size_m, p.depth_m);
    }
  }
  return std::nullopt;
}

bool is_level_gutter(const ReservoirConfig& c) {
  return c.shape != ReservoirShape::table && c.shape != ReservoirShape::tank && c.fall_m == 0.0;
}

CrossSection section_of(const ReservoirConfig& c) {
  switch (c.shape) {
    case ReservoirShape::half_round:
      return CrossSection::half_round(c.width_m);
    case ReservoirShape::k_style:
      if (const auto k = k_style_section(c.width_m)) return *k;
      break;
    case ReservoirShape::trapezoid:
      return CrossSection::trapezoid(c.floor_width_m, c.width_m, c.depth_m);
    case ReservoirShape::box:
    case ReservoirShape::rectangular:
    case ReservoirShape::table:
    case ReservoirShape::tank:
      break;
  }
  // A box's functions do not depend on its depth: without one, the rim (or any length) serves.
  const double depth_m = c.depth_m > 0.0 ? c.depth_m : c.rim_m > 0.0 ? c.rim_m : 1.0;
  return CrossSection::box(c.width_m, depth_m);
}

ReservoirGeometry::ReservoirGeometry(const ReservoirConfig& config)
    : kind_(Kind::level_trapezoid),
      section_(section_of(config)),
      length_m_(config.length_m),
      fall_m_(config.fall_m),
      rim_m_(config.rim_m),
      weir_coefficient_(config.overflow_coefficient),
      weir_length_m_(config.overflow_length_m > 0.0 ? config.overflow_length_m : config.length_m),
      levels_m_(config.table_level_m),
      areas_m2_(config.table_area_m2) {
  if (config.shape == ReservoirShape::tank && levels_m_.empty()) {
    // Vertical sides: the table of one plan area from the floor to the rim (and above it).
    levels_m_ = {0.0, rim_m_};
    areas_m2_ = {config.tank_area_m2, config.tank_area_m2};
  }
  if (config.shape == ReservoirShape::table || config.shape == ReservoirShape::tank) {
    kind_ = Kind::table;
    volumes_m3_.assign(levels_m_.size(), 0.0);
    for (std::size_t k = 1; k < levels_m_.size(); ++k) {
      volumes_m3_[k] = volumes_m3_[k - 1] +
                       0.5 * (areas_m2_[k - 1] + areas_m2_[k]) * (levels_m_[k] - levels_m_[k - 1]);
    }
  } else if (fall_m_ > 0.0) {
    kind_ = Kind::sloped;
  } else if (config.shape == ReservoirShape::half_round) {
    kind_ = Kind::level_half_round;
  }
  rim_area_m2_ = section_area_m2(rim_m_);
  rim_volume_m3_ = section_volume_m3(rim_m_);
  if (kind_ == Kind::level_half_round) {
    const double r = section_.depth_m();
    const auto solve_area = [&](double area_m2) {
      const double guess = std::cbrt(3.0 * area_m2 / (4.0 * std::sqrt(2.0 * r)));
      return detail::solve_increasing(
          area_m2, [r](double h) { return circular_segment_area_m2(r, h); },
          [r](double h) { return segment_width_m(r, h); }, 0.0, 2.0 * r, guess * guess, 1e-15 * r);
    };
    // The level at w = A^(2/3), analytic in w down to 0 (the first node mirrors w < 0).
    const double w_top = std::pow(circular_segment_area_m2(r, rim_m_), 2.0 / 3.0);
    // Both tables depend on the radius and the rim (through their ends) and the second on the
    // length: built once per process for each (shared_table).
    shallow_table_ = shared_table("half-round level at w", {r}, 0.0, w_top, 512, [&](double w) {
      const double h = solve_area(std::abs(w) * std::sqrt(std::abs(w)));
      return w < 0.0 ? -h : h;
    });
    // Above a shallow start the level is smooth in the volume: a uniform table in V serves there
    // without the cube root and the Newton step the shallow part needs.
    if (rim_m_ > 0.1 * r) {
      volume_table_ = shared_table("half-round level at V", {r, length_m_},
                                   circular_segment_area_m2(r, 0.1 * r) * length_m_, rim_volume_m3_,
                                   4096, [&](double v) { return solve_area(v / length_m_); });
    }
  } else if (kind_ == Kind::sloped && rim_m_ > 0.0) {
    // A starting guess for the Newton polish in level_m, smooth in V above a tenth of the rim.
    volume_table_ = UniformTable(section_volume_m3(0.1 * rim_m_), rim_volume_m3_, 1024,
                                 [&](double v) { return solve_level_m(v, 0.5 * rim_m_); });
  }
}

double ReservoirGeometry::surface_area_m2(double level_m) const {
  return level_m >= rim_m_ ? rim_area_m2_ : section_area_m2(std::max(0.0, level_m));
}

double ReservoirGeometry::volume_m3(double level_m) const {
  const double h = std::max(0.0, level_m);
  return h > rim_m_ ? rim_volume_m3_ + (h - rim_m_) * rim_area_m2_ : section_volume_m3(h);
}

double ReservoirGeometry::section_area_m2(double h) const {
  switch (kind_) {
    case Kind::level_half_round:
    case Kind::level_trapezoid:
      return section_.top_width_m(h) * length_m_;
    case Kind::sloped:
      // Water stands over the part of the length where the floor lies below the level: the
      // plan area is the integral of the top width along it, (L / F) (A(h) - A(h - F)).
      return length_m_ / fall_m_ *
             (section_.area_m2(h) - section_.area_m2(std::max(0.0, h - fall_m_)));
    case Kind::table: {
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
  switch (kind_) {
    case Kind::level_half_round:
    case Kind::level_trapezoid:
      return section_.area_m2(h) * length_m_;
    case Kind::sloped:
      // The wedge: the depth falls linearly from h at the outlet, so the volume is the integral
      // of the section area over depths, (L / F) (Phi(h) - Phi(h - F)), Phi = integral of A.
      return length_m_ / fall_m_ *
             (section_.area_integral_m3_per_m(h) -
              section_.area_integral_m3_per_m(std::max(0.0, h - fall_m_)));
    case Kind::table: {
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
  switch (kind_) {
    case Kind::level_trapezoid: {
      // Solve b h + k h^2 / 2 = A (k: the widening per unit depth) in the cancellation-free form.
      const double a = v / length_m_;
      const double b = section_.top_width_m(0.0);
      const double k = (section_.top_width_m(section_.depth_m()) - b) / section_.depth_m();
      if (k == 0.0) return v / (b * length_m_);
      return 2.0 * a / (b + std::sqrt(b * b + 2.0 * k * a));
    }
    case Kind::table: {
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
    case Kind::sloped: {
      if (!volume_table_.covers(v)) return solve_level_m(v, rim_m_ * std::sqrt(v / rim_volume_m3_));
      // The table is close (cubic between nodes) but for the cells at a kink in V(h), where the
      // water reaches the far end and at the rim: a small Newton step on V(h) = v ends it, as for
      // the shallow half-round below; a large one is taken on by the safeguarded solve.
      const double h = std::clamp(volume_table_(v), 0.0, rim_m_);
      const double step = (section_volume_m3(h) - v) / section_area_m2(h);
      if (std::abs(step) <= 1e-9 * rim_m_) return std::clamp(h - step, 0.0, rim_m_);
      return solve_level_m(v, h - step);
    }
    case Kind::level_half_round:
      break;
  }
  if (volume_table_.covers(v)) return volume_table_(v);
  // Half-round, shallow: the level is an analytic function of w = A^(2/3) (A ~ (4/3) sqrt(2r)
  // h^1.5 for h << r), tabulated once; one Newton step on A(h) = A polishes the value.
  const double r = section_.depth_m();
  const double area = v / length_m_;
  const double w = std::cbrt(area) * std::cbrt(area);
  double h = shallow_table_(w);
  h = std::clamp(h, 0.0, rim_m_);
  const double width = segment_width_m(r, h);
  if (width > 0.0) h -= (circular_segment_area_m2(r, h) - area) / width;
  return std::clamp(h, 0.0, rim_m_);
}

double ReservoirGeometry::solve_level_m(double volume_m3, double guess) const {
  return detail::solve_increasing(
      volume_m3, [this](double h) { return section_volume_m3(h); },
      [this](double h) { return section_area_m2(h); }, 0.0, rim_m_, guess, 1e-15 * rim_m_);
}

double ReservoirGeometry::overflow_m3_per_s(double level_m) const {
  // Weir over the rim, Q = C L h^1.5: the broad-crested/sharp-crested weir form with a lumped
  // coefficient C = Cd (2/3)^1.5 sqrt(g) ~ 1.7 m^0.5/s (ISO 3846; Bos 1989).
  return weir_flow_m3_per_s(weir_coefficient_, weir_length_m_, level_m - rim_m_);
}

double evaporation_rate_m_per_s(const ReservoirConfig& config, int month) {
  const std::vector<double>& e = config.evaporation_m_per_s;
  if (e.empty()) return 0.0;
  if (e.size() == 1) return e.front();
  return e[static_cast<std::size_t>(std::clamp(month, 1, 12) - 1)];
}

double evaporation_m3_per_s(double rate_m_per_s, double surface_m2, double level_m) {
  // A depth per time over the exposed surface, dV/dt = -E A: the definition of an evaporation
  // depth rate (geometry, no source needed). E is the scenario's open-water figure: a nearby
  // Class A pan's evaporation times the pan coefficient, about 0.7 for a year (Kohler, Nordenson
  // & Fox 1955, US Weather Bureau Research Paper 38, the method of WMO HOMS component I45.1.03;
  // the 0.7 from memory). The typical values in REFERENCES.md section 13 are from memory. The
  // taper below the film depth is a project choice.
  const double film = std::clamp(level_m / kEvaporationFilm_m, 0.0, 1.0);
  return rate_m_per_s * surface_m2 * film;
}

}  // namespace gutterwatt
