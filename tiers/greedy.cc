#include "tiers/greedy.h"

#include <algorithm>
#include <functional>
#include <queue>
#include <utility>
#include <vector>

#include "absl/container/flat_hash_map.h"
#include "core/model/value_range.h"

namespace sliceplan {
namespace {

// A candidate join in a min-heap: its result cardinality and the versions
// of both sides when it was pushed.
struct Candidate {
  double card;
  int32_t a, b;
  uint32_t version_a, version_b;
  bool operator>(const Candidate& o) const { return card > o.card; }
};
using MinHeap = std::priority_queue<Candidate, std::vector<Candidate>, std::greater<>>;

using Clock = std::chrono::steady_clock;

// Merges between looks at the clock.
constexpr int kClockEvery = 64;

class GreedyBushy {
 public:
  GreedyBushy(const WideQuery& query, std::optional<Clock::time_point> deadline)
      : query_(query),
        deadline_(deadline),
        parent_(query.size()),
        node_(query.size()),
        card_(query.size()),
        version_(query.size(), 0),
        neighbours_(query.size()),
        hyper_(query.size()),
        done_(query.predicates().size(), 0) {}

  WidePlan Run(GreedyReport& report) {
    Init();
    int components = query_.size();
    while (components > 1) {
      while (!heap_.empty() && components > 1) {
        if (TimeIsUp()) return Cut(report, components);
        const Candidate c = heap_.top();
        heap_.pop();
        if (version_[c.a] != c.version_a || version_[c.b] != c.version_b) continue;
        Merge(c.a, c.b);
        --components;
      }
      if (components == 1) break;
      // Disconnected: cross products, each O(relations); the clock is
      // read here too.
      if (TimeIsUp()) return Cut(report, components);
      CrossTwoSmallest();
      --components;
    }
    report.greedy_joins = query_.size() - 1;
    CostWidePlan(plan_, query_);
    return std::move(plan_);
  }

 private:
  // Every kClockEvery calls, whether the deadline passed.
  bool TimeIsUp() {
    return ++merges_ % kClockEvery == 0 && deadline_ && Clock::now() >= *deadline_;
  }

  // The deadline's answer: the components left joined along the
  // predicates, the plan costed.
  WidePlan Cut(GreedyReport& report, int components) {
    report.cut = true;
    report.greedy_joins = query_.size() - components;
    FinishAlongPredicates();
    CostWidePlan(plan_, query_);
    return std::move(plan_);
  }

  int32_t Find(int32_t r) {
    while (parent_[r] != r) r = parent_[r] = parent_[parent_[r]];
    return r;
  }

  void Link(int32_t a, int32_t b, double selectivity) {
    auto [it, inserted] = neighbours_[a].try_emplace(b, selectivity);
    if (!inserted) it->second *= selectivity;
    auto [back, fresh] = neighbours_[b].try_emplace(a, selectivity);
    if (!fresh) back->second *= selectivity;
  }

  void Push(int32_t a, int32_t b) {
    const double card = Saturate(card_[a] * card_[b] * neighbours_[a].at(b));
    heap_.push({card, a, b, version_[a], version_[b]});
  }

  // Stale entries (a component's old pairs) are dropped once they outnumber
  // the live pairs, which are at most the predicates: memory stays linear
  // in relations plus predicates, whatever the merges push.
  void CompactIfStale() {
    if (heap_.size() <= 4 * (query_.predicates().size() + static_cast<size_t>(query_.size()))) {
      return;
    }
    MinHeap().swap(heap_);
    for (int32_t a = 0; a < query_.size(); ++a) {
      if (Find(a) != a) continue;
      for (const auto& [x, sel] : neighbours_[a]) {
        if (a < x) Push(a, x);
      }
    }
  }

  // Out of time: the components left are joined along the predicates in
  // input order (each predicate joins the components it spans), then by
  // cross products in relation order. O(relations + predicate members).
  void FinishAlongPredicates() {
    for (const WidePredicate& p : query_.predicates()) {
      int32_t first = Find(p.relations[0]);
      for (const int32_t r : p.relations) {
        const int32_t c = Find(r);
        if (c == first) continue;
        JoinComponents(first, c);
        first = Find(first);
      }
    }
    int32_t first = Find(0);
    for (int32_t r = 1; r < query_.size(); ++r) {
      const int32_t c = Find(r);
      if (c == first) continue;
      JoinComponents(first, c);
      first = Find(first);
    }
  }

  // b's component joined under a's, with no neighbour bookkeeping.
  void JoinComponents(int32_t a, int32_t b) {
    node_[a] = AddJoin(plan_, node_[a], node_[b]);
    parent_[b] = a;
  }

  void Init() {
    for (int32_t r = 0; r < query_.size(); ++r) {
      parent_[r] = r;
      node_[r] = AddLeaf(plan_, r);
      card_[r] = query_.relation(r).rows;
    }
    const auto predicates = query_.predicates();
    for (size_t p = 0; p < predicates.size(); ++p) {
      const auto& rels = predicates[p].relations;
      if (rels.size() == 2) {
        Link(rels[0], rels[1], predicates[p].selectivity);
      } else {
        for (const int32_t r : rels) hyper_[r].push_back(static_cast<int32_t>(p));
      }
    }
    for (int32_t a = 0; a < query_.size(); ++a) {
      for (const auto& [b, sel] : neighbours_[a]) {
        if (a < b) Push(a, b);
      }
    }
  }

  // Joins components a and b; the one with more neighbours survives, so
  // the smaller map moves.
  void Merge(int32_t a, int32_t b) {
    if (neighbours_[a].size() + hyper_[a].size() < neighbours_[b].size() + hyper_[b].size()) {
      std::swap(a, b);
    }
    card_[a] = Saturate(card_[a] * card_[b] * neighbours_[a].at(b));
    node_[a] = AddJoin(plan_, node_[a], node_[b]);
    parent_[b] = a;
    ++version_[a];
    ++version_[b];
    neighbours_[a].erase(b);
    for (const auto& [x, sel] : neighbours_[b]) {
      if (x == a) continue;
      neighbours_[x].erase(b);
      Link(a, x, sel);
    }
    absl::flat_hash_map<int32_t, double>().swap(neighbours_[b]);
    MoveHyperedges(b, a);
    for (const auto& [x, sel] : neighbours_[a]) Push(a, x);
    CompactIfStale();
  }

  // A hyperedge whose span changed names relations of both sides, so it is
  // pending on b's side. Spanning two components, it becomes a neighbour
  // link; spanning more, it waits on a.
  void MoveHyperedges(int32_t b, int32_t a) {
    for (const int32_t p : hyper_[b]) {
      if (done_[p]) continue;
      int32_t first = -1, second = -1;
      bool more = false;
      for (const int32_t r : query_.predicates()[p].relations) {
        const int32_t c = Find(r);
        if (first < 0 || c == first) {
          first = c;
        } else if (second < 0 || c == second) {
          second = c;
        } else {
          more = true;
        }
      }
      if (more) {
        hyper_[a].push_back(p);
        continue;
      }
      done_[p] = 1;
      if (second >= 0) Link(first, second, query_.predicates()[p].selectivity);
    }
    std::vector<int32_t>().swap(hyper_[b]);
  }

  // No connected pair is left: the two smallest components, the pair GOO
  // would choose among cross products. A hyperedge may connect pairs again
  // afterwards, so the caller drains the heap before the next one.
  void CrossTwoSmallest() {
    int32_t a = -1, b = -1;
    for (int32_t r = 0; r < query_.size(); ++r) {
      if (Find(r) != r) continue;
      if (a < 0 || card_[r] < card_[a]) {
        b = a;
        a = r;
      } else if (b < 0 || card_[r] < card_[b]) {
        b = r;
      }
    }
    Link(a, b, 1);
    Merge(a, b);
  }

  const WideQuery& query_;
  const std::optional<Clock::time_point> deadline_;
  uint64_t merges_ = 0;  // heap pops, for the clock
  WidePlan plan_;
  std::vector<int32_t> parent_;
  std::vector<int32_t> node_;  // plan node of each component
  std::vector<double> card_;
  std::vector<uint32_t> version_;
  std::vector<absl::flat_hash_map<int32_t, double>> neighbours_;  // component -> selectivity
  std::vector<std::vector<int32_t>> hyper_;  // hyperedges spanning 3+ components
  std::vector<uint8_t> done_;
  MinHeap heap_;
};

class GreedyLeftDeep {
 public:
  explicit GreedyLeftDeep(const WideQuery& query)
      : query_(query),
        inside_(query.size(), 0),
        link_(query.size(), 1),
        version_(query.size(), 0),
        outside_(query.predicates().size()) {
    for (size_t p = 0; p < outside_.size(); ++p) {
      outside_[p] = static_cast<int32_t>(query.predicates()[p].relations.size());
    }
  }

  WidePlan Run() {
    const auto [first, second] = StartPair();
    int32_t top = AddLeaf(plan_, first);
    Add(first);
    top = AddJoin(plan_, top, AddLeaf(plan_, second));
    Add(second);
    for (int joined = 2; joined < query_.size(); ++joined) {
      const int32_t r = Next();
      top = AddJoin(plan_, top, AddLeaf(plan_, r));
      Add(r);
    }
    CostWidePlan(plan_, query_);
    return std::move(plan_);
  }

 private:
  // The binary predicate of least result; else the two smallest relations.
  std::pair<int32_t, int32_t> StartPair() const {
    double best = 0;
    std::pair<int32_t, int32_t> out{-1, -1};
    for (const WidePredicate& p : query_.predicates()) {
      if (p.relations.size() != 2) continue;
      const double card = query_.relation(p.relations[0]).rows *
                          query_.relation(p.relations[1]).rows * p.selectivity;
      if (out.first < 0 || card < best) {
        best = card;
        out = {p.relations[0], p.relations[1]};
      }
    }
    if (out.first >= 0) return out;
    std::vector<int32_t> ids(query_.size());
    for (int32_t r = 0; r < query_.size(); ++r) ids[r] = r;
    std::partial_sort(
        ids.begin(), ids.begin() + std::min<size_t>(2, ids.size()), ids.end(),
        [&](int32_t x, int32_t y) { return query_.relation(x).rows < query_.relation(y).rows; });
    return {ids[0], ids.size() > 1 ? ids[1] : ids[0]};
  }

  // Relation r joins the prefix: every predicate left with one relation
  // outside now links that relation to the prefix.
  void Add(int32_t r) {
    inside_[r] = 1;
    for (const int32_t p : query_.incident(r)) {
      if (--outside_[p] != 1) continue;
      for (const int32_t x : query_.predicates()[p].relations) {
        if (inside_[x]) continue;
        link_[x] *= query_.predicates()[p].selectivity;
        ++version_[x];
        heap_.push({query_.relation(x).rows * link_[x], x, x, version_[x], 0});
      }
    }
  }

  int32_t Next() {
    while (!heap_.empty()) {
      const Candidate c = heap_.top();
      heap_.pop();
      if (!inside_[c.a] && version_[c.a] == c.version_a) return c.a;
    }
    // No relation is connected to the prefix: the smallest one left.
    int32_t best = -1;
    for (int32_t r = 0; r < query_.size(); ++r) {
      if (!inside_[r] && (best < 0 || query_.relation(r).rows < query_.relation(best).rows)) {
        best = r;
      }
    }
    return best;
  }

  const WideQuery& query_;
  WidePlan plan_;
  std::vector<uint8_t> inside_;
  std::vector<double> link_;  // selectivity toward the prefix
  std::vector<uint32_t> version_;
  std::vector<int32_t> outside_;  // per predicate: relations not yet joined
  MinHeap heap_;
};

}  // namespace

WidePlan GreedyPlan(const WideQuery& query, PlanShape shape,
                    std::optional<std::chrono::steady_clock::time_point> deadline,
                    GreedyReport* report) {
  GreedyReport ignored;
  GreedyReport& out = report != nullptr ? *report : ignored;
  out = {};
  if (query.size() == 1) {
    WidePlan plan;
    AddLeaf(plan, 0);
    CostWidePlan(plan, query);
    return plan;
  }
  if (shape == PlanShape::kBushy) return GreedyBushy(query, deadline).Run(out);
  out.greedy_joins = query.size() - 1;
  return GreedyLeftDeep(query).Run();
}

}  // namespace sliceplan
