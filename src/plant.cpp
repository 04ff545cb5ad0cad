#include "gutterwatt/plant.hpp"

#include <algorithm>

#include "gutterwatt/hydraulics.hpp"

namespace gutterwatt {
namespace {

// Nozzle-controlled without a head column, free outfall into the column top with one.
double full_flow(const Pipe& pipe, const Nozzle& nozzle, double drop_m,
                 const std::optional<HeadColumnConfig>& column, double nu_m2_per_s,
                 double level_m) {
  if (column)
    return free_outfall_flow_m3_per_s(pipe, level_m + drop_m - column->height_m, nu_m2_per_s);
  return nozzle_controlled_flow_m3_per_s(pipe, nozzle, level_m + drop_m, nu_m2_per_s);
}

}  // namespace

double running_flow_m3_per_s(const PlantConfig& config, double level_m) {
  return full_flow(config.drop_pipe, config.nozzle, config.drop_m, config.head_column,
                   water_kinematic_viscosity_m2_per_s(config.temperature_C), level_m);
}

Plant::Plant(const PlantConfig& config)
    : pipe_(config.drop_pipe),
      nozzle_(config.nozzle),
      drop_m_(config.drop_m),
      column_(config.head_column),
      runner_diameter_m_(config.turbine.runner_diameter_m),
      speed_rpm_(config.turbine.speed_rpm),
      peak_efficiency_(config.turbine.peak_efficiency),
      generator_efficiency_(config.generator.efficiency),
      cut_in_W_(config.generator.cut_in_W),
      density_kg_per_m3_(water_density_kg_per_m3(config.temperature_C)),
      kinematic_viscosity_m2_per_s_(water_kinematic_viscosity_m2_per_s(config.temperature_C)) {
  // The full flow is needed at every solver stage while the release runs; solving the friction
  // law there dominated the run time, so it is tabulated once over the levels a run can reach.
  const double top = std::max(config.top_level_m, 1e-3) + 0.1;
  full_flow_table_ = UniformTable(0.0, top, 1024,
                                  [this](double level) { return solve_full_flow_m3_per_s(level); });
}

double Plant::full_flow_m3_per_s(double level_m) const {
  const double level = std::max(0.0, level_m);
  return full_flow_table_.covers(level) ? full_flow_table_(level) : solve_full_flow_m3_per_s(level);
}

double Plant::solve_full_flow_m3_per_s(double level_m) const {
  // level_m may be slightly negative for the table's first node.
  return full_flow(pipe_, nozzle_, drop_m_, column_, kinematic_viscosity_m2_per_s_, level_m);
}

double Plant::column_area_m2() const { return column_ ? circle_area_m2(column_->diameter_m) : 0.0; }

double Plant::column_capacity_m3() const {
  return column_ ? column_area_m2() * column_->height_m : 0.0;
}

double Plant::column_head_m(double volume_m3) const {
  return column_ ? std::max(0.0, volume_m3) / column_area_m2() : 0.0;
}

double Plant::column_nozzle_flow_m3_per_s(double volume_m3) const {
  const double head = column_head_m(volume_m3);
  const double area = circle_area_m2(nozzle_.diameter_m);
  if (head >= kNozzleLinearHead_m) {
    return orifice_flow_m3_per_s(nozzle_.discharge_coefficient, area, head);
  }
  // Below a few millimetres of head no jet forms; flow in proportion to head keeps the column's
  // drain law free of the square-root singularity at empty, which would make it stiff.
  return orifice_flow_m3_per_s(nozzle_.discharge_coefficient, area, kNozzleLinearHead_m) * head /
         kNozzleLinearHead_m;
}

double Plant::nozzle_head_for_flow_m(double flow_m3_per_s) const {
  return gutterwatt::nozzle_head_for_flow_m(nozzle_, flow_m3_per_s);
}

PlantPower Plant::power(double flow_m3_per_s, double head_m) const {
  PlantPower p;
  if (flow_m3_per_s <= 0.0 || head_m <= 0.0) return p;
  p.head_m = head_m;
  p.jet_velocity_m_per_s = jet_velocity_m_per_s(nozzle_.velocity_coefficient, head_m);
  p.jet_W = jet_power_W(density_kg_per_m3_, flow_m3_per_s, p.jet_velocity_m_per_s);
  // A runner at its best speed works at speed ratio 0.5, the peak of the ideal impulse curve.
  const double x =
      speed_rpm_ ? speed_ratio(runner_diameter_m_, *speed_rpm_, p.jet_velocity_m_per_s) : 0.5;
  p.shaft_W = impulse_efficiency(x, peak_efficiency_) * p.jet_W;
  p.electrical_W = generator_efficiency_ * p.shaft_W;
  return p;
}

}  // namespace gutterwatt
