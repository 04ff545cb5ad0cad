#include "gutterwatt/storm.hpp"

#include <algorithm>
#include <array>
#include <cassert>
#include <cctype>
#include <cmath>
#include <cstdint>
#include <cstdio>
#include <limits>
#include <span>
#include <string>

#include "gutterwatt/error.hpp"
#include "gutterwatt/units.hpp"

namespace gutterwatt {
namespace {

struct Node {
  double hour;
  double fraction;
};

// NRCS 24-hour cumulative rainfall distributions P(t)/P24: USDA Soil Conservation Service (1986),
// Urban Hydrology for Small Watersheds, TR-55, 2nd ed., Appendix B; the finer tabulation is in
// NRCS National Engineering Handbook Part 630, Chapter 4. Written from memory at 0.5 h (plus the
// quarter hours next to the peak), agreeing with REFERENCES.md section 8 at its hours; confirm
// against the published table before tightening any tolerance.
constexpr std::array<Node, 50> kNrcsTypeI = {{
    {0.0, 0.000},  {0.5, 0.008},  {1.0, 0.017},  {1.5, 0.026},  {2.0, 0.035},  {2.5, 0.045},
    {3.0, 0.055},  {3.5, 0.065},  {4.0, 0.076},  {4.5, 0.087},  {5.0, 0.099},  {5.5, 0.112},
    {6.0, 0.125},  {6.5, 0.140},  {7.0, 0.156},  {7.5, 0.174},  {8.0, 0.194},  {8.5, 0.219},
    {9.0, 0.254},  {9.5, 0.303},  {9.75, 0.362}, {10.0, 0.515}, {10.5, 0.583}, {11.0, 0.624},
    {11.5, 0.654}, {12.0, 0.682}, {12.5, 0.706}, {13.0, 0.727}, {13.5, 0.748}, {14.0, 0.767},
    {14.5, 0.784}, {15.0, 0.800}, {15.5, 0.816}, {16.0, 0.830}, {16.5, 0.844}, {17.0, 0.857},
    {17.5, 0.870}, {18.0, 0.882}, {18.5, 0.894}, {19.0, 0.905}, {19.5, 0.916}, {20.0, 0.926},
    {20.5, 0.936}, {21.0, 0.946}, {21.5, 0.956}, {22.0, 0.965}, {22.5, 0.974}, {23.0, 0.983},
    {23.5, 0.992}, {24.0, 1.000},
}};

// Type IA: same sources as Type I, from memory.
constexpr std::array<Node, 49> kNrcsTypeIA = {{
    {0.0, 0.000},  {0.5, 0.010},  {1.0, 0.022},  {1.5, 0.036},  {2.0, 0.050},  {2.5, 0.065},
    {3.0, 0.081},  {3.5, 0.098},  {4.0, 0.116},  {4.5, 0.135},  {5.0, 0.156},  {5.5, 0.179},
    {6.0, 0.206},  {6.5, 0.235},  {7.0, 0.268},  {7.5, 0.310},  {8.0, 0.425},  {8.5, 0.480},
    {9.0, 0.520},  {9.5, 0.550},  {10.0, 0.577}, {10.5, 0.601}, {11.0, 0.624}, {11.5, 0.645},
    {12.0, 0.664}, {12.5, 0.683}, {13.0, 0.701}, {13.5, 0.719}, {14.0, 0.736}, {14.5, 0.753},
    {15.0, 0.769}, {15.5, 0.785}, {16.0, 0.800}, {16.5, 0.815}, {17.0, 0.830}, {17.5, 0.844},
    {18.0, 0.858}, {18.5, 0.871}, {19.0, 0.884}, {19.5, 0.895}, {20.0, 0.906}, {20.5, 0.918},
    {21.0, 0.930}, {21.5, 0.942}, {22.0, 0.953}, {22.5, 0.965}, {23.0, 0.977}, {23.5, 0.988},
    {24.0, 1.000},
}};

// Type II: same sources as Type I, from memory.
constexpr std::array<Node, 51> kNrcsTypeII = {{
    {0.0, 0.000},  {0.5, 0.005},   {1.0, 0.011},  {1.5, 0.016},  {2.0, 0.022},  {2.5, 0.028},
    {3.0, 0.035},  {3.5, 0.041},   {4.0, 0.048},  {4.5, 0.056},  {5.0, 0.063},  {5.5, 0.071},
    {6.0, 0.080},  {6.5, 0.089},   {7.0, 0.098},  {7.5, 0.109},  {8.0, 0.120},  {8.5, 0.133},
    {9.0, 0.147},  {9.5, 0.163},   {9.75, 0.172}, {10.0, 0.181}, {10.5, 0.204}, {11.0, 0.235},
    {11.5, 0.283}, {11.75, 0.357}, {12.0, 0.663}, {12.5, 0.735}, {13.0, 0.772}, {13.5, 0.799},
    {14.0, 0.820}, {14.5, 0.838},  {15.0, 0.854}, {15.5, 0.868}, {16.0, 0.880}, {16.5, 0.891},
    {17.0, 0.902}, {17.5, 0.912},  {18.0, 0.921}, {18.5, 0.929}, {19.0, 0.937}, {19.5, 0.945},
    {20.0, 0.952}, {20.5, 0.959},  {21.0, 0.965}, {21.5, 0.972}, {22.0, 0.978}, {22.5, 0.984},
    {23.0, 0.989}, {23.5, 0.995},  {24.0, 1.000},
}};

// Type III: same sources as Type I, from memory; 1 h, 9 h and 17 h agree within 0.0025 with the
// values REFERENCES.md section 8 marks as checked.
constexpr std::array<Node, 51> kNrcsTypeIII = {{
    {0.0, 0.000},  {0.5, 0.005},   {1.0, 0.010},  {1.5, 0.015},  {2.0, 0.020},  {2.5, 0.026},
    {3.0, 0.032},  {3.5, 0.037},   {4.0, 0.043},  {4.5, 0.050},  {5.0, 0.057},  {5.5, 0.065},
    {6.0, 0.072},  {6.5, 0.081},   {7.0, 0.089},  {7.5, 0.102},  {8.0, 0.115},  {8.5, 0.130},
    {9.0, 0.148},  {9.5, 0.167},   {9.75, 0.178}, {10.0, 0.189}, {10.5, 0.216}, {11.0, 0.250},
    {11.5, 0.298}, {11.75, 0.339}, {12.0, 0.500}, {12.5, 0.702}, {13.0, 0.751}, {13.5, 0.785},
    {14.0, 0.811}, {14.5, 0.834},  {15.0, 0.854}, {15.5, 0.871}, {16.0, 0.886}, {16.5, 0.898},
    {17.0, 0.910}, {17.5, 0.919},  {18.0, 0.927}, {18.5, 0.935}, {19.0, 0.943}, {19.5, 0.950},
    {20.0, 0.957}, {20.5, 0.963},  {21.0, 0.969}, {21.5, 0.975}, {22.0, 0.981}, {22.5, 0.987},
    {23.0, 0.992}, {23.5, 0.996},  {24.0, 1.000},
}};

// The NRCS tables describe 24-hour storms only: their shape nests the intense short bursts inside
// the 24-hour depth, so cutting or stretching one does not give a storm of another duration. A
// shorter design storm is built from an IDF curve instead (chicago or idf-block).
constexpr double kNrcsDuration_s = 24.0 * kSecondsPerHour;

// More steps than this is a mistake on the command line, not a storm.
constexpr double kMaxSteps = 1e7;

std::span<const Node> nrcs_table(StormKind kind) {
  switch (kind) {
    case StormKind::nrcs_i:
      return kNrcsTypeI;
    case StormKind::nrcs_ia:
      return kNrcsTypeIA;
    case StormKind::nrcs_ii:
      return kNrcsTypeII;
    case StormKind::nrcs_iii:
      return kNrcsTypeIII;
    default:
      return {};
  }
}

bool is_nrcs(StormKind kind) { return !nrcs_table(kind).empty(); }

const char* nrcs_label(StormKind kind) {
  switch (kind) {
    case StormKind::nrcs_i:
      return "NRCS type I";
    case StormKind::nrcs_ia:
      return "NRCS type IA";
    case StormKind::nrcs_ii:
      return "NRCS type II";
    default:
      return "NRCS type III";
  }
}

// Monotone piecewise-cubic Hermite interpolation through the table: Fritsch & Carlson (1980),
// Monotone piecewise cubic interpolation, SIAM J. Numer. Anal. 17(2):238-246, with the
// weighted-harmonic-mean slopes of Fritsch & Butland (1984), SIAM J. Sci. Stat. Comput.
// 5(2):300-304. Secant slopes at the two ends keep every interval monotone.
class MonotoneCubic {
 public:
  explicit MonotoneCubic(std::span<const Node> nodes) : nodes_(nodes), slopes_(nodes.size()) {
    const std::size_t n = nodes.size();
    assert(n >= 2);
    auto secant = [&](std::size_t i) {
      return (nodes[i + 1].fraction - nodes[i].fraction) / (nodes[i + 1].hour - nodes[i].hour);
    };
    slopes_[0] = secant(0);
    slopes_[n - 1] = secant(n - 2);
    for (std::size_t i = 1; i + 1 < n; ++i) {
      const double d0 = secant(i - 1);
      const double d1 = secant(i);
      if (d0 * d1 <= 0.0) {
        slopes_[i] = 0.0;
        continue;
      }
      const double h0 = nodes[i].hour - nodes[i - 1].hour;
      const double h1 = nodes[i + 1].hour - nodes[i].hour;
      const double w0 = 2.0 * h1 + h0;
      const double w1 = h1 + 2.0 * h0;
      slopes_[i] = (w0 + w1) / (w0 / d0 + w1 / d1);
    }
  }

  double operator()(double hour) const {
    if (hour <= nodes_.front().hour) return nodes_.front().fraction;
    if (hour >= nodes_.back().hour) return nodes_.back().fraction;
    const auto upper = std::upper_bound(nodes_.begin(), nodes_.end(), hour,
                                        [](double h, const Node& node) { return h < node.hour; });
    const std::size_t i = static_cast<std::size_t>(upper - nodes_.begin()) - 1;
    const double h = nodes_[i + 1].hour - nodes_[i].hour;
    const double s = (hour - nodes_[i].hour) / h;
    // Cubic Hermite basis on [0, 1].
    const double h00 = (1.0 + 2.0 * s) * (1.0 - s) * (1.0 - s);
    const double h10 = s * (1.0 - s) * (1.0 - s);
    const double h01 = s * s * (3.0 - 2.0 * s);
    const double h11 = s * s * (s - 1.0);
    return h00 * nodes_[i].fraction + h10 * h * slopes_[i] + h01 * nodes_[i + 1].fraction +
           h11 * h * slopes_[i + 1];
  }

 private:
  std::span<const Node> nodes_;
  std::vector<double> slopes_;
};

std::string number(double value) {
  char buffer[32];
  std::snprintf(buffer, sizeof buffer, "%g", value);
  return buffer;
}

[[noreturn]] void fail(const std::string& field, const std::string& message) {
  throw InputError("", 0, field, message);
}

// The IDF depth-duration function in the curve's own units: a t / (t + b)^c, in mm/h times
// minutes; divided by 60 it is millimetres.
double idf_depth_mm_h_min(const IdfCurve& idf, double t_min) {
  return idf.a * t_min / std::pow(t_min + idf.b_min, idf.c);
}

void check_idf(const IdfCurve& idf, bool needs_positive_b) {
  if (!(idf.a > 0.0)) fail("--idf", "a must be > 0 (got " + number(idf.a) + " mm/h)");
  if (needs_positive_b && !(idf.b_min > 0.0)) {
    fail("--idf", "b must be > 0 for a chicago storm, whose peak is a / b^c (got " +
                      number(idf.b_min) + " min)");
  }
  if (!(idf.b_min >= 0.0)) fail("--idf", "b must be >= 0 (got " + number(idf.b_min) + " min)");
  if (!(idf.c >= 0.0 && idf.c <= 1.0)) {
    fail("--idf", "c must be in [0, 1] (got " + number(idf.c) + ")");
  }
}

// Validates the spec and returns the number of steps.
std::size_t check_spec(const StormSpec& spec) {
  if (!(spec.duration_s > 0.0) || !std::isfinite(spec.duration_s)) {
    fail("--duration", "must be > 0 (got " + number(spec.duration_s) + " s)");
  }
  if (!(spec.step_s > 0.0) || !std::isfinite(spec.step_s)) {
    fail("--step", "must be > 0 (got " + number(spec.step_s) + " s)");
  }
  if (spec.step_s != std::floor(spec.step_s)) {
    fail("--step", "must be a whole number of seconds (got " + number(spec.step_s) + " s)");
  }
  const double steps = spec.duration_s / spec.step_s;
  if (steps > kMaxSteps) {
    fail("--step", "gives more than " + number(kMaxSteps) + " steps (" + number(spec.duration_s) +
                       " s in steps of " + number(spec.step_s) + " s)");
  }
  if (std::abs(steps - std::round(steps)) > 1e-9 * steps) {
    fail("--duration", "must be a whole number of steps (got " + number(spec.duration_s) +
                           " s in steps of " + number(spec.step_s) + " s)");
  }
  if (is_nrcs(spec.kind) && spec.duration_s != kNrcsDuration_s) {
    fail("--duration", std::string(nrcs_label(spec.kind)) +
                           " storms are tabulated for 24 h only (got " +
                           number(spec.duration_s / kSecondsPerHour) +
                           " h); use chicago or idf-block for another duration");
  }
  const bool shape_from_idf = spec.kind == StormKind::chicago || spec.kind == StormKind::idf_block;
  if (shape_from_idf && !spec.idf) {
    fail("--idf",
         std::string(storm_kind_name(spec.kind)) + " storms need an IDF curve i = a / (t + b)^c");
  }
  if (spec.idf) check_idf(*spec.idf, spec.kind == StormKind::chicago);
  if (shape_from_idf && !(spec.peak_position >= 0.0 && spec.peak_position <= 1.0)) {
    fail("--peak", "must be in [0, 1] (got " + number(spec.peak_position) + ")");
  }
  if (!(spec.depth_m >= 0.0) || !std::isfinite(spec.depth_m)) {
    fail("--depth", "must be >= 0 (got " + number(spec.depth_m / kMetresPerMm) + " mm)");
  }
  if (spec.depth_m == 0.0 && !spec.idf) {
    fail("--depth", "give a depth > 0 or an IDF curve to take it from");
  }
  return static_cast<std::size_t>(std::llround(steps));
}

// Cumulative fractions F(t_k) of the storm at the step boundaries k = 0..n, F(t_n) the whole.
std::vector<double> cumulative_shape(const StormSpec& spec, std::size_t steps) {
  std::vector<double> cumulative(steps + 1, 0.0);
  switch (spec.kind) {
    case StormKind::nrcs_i:
    case StormKind::nrcs_ia:
    case StormKind::nrcs_ii:
    case StormKind::nrcs_iii: {
      const MonotoneCubic curve(nrcs_table(spec.kind));
      for (std::size_t k = 0; k <= steps; ++k) {
        cumulative[k] = curve(static_cast<double>(k) * spec.step_s / kSecondsPerHour);
      }
      break;
    }
    case StormKind::chicago:
      for (std::size_t k = 0; k <= steps; ++k) {
        cumulative[k] = chicago_cumulative_depth_m(*spec.idf, spec.peak_position, spec.duration_s,
                                                   static_cast<double>(k) * spec.step_s);
      }
      break;
    case StormKind::idf_block: {
      const IdfCurve idf = *spec.idf;
      const auto blocks = alternating_block_depths_m(
          [&idf](double duration_s) { return idf_depth_m(idf, duration_s); },
          static_cast<int>(steps), spec.step_s, spec.peak_position);
      for (std::size_t k = 0; k < steps; ++k) cumulative[k + 1] = cumulative[k] + blocks[k];
      break;
    }
    case StormKind::block:
      for (std::size_t k = 0; k <= steps; ++k) {
        cumulative[k] = static_cast<double>(k) / static_cast<double>(steps);
      }
      break;
  }
  return cumulative;
}

}  // namespace

double idf_intensity_m_per_s(const IdfCurve& idf, double duration_s) {
  assert(duration_s > 0.0);
  const double t_min = duration_s / kSecondsPerMinute;
  return idf.a / std::pow(t_min + idf.b_min, idf.c) * kMetresPerMm / kSecondsPerHour;
}

double idf_depth_m(const IdfCurve& idf, double duration_s) {
  return idf_intensity_m_per_s(idf, duration_s) * duration_s;
}

double nrcs_cumulative_fraction(StormKind kind, double t_s) {
  assert(is_nrcs(kind));
  return MonotoneCubic(nrcs_table(kind))(t_s / kSecondsPerHour);
}

// Chicago storm: Keifer & Chu (1957), Synthetic storm pattern for drainage design, J. Hydraul.
// Div. ASCE 83(HY4). Every window holding the peak, r of it before and 1 - r after, holds the IDF
// depth for its length; differentiating the depth-duration curve D(t) = a t / (t + b)^c gives
// i(t_b) = a [(1 - c) t_b / r + b] / (t_b / r + b)^(1 + c) before the peak, and the same with
// t_a / (1 - r) after it.
double chicago_intensity_m_per_s(const IdfCurve& idf, double peak_position, double duration_s,
                                 double t_s) {
  const double r = peak_position;
  const double t_peak_s = r * duration_s;
  // The time from the peak stretched to the length of the window it belongs to, in minutes.
  const double window_s = t_s <= t_peak_s ? (r > 0.0 ? (t_peak_s - t_s) / r : 0.0)
                                          : (r < 1.0 ? (t_s - t_peak_s) / (1.0 - r) : 0.0);
  const double tau = window_s / kSecondsPerMinute;
  const double i_mm_per_h =
      idf.a * ((1.0 - idf.c) * tau + idf.b_min) / std::pow(tau + idf.b_min, 1.0 + idf.c);
  return i_mm_per_h * kMetresPerMm / kSecondsPerHour;
}

// Integral of the Keifer & Chu intensity in closed form: from the peak back over t_b the storm
// holds r D(t_b / r), forward over t_a it holds (1 - r) D(t_a / (1 - r)).
double chicago_cumulative_depth_m(const IdfCurve& idf, double peak_position, double duration_s,
                                  double t_s) {
  const double r = peak_position;
  const double t_min = std::clamp(t_s, 0.0, duration_s) / kSecondsPerMinute;
  const double total_min = duration_s / kSecondsPerMinute;
  const double peak_min = r * total_min;
  const double before_peak = r * idf_depth_mm_h_min(idf, total_min);
  double depth_mm_h_min = 0.0;
  if (t_min <= peak_min) {
    // r > 0 here unless t = 0 with the peak at the start, where nothing has fallen.
    depth_mm_h_min =
        r > 0.0 ? before_peak - r * idf_depth_mm_h_min(idf, (peak_min - t_min) / r) : 0.0;
  } else {
    depth_mm_h_min =
        before_peak + (1.0 - r) * idf_depth_mm_h_min(idf, (t_min - peak_min) / (1.0 - r));
  }
  return depth_mm_h_min / kSecondsPerMinute * kMetresPerMm;
}

// Alternating block method: Chow, Maidment & Mays (1988), Applied Hydrology, section 14.4. The
// increments are placed in the order of k rather than sorted, so that the blocks around the peak
// nest the IDF depths for every duration even if a curve's increments are not monotone.
std::vector<double> alternating_block_depths_m(const std::function<double(double)>& depth_m,
                                               int blocks, double step_s, double peak_position) {
  assert(blocks >= 1 && step_s > 0.0);
  const int peak =
      std::clamp(static_cast<int>(std::ceil(peak_position * blocks - 1e-9)) - 1, 0, blocks - 1);
  std::vector<double> out(static_cast<std::size_t>(blocks), 0.0);
  int left = peak - 1;
  int right = peak + 1;
  bool go_right = true;
  double previous = 0.0;
  for (int k = 1; k <= blocks; ++k) {
    const double cumulative = depth_m(k * step_s);
    const double increment = cumulative - previous;
    previous = cumulative;
    int slot = peak;
    if (k > 1) {
      if (right >= blocks) go_right = false;
      if (left < 0) go_right = true;
      slot = go_right ? right++ : left--;
      go_right = !go_right;
    }
    out[static_cast<std::size_t>(slot)] = increment;
  }
  return out;
}

double storm_total_depth_m(const StormSpec& spec) {
  check_spec(spec);
  if (spec.depth_m > 0.0) return spec.depth_m;
  return idf_depth_m(*spec.idf, spec.duration_s);
}

std::vector<double> storm_depths_m(const StormSpec& spec) {
  const std::size_t steps = check_spec(spec);
  const double total_m = storm_total_depth_m(spec);
  const std::vector<double> cumulative = cumulative_shape(spec, steps);
  const double shape_total = cumulative.back();
  std::vector<double> depths(steps, 0.0);
  double sum = 0.0;
  for (std::size_t k = 0; k + 1 < steps; ++k) {
    depths[k] = total_m * (cumulative[k + 1] - cumulative[k]) / shape_total;
    sum += depths[k];
  }
  // The last step takes what is left, nudged by single ulps until the left-to-right sum is the
  // total exactly; the first guess is exact whenever the earlier steps hold half or more.
  double last = total_m - sum;
  constexpr double kInfinity = std::numeric_limits<double>::infinity();
  while (sum + last < total_m) last = std::nextafter(last, kInfinity);
  while (sum + last > total_m) last = std::nextafter(last, -kInfinity);
  depths.back() = last;
  return depths;
}

RainCsvWriter::RainCsvWriter(std::ostream& out, int utc_offset_s)
    : out_(out), utc_offset_s_(utc_offset_s) {
  out_ << "time,rain_mm\n";
}

void RainCsvWriter::row(Instant end, double depth_m) {
  constexpr double kUnitsPerMetre = 1e9;  // units of 1e-6 mm
  total_m_ += depth_m;
  const std::int64_t target = std::llround(total_m_ * kUnitsPerMetre);
  const std::int64_t units = std::max<std::int64_t>(0, target - printed_units_);
  printed_units_ += units;
  out_ << format_iso8601(end, utc_offset_s_) << ',' << units / 1000000;
  if (const std::int64_t micro = units % 1000000; micro != 0) {
    char digits[8];
    std::snprintf(digits, sizeof digits, "%06lld", static_cast<long long>(micro));
    std::string_view fraction(digits);
    while (fraction.back() == '0') fraction.remove_suffix(1);
    out_ << '.' << fraction;
  }
  out_ << '\n';
}

void write_storm_csv(std::ostream& out, const StormSpec& spec, int utc_offset_s) {
  const std::vector<double> depths = storm_depths_m(spec);
  const auto step_s = static_cast<Instant>(spec.step_s);
  RainCsvWriter csv(out, utc_offset_s);
  for (std::size_t k = 0; k < depths.size(); ++k) {
    csv.row(spec.start + static_cast<Instant>(k + 1) * step_s, depths[k]);
  }
}

StormKind parse_storm_kind(std::string_view text) {
  constexpr std::array<StormKind, 7> kKinds = {
      StormKind::nrcs_i,  StormKind::nrcs_ia,   StormKind::nrcs_ii, StormKind::nrcs_iii,
      StormKind::chicago, StormKind::idf_block, StormKind::block};
  auto same = [](std::string_view a, std::string_view b) {
    return a.size() == b.size() && std::equal(a.begin(), a.end(), b.begin(), [](char x, char y) {
             return std::tolower(static_cast<unsigned char>(x)) ==
                    std::tolower(static_cast<unsigned char>(y));
           });
  };
  std::string names;
  for (StormKind kind : kKinds) {
    if (same(text, storm_kind_name(kind))) return kind;
    if (!names.empty()) names += ", ";
    names += storm_kind_name(kind);
  }
  fail("--kind", "unknown storm kind '" + std::string(text) + "'; expected one of " + names);
}

std::string_view storm_kind_name(StormKind kind) {
  switch (kind) {
    case StormKind::nrcs_i:
      return "nrcs-I";
    case StormKind::nrcs_ia:
      return "nrcs-IA";
    case StormKind::nrcs_ii:
      return "nrcs-II";
    case StormKind::nrcs_iii:
      return "nrcs-III";
    case StormKind::chicago:
      return "chicago";
    case StormKind::idf_block:
      return "idf-block";
    case StormKind::block:
      return "block";
  }
  return "block";
}

}  // namespace gutterwatt
