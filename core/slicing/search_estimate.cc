#include "core/slicing/search_estimate.h"

#include <cmath>

namespace sliceplan {

double DenseSlots(int n, PlanShape shape, int k) {
  const int f = n - RelationsPerConstraint(shape) * k;
  const double radix = shape == PlanShape::kBushy ? 7 : 3;
  return std::pow(radix, k) * std::ldexp(1.0, f);
}

double DenseSplits(int n, PlanShape shape, int k, bool symmetric) {
  const int f = n - RelationsPerConstraint(shape) * k;
  if (shape == PlanShape::kLeftDeep) {
    const double pairs_part = k == 0 ? 0.0 : 2.0 * k * std::pow(3.0, k - 1) * std::ldexp(1.0, f);
    const double free_part = f == 0 ? 0.0 : f * std::ldexp(1.0, f - 1) * std::pow(3.0, k);
    return free_part + pairs_part - (f + k);
  }
  const double ordered =
      std::pow(3.0, f) * std::pow(21.0, k) - 2.0 * std::ldexp(1.0, f) * std::pow(7.0, k) + 1.0;
  return symmetric ? ordered / 2 : ordered;
}

}  // namespace sliceplan
