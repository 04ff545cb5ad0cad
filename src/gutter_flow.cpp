#include "gutterwatt/gutter_flow.hpp"

#include <algorithm>
#include <cmath>
#include <numbers>

#include "detail.hpp"
#include "gutterwatt/units.hpp"

namespace gutterwatt {

double critical_flow_m3_per_s(const CrossSection& section, double depth_m) {
  const double area = section.area_m2(depth_m);
  const double top = section.top_width_m(depth_m);
  if (area <= 0.0 || top <= 0.0) return 0.0;
  return std::sqrt(kGravity_m_per_s2 * area * area * area / top);
}

double critical_depth_m(const CrossSection& section, double flow_m3_per_s) {
  if (flow_m3_per_s <= 0.0) return 0.0;
  // A^3 / T grows with depth (walls vertical above the section's depth): bracket, then bisect.
  double hi = section.depth_m();
  while (critical_flow_m3_per_s(section, hi) < flow_m3_per_s) hi *= 2.0;
  return detail::solve_increasing(
      flow_m3_per_s, [&](double y) { return critical_flow_m3_per_s(section, y); },
      [](double) { return 0.0; }, 0.0, hi, 0.5 * hi, 1e-12 * hi);
}

double level_channel_depth_ratio(double s) {
  // Momentum along a level, frictionless rectangular channel whose inflow brings no momentum
  // along it, with q = q_out s and critical depth y_c at the outlet (q_out^2 = g y_c^3): y^2 / 2
  // + q^2 / (g y) = y_u^2 / 2 with y_u = sqrt(3) y_c (Beij 1934, J. Res. NBS 12, 193-213, from
  // memory; Chow 1959, ch. 12, spatially varied flow). In eta = y / y_c: eta^3 - 3 eta + 2 s^2 =
  // 0, whose root in [1, sqrt(3)] is the trigonometric solution of the cubic.
  const double c = std::clamp(s * s, 0.0, 1.0);
  return 2.0 * std::cos(std::acos(-c) / 3.0);
}

double en12056_length_factor(double length_over_depth) {
  // BS EN 12056-3:2000 (as in ../shared/REFERENCES.md section 9: F_L checked against a
  // manufacturer's note).
  static constexpr double kRatio[] = {50.0, 100.0, 150.0, 200.0};
  static constexpr double kFactor[] = {1.00, 0.93, 0.86, 0.80};
  if (length_over_depth <= kRatio[0]) return kFactor[0];
  for (int k = 1; k < 4; ++k) {
    if (length_over_depth <= kRatio[k]) {
      const double f = (length_over_depth - kRatio[k - 1]) / (kRatio[k] - kRatio[k - 1]);
      return kFactor[k - 1] + f * (kFactor[k] - kFactor[k - 1]);
    }
  }
  return kFactor[3];
}

namespace {

/// Gauss-Legendre nodes and weights on [0, 1], 8 points (Abramowitz & Stegun 1964, Table 25.4).
constexpr double kNode[] = {0.0198550717512319, 0.1016667612931866, 0.2372337950418355,
                            0.4082826787521751, 0.5917173212478249, 0.7627662049581645,
                            0.8983332387068134, 0.9801449282487681};
constexpr double kWeight[] = {0.0506142681451881, 0.1111905172266872, 0.1568533229389436,
                              0.1813418916891810, 0.1813418916891810, 0.1568533229389436,
                              0.1111905172266872, 0.0506142681451881};

/// Nodes of the delivery table: dense near empty, where the flow grows fastest in the volume.
constexpr int kTableNodes = 400;
/// Equal spans of volume indexed for the lookup: the nodes are closest near empty (y grows as
/// the square of the node's number), where a span covers at most about a dozen cells.
constexpr int kBuckets = 1024;

}  // namespace

GutterDelivery::GutterDelivery(const CrossSection& section, double length_m, double rim_m,
                               double max_volume_m3)
    : section_(section),
      length_m_(length_m),
      flow_factor_(kGutterRatingCoefficient * en12056_length_factor(length_m / rim_m)) {
  // The outlet depth at which the profile holds max_volume_m3, by doubling from the rim.
  double top_m = rim_m;
  while (profile_volume_m3(top_m) < max_volume_m3) top_m *= 2.0;
  volumes_m3_.reserve(kTableNodes + 1);
  for (int k = 0; k <= kTableNodes; ++k) {
    const double u = static_cast<double>(k) / kTableNodes;
    const double y = top_m * u * u;
    volumes_m3_.push_back(profile_volume_m3(y));
    flows_m3_per_s_.push_back(flow_factor_ * critical_flow_m3_per_s(section_, y));
    outlet_depths_m_.push_back(y);
  }
  const std::size_t last = volumes_m3_.size() - 1;
  buckets_per_m3_ = kBuckets / volumes_m3_[last];
  first_cell_.reserve(kBuckets + 1);
  for (int b = 0; b <= kBuckets; ++b) {
    const double edge = b / buckets_per_m3_;
    const auto it = std::upper_bound(volumes_m3_.begin(), volumes_m3_.end(), edge);
    const auto cell = static_cast<std::size_t>(it - volumes_m3_.begin());
    first_cell_.push_back(std::clamp<std::size_t>(cell, 1, last) - 1);
  }
}

double GutterDelivery::flow_with_closed_end_at_m3_per_s(double depth_m) const {
  return flow_factor_ * critical_flow_m3_per_s(section_, depth_m / level_channel_depth_ratio(0.0));
}

double GutterDelivery::profile_volume_m3(double outlet_depth_m) const {
  // V = L times the integral over s of A(y_c eta(s)), by Gauss-Legendre quadrature in t with
  // s = 1 - t^2: eta - 1 grows as sqrt(1 - s) from the outlet, smooth in t.
  double sum = 0.0;
  for (int k = 0; k < 8; ++k) {
    const double t = kNode[k];
    const double eta = level_channel_depth_ratio(1.0 - t * t);
    sum += kWeight[k] * 2.0 * t * section_.area_m2(outlet_depth_m * eta);
  }
  return length_m_ * sum;
}

std::pair<std::size_t, double> GutterDelivery::locate(double volume_m3) const {
  // A bucket index over the sorted volumes (a project choice): the first cell of the volume's
  // span, then a step or two. The guards ask at another volume than the rates (the water above
  // the drop pipe's), so the search from the cell found last, which this replaces, missed there.
  const std::size_t last = volumes_m3_.size() - 1;
  if (!(volume_m3 < volumes_m3_[last])) return {last - 1, 1.0};  // held at the last value
  std::size_t k =
      volume_m3 > 0.0 ? first_cell_[static_cast<std::size_t>(volume_m3 * buckets_per_m3_)] : 0;
  while (k > 0 && volumes_m3_[k] > volume_m3) --k;  // the span's edge rounded above the volume
  while (volumes_m3_[k + 1] <= volume_m3) ++k;
  const double f = (volume_m3 - volumes_m3_[k]) / (volumes_m3_[k + 1] - volumes_m3_[k]);
  return {k, std::clamp(f, 0.0, 1.0)};
}

double GutterDelivery::max_flow_m3_per_s(double volume_m3) const {
  const auto [k, f] = locate(std::max(0.0, volume_m3));
  return flows_m3_per_s_[k] + f * (flows_m3_per_s_[k + 1] - flows_m3_per_s_[k]);
}

double GutterDelivery::outlet_depth_m(double volume_m3, double pool_level_m,
                                      double flow_m3_per_s) const {
  if (flow_m3_per_s <= 0.0) return pool_level_m;
  const auto [k, f] = locate(std::max(0.0, volume_m3));
  const double most = flows_m3_per_s_[k] + f * (flows_m3_per_s_[k + 1] - flows_m3_per_s_[k]);
  const double critical = outlet_depths_m_[k] + f * (outlet_depths_m_[k + 1] - outlet_depths_m_[k]);
  if (most <= 0.0) return 0.0;
  const double share = flow_m3_per_s / most;
  if (share > 1.0) {
    return std::min(critical, pool_level_m) *
           std::max(0.0, 1.0 - kOutletDrawdownRamp * (share - 1.0));
  }
  return pool_level_m - std::max(0.0, pool_level_m - critical) * share * share;
}

std::optional<GutterDelivery> gutter_delivery(const ReservoirConfig& config) {
  if (!is_level_gutter(config) || config.length_m <= 0.0 || config.rim_m <= 0.0) {
    return std::nullopt;
  }
  const CrossSection section = section_of(config);
  // Up to twice the brim-full volume: above the rim the water overflows long before.
  const double brim_m3 = section.area_m2(config.rim_m) * config.length_m;
  return GutterDelivery(section, config.length_m, config.rim_m, 2.0 * brim_m3);
}

}  // namespace gutterwatt
