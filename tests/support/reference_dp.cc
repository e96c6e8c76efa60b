#include "tests/support/reference_dp.h"

#include <algorithm>
#include <cstdint>
#include <limits>
#include <vector>

namespace sliceplan::testing {
namespace {

constexpr double kInf = std::numeric_limits<double>::infinity();

// card of every subset, by index = mask: rows of the members times the
// selectivity of every predicate inside.
std::vector<double> CardTable(const Query& q) {
  const uint32_t full = (uint32_t{1} << q.size()) - 1;
  std::vector<double> card(full + 1, 1.0);
  for (uint32_t s = 1; s <= full; ++s) {
    for (int i = 0; i < q.size(); ++i) {
      if ((s >> i) & 1) card[s] *= q.relations()[i].rows;
    }
    for (const Predicate& p : q.predicates()) {
      if ((p.relations & s) == p.relations) card[s] *= p.selectivity;
    }
  }
  return card;
}

// True when some predicate lies inside l | r and touches both.
bool Joined(const Query& q, uint32_t l, uint32_t r) {
  for (const Predicate& p : q.predicates()) {
    const uint64_t m = p.relations;
    if ((m & (l | r)) == m && (m & l) != 0 && (m & r) != 0) return true;
  }
  return false;
}

double Solve(const Query& q, bool cross_products, bool left_deep) {
  const uint32_t full = (uint32_t{1} << q.size()) - 1;
  const std::vector<double> card = CardTable(q);
  std::vector<double> best(full + 1, kInf);
  for (int i = 0; i < q.size(); ++i) best[uint32_t{1} << i] = 0;
  for (uint32_t s = 1; s <= full; ++s) {
    if ((s & (s - 1)) == 0) continue;  // a single relation
    for (uint32_t l = (s - 1) & s; l != 0; l = (l - 1) & s) {
      const uint32_t r = s ^ l;
      if (left_deep && (r & (r - 1)) != 0) continue;  // right must be one relation
      if (best[l] == kInf || best[r] == kInf) continue;
      if (!cross_products && !Joined(q, l, r)) continue;
      best[s] = std::min(best[s], card[s] + best[l] + best[r]);
    }
  }
  return best[full];
}

}  // namespace

double DpBestBushy(const Query& query, bool cross_products) {
  return Solve(query, cross_products, false);
}

double DpBestLeftDeep(const Query& query, bool cross_products) {
  return Solve(query, cross_products, true);
}

}  // namespace sliceplan::testing
