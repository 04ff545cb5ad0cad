#pragma once
/// The water-to-wire chain below the release: drop pipe, optional head column, nozzle, impulse
/// turbine and generator, as seen from the simulation at one instant.

#include <limits>
#include <optional>

#include "gutterwatt/hydraulics.hpp"
#include "gutterwatt/interpolation.hpp"

namespace gutterwatt {

struct HeadColumnConfig {
  double diameter_m = 0.0;
  double height_m = 0.0;  ///< from the nozzle up to the column's top, where the drop pipe enters
};

enum class TurbineKind { impulse };

struct TurbineConfig {
  double runner_diameter_m = 0.0;
  /// A runner speed held fixed. nullopt: the best speed at the design head, held fixed (a
  /// permanent-magnet generator on a battery turns near one speed).
  std::optional<double> speed_rpm;
  /// `speed_rpm: best`: the best speed at every head, an upper bound no fixed runner reaches.
  bool best_at_every_head = false;
  double peak_efficiency = 0.7;
  TurbineKind kind = TurbineKind::impulse;
};

struct GeneratorConfig {
  double efficiency = 0.65;
  double cut_in_W = 0.0;
  /// Open-circuit volts per rpm of a permanent-magnet generator; 0: not given. With the battery's
  /// voltage it sets the speed below which no current flows into the battery.
  double volts_per_rpm = 0.0;
};

/// Everything below the release, as Plant needs it.
struct PlantConfig {
  Pipe drop_pipe{0.0, 0.0, 0.0, 0.0};
  double drop_m = 0.0;  ///< vertical fall from the reservoir floor to the nozzle
  std::optional<HeadColumnConfig> head_column;
  Nozzle nozzle{0.0, 0.95, 0.97};
  TurbineConfig turbine;
  GeneratorConfig generator;
  double temperature_C = 15.0;
  /// The highest reservoir level the full-flow table must cover (the rim or the trigger level).
  double top_level_m = 0.0;
  /// The reservoir level at which the release starts to run: the design head is the nozzle's
  /// head with the release running full from there (the column's height with a head column).
  double design_level_m = 0.0;
  /// The most the release itself passes running at design_level_m (an orifice's opening, say);
  /// infinity where only the conveyance limits the flow.
  double design_release_limit_m3_per_s = std::numeric_limits<double>::infinity();
  double battery_voltage_V = 0.0;  ///< 0: not given
};

/// The flow the conveyance of `config` carries with the release running full and the reservoir
/// at `level_m`, solved directly (what Plant::solve_full_flow_m3_per_s gives, without building
/// a Plant and its table).
double running_flow_m3_per_s(const PlantConfig& config, double level_m);

/// Power figures for one flow through the nozzle at one head.
struct PlantPower {
  double head_m = 0.0;  ///< head at the nozzle
  double jet_velocity_m_per_s = 0.0;
  double jet_W = 0.0;         ///< rho Q V^2 / 2
  double shaft_W = 0.0;       ///< after the runner's hydraulic efficiency
  double electrical_W = 0.0;  ///< after the generator, before the cut-in test
  double speed_ratio = 0.0;   ///< bucket speed over jet speed (the runner's speed from it:
                              ///< runner_speed_for_ratio_rpm)
};

/// Column head below which the nozzle's flow is taken in proportion to head rather than to its
/// square root (no jet forms at such heads; see Plant::column_nozzle_flow_m3_per_s).
inline constexpr double kNozzleLinearHead_m = 0.01;

class Plant {
 public:
  explicit Plant(const PlantConfig& config);

  /// Flow the conveyance carries with the release running full and the reservoir at `level_m`:
  /// nozzle-controlled without a head column, free outfall into the column top with one.
  /// Interpolated (4-point cubic) from a table solved once up to 0.1 m above the rim, solved
  /// directly above that. The table is good to about 1e-9 where the friction law is smooth; in
  /// the cells where the flow crosses the laminar-turbulent blend (Re 2000 to 4000) its error
  /// grows to about 1e-5.
  double full_flow_m3_per_s(double level_m) const;
  /// A flow the full flow is not below at any level >= 0: it grows with the level, and this is
  /// 0.99 of its value at 0 (the margin far above the table's interpolation error).
  double full_flow_floor_m3_per_s() const { return full_flow_floor_m3_per_s_; }
  /// The same flow solved directly (Darcy-Weisbach with the chosen friction law).
  double solve_full_flow_m3_per_s(double level_m) const;

  bool has_column() const { return column_.has_value(); }
  double column_area_m2() const { return column_area_m2_; }
  /// Volume of a brim-full head column (0 without one).
  double column_capacity_m3() const;
  /// Nozzle flow with the column holding `volume_m3` (head = volume / area); orifice flow above
  /// kNozzleLinearHead_m, linear in head below it.
  double column_nozzle_flow_m3_per_s(double volume_m3) const;
  double column_head_m(double volume_m3) const;
  /// The column's water at kNozzleLinearHead_m, below which its drain is linear (0 without one),
  /// and that drain's rate constant, Qn / V there (1/s).
  double column_join_m3() const { return column_join_m3_; }
  double column_linear_drain_per_s() const { return column_linear_drain_per_s_; }

  /// Jet, shaft and electrical power for `flow` at nozzle head `head_m`.
  PlantPower power(double flow_m3_per_s, double head_m) const;
  /// The same for `flow` with no column holding the head: the drop pipe backs up until the
  /// nozzle passes what arrives (quasi-steady; the pipe's own storage is neglected), so the head
  /// (PlantPower::head_m) is the orifice law's for that flow.
  PlantPower power_for_flow(double flow_m3_per_s) const;

  /// Head at the nozzle with the release running full from the design level (the column's height
  /// with a head column).
  double design_head_m() const { return design_head_m_; }
  /// The speed the runner is held at (0 when it turns at the best speed at every head).
  double held_speed_rpm() const { return held_speed_rpm_; }
  /// Speed below which the generator's open-circuit voltage does not reach the battery's (0 when
  /// volts per rpm or the battery's voltage is not given).
  double conduction_speed_rpm() const { return conduction_speed_rpm_; }

  /// Generator output below this is not delivered.
  double cut_in_W() const { return cut_in_W_; }
  double density_kg_per_m3() const { return density_kg_per_m3_; }
  double kinematic_viscosity_m2_per_s() const { return kinematic_viscosity_m2_per_s_; }

 private:
  Pipe pipe_;
  Nozzle nozzle_;
  double drop_m_;
  std::optional<HeadColumnConfig> column_;
  double runner_diameter_m_;
  bool best_at_every_head_;
  double peak_efficiency_;
  double generator_efficiency_;
  double cut_in_W_;
  double density_kg_per_m3_;
  double kinematic_viscosity_m2_per_s_;
  UniformTable full_flow_table_;
  double design_head_m_ = 0.0;
  double held_speed_rpm_ = 0.0;
  double conduction_speed_rpm_ = 0.0;
  // The bucket's speeds at the held and the conduction speed (bucket_speed_m_per_s).
  double held_bucket_m_per_s_ = 0.0;
  double conduction_bucket_m_per_s_ = 0.0;
  double nozzle_area_m2_;  // the nozzle's bore area, a
  double per_cd_area_;     // 1 / (Cd a) of the nozzle: its flow to the ideal jet speed
  double full_flow_floor_m3_per_s_ = 0.0;
  // The column's plan area and its inverse, and the linear drain below the join: worked out at
  // every solver stage otherwise.
  double column_area_m2_ = 0.0;
  double per_column_area_ = 0.0;
  double column_join_m3_ = 0.0;
  double column_linear_drain_per_s_ = 0.0;

  PlantPower power_of_jet(double flow_m3_per_s, double head_m, double jet_velocity_m_per_s) const;
};

/// Runner speed at which the bucket moves at `speed_ratio` times the jet velocity:
/// N = 60 x V_j / (pi D) (pitch-circle speed u = pi D N / 60).
double runner_speed_for_ratio_rpm(double runner_diameter_m, double speed_ratio,
                                  double jet_velocity_m_per_s);

}  // namespace gutterwatt
