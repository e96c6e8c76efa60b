#include "tiers/linear_dp.h"

#include <algorithm>
#include <cstring>
#include <limits>
#include <memory>
#include <utility>

#include "absl/strings/str_cat.h"
#include "core/cost/cout_model.h"
#include "core/model/status_macros.h"
#include "core/model/value_range.h"
#include "tiers/ikkbz.h"
#include "tiers/join_forest.h"

namespace sliceplan {
namespace {

constexpr double kInf = std::numeric_limits<double>::infinity();
constexpr int32_t kNever = std::numeric_limits<int32_t>::max();

// The least left[k] + right[k + 1] over k in [i, j) with joinable(k).
// Four minima, k taken round-robin: with one, each split's min waits for
// the last one's (its latency, several cycles), not for its own loads.
// The least of the four is the same value (min is exact), so the split the
// caller finds by scanning for it is the same too.
template <class Joinable>
double LeastSplit(const double* left, const double* right, int i, int j, Joinable joinable) {
  const auto at = [&](int k) { return joinable(k) ? left[k] + right[k + 1] : kInf; };
  double m0 = kInf, m1 = kInf, m2 = kInf, m3 = kInf;
  int k = i;
  for (; k + 4 <= j; k += 4) {
    m0 = std::min(m0, at(k));
    m1 = std::min(m1, at(k + 1));
    m2 = std::min(m2, at(k + 2));
    m3 = std::min(m3, at(k + 3));
  }
  for (; k < j; ++k) m0 = std::min(m0, at(k));
  return std::min(std::min(m0, m1), std::min(m2, m3));
}

// LeastSplit for every k joinable (cross products allowed), two k at a
// time in a pair of doubles (GCC's and clang's vector extension: SSE2 on
// x86-64, NEON on arm64, plain code elsewhere), two pairs in flight.
double LeastSplitAll(const double* left, const double* right, int i, int j) {
  using Pair = double __attribute__((vector_size(16)));
  Pair m0 = {kInf, kInf}, m1 = m0;
  int k = i;
  for (; k + 4 <= j; k += 4) {
    Pair l0, r0, l1, r1;
    std::memcpy(&l0, left + k, sizeof l0);
    std::memcpy(&r0, right + k + 1, sizeof r0);
    std::memcpy(&l1, left + k + 2, sizeof l1);
    std::memcpy(&r1, right + k + 3, sizeof r1);
    const Pair s0 = l0 + r0, s1 = l1 + r1;
    m0 = s0 < m0 ? s0 : m0;
    m1 = s1 < m1 ? s1 : m1;
  }
  double best = std::min(std::min(m0[0], m0[1]), std::min(m1[0], m1[1]));
  for (; k < j; ++k) best = std::min(best, left[k] + right[k + 1]);
  return best;
}

class RunTable {
 public:
  RunTable(const WideQuery& query, const std::vector<int32_t>& order)
      : n_(query.size()),
        card_(size_t(n_) * n_),
        cost_(size_t(n_) * n_, kInf),
        cost_by_end_(size_t(n_) * n_, kInf),
        reach_(size_t(n_) * n_, kNever),
        split_(size_t(n_) * n_, -1),
        connected_ends_(n_) {
    FillCards(query, order);
    FillReach();
  }

  // Bushy: every split of every run. Left-deep: a single relation on the
  // right, taken from either end of the run.
  absl::Status Solve(bool bushy, bool cross_products, SearchControl& control) {
    for (int i = 0; i < n_; ++i) {
      Set(i, i, 0, -1);
      connected_ends_[i].push_back(i);
    }
    // Runs ending at j, from the shortest: each needs only runs inside it,
    // all done by then, and every run of one j reads the same column of
    // cost_by_end_, which stays in cache (by length, each run read another).
    for (int j = 1; j < n_; ++j) {
      for (int i = j - 1; i >= 0; --i) {
        bushy ? SolveBushy(i, j, cross_products) : SolveLeftDeep(i, j, cross_products);
      }
      if (control.Tick(bushy ? uint64_t(j) * (j + 1) / 2 : 2 * uint64_t(j))) {
        return control.status();
      }
    }
    return absl::OkStatus();
  }

  bool Solved() const { return cost_[At(0, n_ - 1)] < kInf; }

  // The plan of run [0, n-1] in order's relations, built without recursion.
  WidePlan Build(const std::vector<int32_t>& order) const {
    WidePlan plan;
    struct Frame {
      int i, j;
      int next = 0;  // 0: build the lower part, 1: the higher part, 2: join them
    };
    std::vector<Frame> stack{{0, n_ - 1}};
    std::vector<int32_t> results;
    while (!stack.empty()) {
      Frame& f = stack.back();
      if (f.i == f.j) {
        results.push_back(AddLeaf(plan, order[f.i]));
        stack.pop_back();
        continue;
      }
      const int32_t k = split_[At(f.i, f.j)];
      // Left-deep splits at k = i put relation i on the right.
      const bool right_single_low = k < 0;
      const int lo_i = right_single_low ? f.i + 1 : f.i;
      const int lo_j = right_single_low ? f.j : k;
      const int hi_i = right_single_low ? f.i : k + 1;
      const int hi_j = right_single_low ? f.i : f.j;
      if (f.next == 0) {
        f.next = 1;
        stack.push_back({lo_i, lo_j});
      } else if (f.next == 1) {
        f.next = 2;
        stack.push_back({hi_i, hi_j});
      } else {
        const int32_t right = results.back();
        results.pop_back();
        const int32_t left = results.back();
        results.pop_back();
        results.push_back(AddJoin(plan, left, right));
        stack.pop_back();
      }
    }
    return plan;
  }

 private:
  size_t At(int i, int j) const { return size_t(i) * n_ + j; }
  size_t AtByEnd(int i, int j) const { return size_t(j) * n_ + i; }

  void Set(int i, int j, double cost, int32_t split) {
    cost_[At(i, j)] = cost;
    cost_by_end_[AtByEnd(i, j)] = cost;
    split_[At(i, j)] = split;
  }

  // card(i, j) = card(i, j-1) rows(j) times the selectivity of each
  // predicate whose last position is j and first is at or after i.
  void FillCards(const WideQuery& query, const std::vector<int32_t>& order) {
    std::vector<int32_t> position(n_);
    for (int i = 0; i < n_; ++i) position[order[i]] = i;
    std::vector<std::vector<std::pair<int32_t, double>>> ending(n_);  // (first, selectivity)
    first_of_.assign(n_, {});
    for (const WidePredicate& p : query.predicates()) {
      int32_t first = n_, last = -1;
      for (const int32_t r : p.relations) {
        first = std::min(first, position[r]);
        last = std::max(last, position[r]);
      }
      ending[last].push_back({first, p.selectivity});
      first_of_[first].push_back(last);
    }
    std::vector<double> factor(n_);
    for (int j = 0; j < n_; ++j) {
      std::fill(factor.begin(), factor.begin() + j + 1, 1.0);
      for (const auto& [first, sel] : ending[j]) factor[first] *= sel;
      // factor(i) becomes the product over firsts >= i.
      for (int i = j - 1; i >= 0; --i) factor[i] *= factor[i + 1];
      const double rows = query.relation(order[j]).rows;
      card_[At(j, j)] = rows;
      for (int i = j - 1; i >= 0; --i) {
        card_[At(i, j)] = Saturate(card_[At(i, j - 1)] * rows * factor[i]);
      }
    }
  }

  void FillReach() {
    for (int k = 0; k < n_; ++k) {
      int32_t best = kNever;
      for (int i = k; i >= 0; --i) {
        for (const int32_t last : first_of_[i]) {
          if (last > k) best = std::min(best, last);
        }
        reach_[At(i, k)] = best;
      }
    }
  }

  void SolveBushy(int i, int j, bool cross_products) {
    const double* left = &cost_[At(i, 0)];
    const double* right = &cost_by_end_[AtByEnd(0, j)];
    const int32_t* reach = &reach_[At(i, 0)];
    if (!cross_products && 4 * connected_ends_[i].size() < size_t(j - i)) {
      SolveBushySparse(i, j, left, right, reach);
      return;
    }
    const double best =
        cross_products ? LeastSplitAll(left, right, i, j)
                       : LeastSplit(left, right, i, j, [reach, j](int k) { return reach[k] <= j; });
    if (!(best < kInf)) return;
    int32_t at = i;
    while (!(left[at] + right[at + 1] == best && (cross_products || reach[at] <= j))) ++at;
    const double cost = CoutJoin(card_[At(i, j)], left[at], right[at + 1]);
    // With cross products every run has a plan and the sparse loop never runs.
    cross_products ? Set(i, j, cost, at) : SetConnected(i, j, cost, at);
  }

  // SolveBushy without cross products where few runs starting at i are
  // connected (a star's leaves, a snowflake's branches): only the splits
  // whose lower part is one of them can have a finite cost, so only those
  // are tried. The first least split wins, as in the scan above.
  void SolveBushySparse(int i, int j, const double* left, const double* right,
                        const int32_t* reach) {
    double best = kInf;
    int32_t at = -1;
    for (const int32_t k : connected_ends_[i]) {
      if (reach[k] > j) continue;
      const double v = left[k] + right[k + 1];
      if (v < best) best = v, at = k;
    }
    if (at >= 0) SetConnected(i, j, CoutJoin(card_[At(i, j)], left[at], right[at + 1]), at);
  }

  // Set for a run found connected (a finite cost) without cross products:
  // it joins the runs starting at i that the sparse split loop tries.
  void SetConnected(int i, int j, double cost, int32_t split) {
    Set(i, j, cost, split);
    connected_ends_[i].push_back(j);
  }

  void SolveLeftDeep(int i, int j, bool cross_products) {
    // Relation j on the right (split at j - 1), or relation i (split "-1").
    const bool high_ok = cross_products || reach_[At(i, j - 1)] <= j;
    const bool low_ok = cross_products || reach_[At(i, i)] <= j;
    const double high = high_ok ? cost_[At(i, j - 1)] : kInf;
    const double low = low_ok ? cost_[At(i + 1, j)] : kInf;
    if (!(std::min(high, low) < kInf)) return;
    if (high <= low) {
      Set(i, j, CoutJoin(card_[At(i, j)], high, 0), j - 1);
    } else {
      Set(i, j, CoutJoin(card_[At(i, j)], low, 0), -1);
    }
  }

  const int n_;
  std::vector<double> card_;
  std::vector<double> cost_;                    // [i][j]
  std::vector<double> cost_by_end_;             // [j][i]
  std::vector<int32_t> reach_;                  // [i][k]
  std::vector<int32_t> split_;                  // [i][j]: k, or -1 for "relation i on the right"
  std::vector<std::vector<int32_t>> first_of_;  // per first position: the last positions
  // Per first position i: the ends k of the runs [i, k] with a plan so
  // far, increasing (bushy, no cross products).
  std::vector<std::vector<int32_t>> connected_ends_;
};

}  // namespace

absl::Status CheckLinearSize(const WideQuery& query) {
  if (query.size() <= kMaxLinearRelations) return absl::OkStatus();
  return absl::ResourceExhaustedError(
      absl::StrCat("the linear tier takes at most ", kMaxLinearRelations, " relations (",
                   query.size(), " given); the greedy and idp tiers take more"));
}

absl::StatusOr<WidePlan> LinearizedDp(const WideQuery& query, const std::vector<int32_t>& order,
                                      PlanShape shape, bool cross_products,
                                      SearchControl& control) {
  RETURN_IF_ERROR(CheckLinearSize(query));
  const bool bushy = shape == PlanShape::kBushy;
  auto table = std::make_unique<RunTable>(query, order);
  if (auto s = table->Solve(bushy, cross_products, control); !s.ok()) return s;
  if (!table->Solved()) {
    // Runs of the order joined by hyperedges alone may leave no connected
    // plan; a disconnected join graph never has one.
    if (IsConnected(query)) {
      return absl::FailedPreconditionError(
          "no plan without cross products follows this order of the relations");
    }
    table = std::make_unique<RunTable>(query, order);
    if (auto s = table->Solve(bushy, true, control); !s.ok()) return s;
  }
  WidePlan plan = table->Build(order);
  CostWidePlan(plan, query);
  return plan;
}

absl::StatusOr<WidePlan> LinearPlan(const WideQuery& query, PlanShape shape, bool cross_products,
                                    SearchControl& control, int max_roots) {
  RETURN_IF_ERROR(CheckLinearSize(query));
  return LinearizedDp(query, IkkbzOrder(query, max_roots), shape, cross_products, control);
}

}  // namespace sliceplan
