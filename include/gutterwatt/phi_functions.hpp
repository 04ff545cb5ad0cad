#pragma once
/// The functions of exponential integrators, phi_0(z) = e^z and phi_{k+1}(z) = (phi_k(z) - 1/k!) /
/// z (Hochbruck & Ostermann 2010, Acta Numerica 19, "Exponential integrators", section 2; from
/// memory): phi_k(h lambda) h^k weighs the k-th power of time in the exact solution of
/// y' = lambda y + a polynomial forcing over a step h.

#include <array>

namespace gutterwatt {

/// Below this |z| the series is summed; from it on, the recurrence from e^z.
inline constexpr double kPhiSeriesBelow = 0.25;

/// phi_1(z) .. phi_K(z) for K = 1, 2 or 3. Near 0, where the recurrence cancels, their series
/// sum_j z^j / (j + k)!; elsewhere the recurrence from e^z.
template <int K>
std::array<double, K> phi_functions(double z);
/// The same with e^z known (read only where |z| >= kPhiSeriesBelow).
template <int K>
std::array<double, K> phi_functions(double z, double exp_z);

}  // namespace gutterwatt
