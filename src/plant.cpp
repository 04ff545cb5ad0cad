#include "gutterwatt/plant.hpp"

#include <algorithm>
#include <optional>
#include <vector>

#include "gutterwatt/hydraulics.hpp"
#include "gutterwatt/units.hpp"

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

/// Every figure full_flow() reads but the level: the key of its shared table. The structured
/// bindings name each field of the pipe, the nozzle and the column, so a field added to one of
/// them stops this compiling until it joins the key (two designs must not share a wrong table).
std::vector<double> full_flow_figures(const Pipe& pipe, const Nozzle& nozzle, double drop_m,
                                      const std::optional<HeadColumnConfig>& column,
                                      double nu_m2_per_s) {
  const auto& [diameter, length, roughness, minor_loss, friction] = pipe;
  const auto& [nozzle_diameter, discharge_coefficient, velocity_coefficient] = nozzle;
  const HeadColumnConfig no_column;
  const auto& [column_diameter, column_height] = column ? *column : no_column;
  return {diameter,
          length,
          roughness,
          minor_loss,
          static_cast<double>(static_cast<int>(friction)),
          nozzle_diameter,
          discharge_coefficient,
          velocity_coefficient,
          drop_m,
          column ? 1.0 : 0.0,
          column_diameter,
          column_height,
          nu_m2_per_s};
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
      best_at_every_head_(config.turbine.best_at_every_head),
      peak_efficiency_(config.turbine.peak_efficiency),
      generator_efficiency_(config.generator.efficiency),
      cut_in_W_(config.generator.cut_in_W),
      density_kg_per_m3_(water_density_kg_per_m3(config.temperature_C)),
      kinematic_viscosity_m2_per_s_(water_kinematic_viscosity_m2_per_s(config.temperature_C)),
      nozzle_area_m2_(circle_area_m2(config.nozzle.diameter_m)),
      per_cd_area_(1.0 / (config.nozzle.discharge_coefficient * nozzle_area_m2_)) {
  if (column_) {
    column_area_m2_ = circle_area_m2(column_->diameter_m);
    per_column_area_ = 1.0 / column_area_m2_;
    column_join_m3_ = column_area_m2_ * kNozzleLinearHead_m;
    column_linear_drain_per_s_ =
        orifice_flow_m3_per_s(nozzle_.discharge_coefficient, nozzle_area_m2_, kNozzleLinearHead_m) /
        column_join_m3_;
  }
  // The full flow is needed at every solver stage while the release runs; solving the friction
  // law there dominated the run time, so it is tabulated once over the levels a run can reach.
  // Built once per process for each pipe, nozzle, drop, column and water (shared_table).
  const double top = std::max(config.top_level_m, 1e-3) + 0.1;
  full_flow_table_ = shared_table(
      "full flow at level",
      full_flow_figures(pipe_, nozzle_, drop_m_, column_, kinematic_viscosity_m2_per_s_), 0.0, top,
      1024, [this](double level) { return solve_full_flow_m3_per_s(level); });
  full_flow_floor_m3_per_s_ = 0.99 * full_flow_m3_per_s(0.0);
  design_head_m_ =
      column_ ? column_->height_m
              : nozzle_head_for_flow_m(nozzle_, std::min(full_flow_m3_per_s(config.design_level_m),
                                                         config.design_release_limit_m3_per_s));
  // The speed ratio x = u / V_j that maximises the impulse runner's hydraulic efficiency
  // 2x(1-x)(1 + k cos phi) is 0.5 for any bucket (Dixon and Hall, Fluid Mechanics and
  // Thermodynamics of Turbomachinery, Pelton wheel; REFERENCES.md section 7).
  held_speed_rpm_ = best_at_every_head_ ? 0.0
                    : config.turbine.speed_rpm
                        ? *config.turbine.speed_rpm
                        : runner_speed_for_ratio_rpm(
                              runner_diameter_m_, 0.5,
                              jet_velocity_m_per_s(nozzle_.velocity_coefficient, design_head_m_));
  // A permanent-magnet generator's open-circuit voltage is proportional to its speed, E = k N;
  // no current flows into a battery of voltage V_b below N = V_b / k (Hughes, Electric Motors
  // and Drives, permanent-magnet d.c. machine: E = k omega).
  if (config.generator.volts_per_rpm > 0.0 && config.battery_voltage_V > 0.0) {
    conduction_speed_rpm_ = config.battery_voltage_V / config.generator.volts_per_rpm;
  }
  held_bucket_m_per_s_ = bucket_speed_m_per_s(runner_diameter_m_, held_speed_rpm_);
  conduction_bucket_m_per_s_ = bucket_speed_m_per_s(runner_diameter_m_, conduction_speed_rpm_);
}

double runner_speed_for_ratio_rpm(double runner_diameter_m, double speed_ratio,
                                  double jet_velocity_m_per_s) {
  // Inverse of the pitch-circle speed u = pi D N / 60.
  return speed_ratio * jet_velocity_m_per_s * kSecondsPerMinute / (kPi * runner_diameter_m);
}

double Plant::full_flow_m3_per_s(double level_m) const {
  const double level = std::max(0.0, level_m);
  return full_flow_table_.covers(level) ? full_flow_table_(level) : solve_full_flow_m3_per_s(level);
}

double Plant::solve_full_flow_m3_per_s(double level_m) const {
  // level_m may be slightly negative for the table's first node.
  return full_flow(pipe_, nozzle_, drop_m_, column_, kinematic_viscosity_m2_per_s_, level_m);
}

double Plant::column_capacity_m3() const {
  return column_ ? column_area_m2() * column_->height_m : 0.0;
}

double Plant::column_head_m(double volume_m3) const {
  return std::max(0.0, volume_m3) * per_column_area_;
}

double Plant::column_nozzle_flow_m3_per_s(double volume_m3) const {
  if (volume_m3 >= column_join_m3_) {
    return orifice_flow_m3_per_s(nozzle_.discharge_coefficient, nozzle_area_m2_,
                                 column_head_m(volume_m3));
  }
  // Below a few millimetres of head no jet forms; flow in proportion to head keeps the column's
  // drain law free of the square-root singularity at empty, which would make it stiff.
  return column_linear_drain_per_s_ * std::max(0.0, volume_m3);
}

PlantPower Plant::power(double flow_m3_per_s, double head_m) const {
  return power_of_jet(flow_m3_per_s, head_m,
                      jet_velocity_m_per_s(nozzle_.velocity_coefficient, head_m));
}

PlantPower Plant::power_for_flow(double flow_m3_per_s) const {
  // The orifice law Q = Cd a sqrt(2 g h) (hydraulics.hpp) gives the jet's ideal speed sqrt(2 g h)
  // as Q / (Cd a), and the head as its square over 2 g: no square root on the solver's path.
  const double ideal_m_per_s = flow_m3_per_s * per_cd_area_;
  return power_of_jet(flow_m3_per_s, velocity_head_m(ideal_m_per_s),
                      nozzle_.velocity_coefficient * ideal_m_per_s);
}

PlantPower Plant::power_of_jet(double flow_m3_per_s, double head_m,
                               double jet_velocity_m_per_s) const {
  PlantPower p;
  if (flow_m3_per_s <= 0.0 || head_m <= 0.0) return p;
  p.head_m = head_m;
  p.jet_velocity_m_per_s = jet_velocity_m_per_s;
  p.jet_W = jet_power_W(density_kg_per_m3_, flow_m3_per_s, p.jet_velocity_m_per_s);
  // The runner held at one speed works off its best ratio as the head varies. Below the
  // conduction speed the generator carries no load and the runner speeds up towards runaway
  // (x = 1, no torque); it reaches the conduction speed only when x there is below 1, and the
  // efficiency at that x is what it delivers. Worked in the bucket's speed (half the jet's at the
  // best speed), the ratio takes one division on the solver's path where the runner's took three.
  const double bucket_m_per_s =
      std::max(best_at_every_head_ ? 0.5 * p.jet_velocity_m_per_s : held_bucket_m_per_s_,
               conduction_bucket_m_per_s_);
  p.speed_ratio = p.jet_velocity_m_per_s > 0.0 ? bucket_m_per_s / p.jet_velocity_m_per_s : 0.0;
  p.shaft_W = impulse_efficiency(p.speed_ratio, peak_efficiency_) * p.jet_W;
  p.electrical_W = generator_efficiency_ * p.shaft_W;
  return p;
}

}  // namespace gutterwatt
