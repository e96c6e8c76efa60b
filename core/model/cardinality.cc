#include "core/model/cardinality.h"

#include <bit>
#include <cmath>

#include "core/model/value_range.h"

namespace sliceplan {
namespace {

// The plain product is trusted while every partial product stays inside
// this range: a partial product lies between the product of all factors
// below 1 and the product of all factors above 1.
constexpr double kSmallest = 1e-290;

}  // namespace

Cardinality::Cardinality(const Query& query)
    : predicates_(query.predicates().begin(), query.predicates().end()),
      listed_(query.shared_listed()) {
  double above = 1, below = 1;
  for (const Relation& rel : query.relations()) {
    rows_.push_back(rel.rows);
    log_rows_.push_back(std::log(rel.rows));
    (rel.rows > 1 ? above : below) *= rel.rows;
  }
  for (const Predicate& p : predicates_) {
    log_selectivities_.push_back(std::log(p.selectivity));
    below *= p.selectivity;
  }
  wide_range_ = !(above < kValueCeiling && below > kSmallest);
  if (query.has_joins()) tree_ = std::make_shared<const JoinTree>(query);
  // OfJoin composes the model's product; listed estimates do not compose.
  pairwise_ = !wide_range_ && !listed_ && !tree_;
  for (const Predicate& p : predicates_) pairwise_ = pairwise_ && Size(p.relations) == 2;
  if (!pairwise_) return;
  partners_.assign(rows_.size(), 0);
  pair_selectivity_.assign(rows_.size() * kMaxRelations, 1.0);
  for (const Predicate& p : predicates_) {
    const int u = std::countr_zero(p.relations);
    const int v = 63 - std::countl_zero(p.relations);
    partners_[u] |= RelSet{1} << v;
    partners_[v] |= RelSet{1} << u;
    pair_selectivity_[u * kMaxRelations + v] *= p.selectivity;
    pair_selectivity_[v * kMaxRelations + u] *= p.selectivity;
  }
}

RelSet Cardinality::ComponentOf(RelSet x, RelSet seed) const {
  RelSet reached = seed;
  for (bool grew = true; grew;) {
    grew = false;
    for (const Predicate& p : predicates_) {
      if ((p.relations & reached) != 0 && (p.relations & ~reached) != 0 &&
          IsSubset(p.relations, x)) {
        reached |= p.relations;
        grew = true;
      }
    }
  }
  return reached;
}

double Cardinality::LogSelectivityCompletedBy(RelSet v, RelSet x) const {
  double sum = 0;
  for (size_t j = 0; j < predicates_.size(); ++j) {
    const RelSet r = predicates_[j].relations;
    if ((r & v) != 0 && IsSubset(r, x)) sum += log_selectivities_[j];
  }
  return sum;
}

double Cardinality::OfListed(RelSet x) const {
  if (const auto rows = listed_->Find(x)) return Saturate(*rows);
  if (tree_) return tree_->Estimate(x);
  if ((x & (x - 1)) == 0) return rows_[std::countr_zero(x)];
  const RelSet first = ComponentOf(x, LowestBit(x));
  if (first != x) {
    // No predicate spans two components: the product of theirs.
    return Saturate(std::exp(std::log(OfListed(first)) + std::log(OfListed(x ^ first))));
  }
  RelSet v = 0;
  for (RelSet m = x; m != 0 && v == 0; m &= m - 1) {
    if (listed_->Find(x ^ LowestBit(m))) v = LowestBit(m);
  }
  if (v == 0) v = RelSet{1} << (63 - std::countl_zero(x));
  const double log_card =
      std::log(OfListed(x ^ v)) + std::log(OfListed(v)) + LogSelectivityCompletedBy(v, x);
  return Saturate(std::exp(log_card));
}

double Cardinality::OfByProduct(RelSet x) const {
  double card = 1;
  ForEachMember(x, [&](RelationId r) { card *= rows_[r.value]; });
  // Branch-free, the factor picked by masks (x times 1.0 is x exactly, so
  // the product is the same; GCC turns a ?: back into the branch): whether
  // a predicate lies inside a set is a coin toss from set to set, so a
  // branch per predicate is mispredicted half the time (the cost in a
  // large idp run: docs/benchmarks.md).
  constexpr uint64_t kOne = std::bit_cast<uint64_t>(1.0);
  for (const Predicate& p : predicates_) {
    const uint64_t inside = uint64_t{0} - static_cast<uint64_t>(IsSubset(p.relations, x));
    card *=
        std::bit_cast<double>((std::bit_cast<uint64_t>(p.selectivity) & inside) | (kOne & ~inside));
  }
  return card;
}

double Cardinality::OfByLogs(RelSet x) const {
  double log_card = 0;
  ForEachMember(x, [&](RelationId r) { log_card += log_rows_[r.value]; });
  for (size_t j = 0; j < predicates_.size(); ++j) {
    if (IsSubset(predicates_[j].relations, x)) log_card += log_selectivities_[j];
  }
  // log(1e300) is about 690.8; exp past 709 overflows, so test first.
  if (log_card >= std::log(kValueCeiling)) return kValueCeiling;
  return std::exp(log_card);
}

bool Cardinality::Connects(RelSet left, RelSet right) const {
  const RelSet both = left | right;
  for (const Predicate& p : predicates_) {
    if (IsSubset(p.relations, both) && (p.relations & left) != 0 && (p.relations & right) != 0) {
      return true;
    }
  }
  return false;
}

}  // namespace sliceplan
