// Textbook dynamic programs beside sliceplan's exact search, one thread, on
// the same queries: seconds (best of 3, runs interleaved), optimal costs,
// splits and memo bytes of each. The optimal costs must agree within 1e-9
// relative: that is the benchmark's correctness check, and it aborts if not.
//
// Bushy: DPccp, written from the pseudo-code of G. Moerkotte and
// T. Neumann, "Analysis of Two Existing and One New Dynamic Programming
// Algorithm for the Generation of Optimal Bushy Join Trees without Cross
// Products", VLDB 2006: the procedures DPccp, EnumerateCsg, EnumerateCsgRec
// and EnumerateCmp over the neighbourhood N(S, X), written from memory of
// the paper and checked by the optimal costs and csg-cmp pair counts
// agreeing with sliceplan's on every row. Left-deep: the textbook DP over
// connected sets in mask order. Both share nothing with core/ but the Query
// they read (rows, binary predicates and their selectivities), and keep the
// paper's textbook memo: a direct array of 2^n entries (24 bytes each)
// indexed by the relation set's mask. Cost model C_out: leaf 0, a join
// card(L u R) + C_out(L) + C_out(R), which is symmetric, so each csg-cmp
// pair is costed in one order only.
//
// sliceplan: SolveSlice with P = 1, no cross products, cout, one thread.
// Queries: testing::MakeQuery(kRandom or kStar, n, seed 1). Not a test:
// run by hand.
//
//   build/bench/textbook_bench [N ...]
//   (default: 18 20 22, random and star, bushy and left-deep, and random 24
//   bushy; sizes given run all four rows each)
#include <sys/resource.h>

#include <algorithm>
#include <bit>
#include <chrono>
#include <cmath>
#include <cstdint>
#include <cstdio>
#include <cstdlib>
#include <limits>
#include <memory>
#include <string>
#include <vector>

#include "absl/strings/numbers.h"
#include "core/slice_solver.h"
#include "tests/support/test_queries.h"

namespace sliceplan {
namespace {

using testing::GraphShape;
using Clock = std::chrono::steady_clock;

constexpr double kInfinity = std::numeric_limits<double>::infinity();

[[noreturn]] void Die(const std::string& message) {
  std::fprintf(stderr, "textbook_bench: %s\n", message.c_str());
  std::exit(1);
}

double SecondsSince(Clock::time_point start) {
  return std::chrono::duration<double>(Clock::now() - start).count();
}

// ---------------------------------------------------------------------------
// The textbook side. Relation sets are plain uint64_t masks.

// The join graph as the textbook reads it from the Query: rows, adjacency
// masks and a matrix of selectivities (1 where no predicate).
struct Graph {
  int n = 0;
  std::vector<double> rows;
  std::vector<uint64_t> adjacent;   // relation -> its neighbours
  std::vector<double> selectivity;  // [u * n + v]
};

Graph ReadGraph(const Query& query) {
  Graph g;
  g.n = query.size();
  g.adjacent.assign(g.n, 0);
  g.selectivity.assign(static_cast<size_t>(g.n) * g.n, 1.0);
  for (const Relation& r : query.relations()) g.rows.push_back(r.rows);
  for (const Predicate& p : query.predicates()) {
    if (std::popcount(p.relations) != 2) Die("the textbook takes binary predicates only");
    const int u = std::countr_zero(p.relations);
    const int v = std::countr_zero(p.relations & (p.relations - 1));
    g.adjacent[u] |= uint64_t{1} << v;
    g.adjacent[v] |= uint64_t{1} << u;
    g.selectivity[u * g.n + v] *= p.selectivity;
    g.selectivity[v * g.n + u] *= p.selectivity;
  }
  return g;
}

// The product of the selectivities of the edges between disjoint s1 and s2,
// walked from the smaller side.
double SelectivityBetween(const Graph& g, uint64_t s1, uint64_t s2) {
  if (std::popcount(s1) > std::popcount(s2)) std::swap(s1, s2);
  double sel = 1;
  for (; s1 != 0; s1 &= s1 - 1) {
    const int u = std::countr_zero(s1);
    for (uint64_t across = g.adjacent[u] & s2; across != 0; across &= across - 1) {
      sel *= g.selectivity[u * g.n + std::countr_zero(across)];
    }
  }
  return sel;
}

// One memo entry, the paper's BestPlan(S): C_out, cardinality, and the
// best plan's left input (its right input is S minus it).
struct Entry {
  double cost;
  double card;  // 0 until S is first reached (every reached card is > 0)
  uint64_t left;
};

// 2^n entries, zeroed by calloc: untouched pages cost no memory or time.
struct FreeDeleter {
  void operator()(void* p) const { std::free(p); }
};
using Memo = std::unique_ptr<Entry[], FreeDeleter>;

Memo NewMemo(int n) {
  auto* entries = static_cast<Entry*>(std::calloc(size_t{1} << n, sizeof(Entry)));
  if (entries == nullptr) Die("no memory for the textbook memo");
  return Memo(entries);
}

uint64_t MemoBytes(int n) { return (uint64_t{1} << n) * sizeof(Entry); }

// Fills the entry of a set on its first reach: card(S1 u S2) =
// card(S1) card(S2) times the selectivities between them; cost unknown.
Entry& Reach(const Graph& g, Entry* memo, uint64_t s1, uint64_t s2) {
  Entry& e = memo[s1 | s2];
  if (e.card == 0) {
    e.card = memo[s1].card * memo[s2].card * SelectivityBetween(g, s1, s2);
    if (!(e.card > 0)) Die("a cardinality underflowed to 0");
    e.cost = kInfinity;
  }
  return e;
}

void InitLeaves(const Graph& g, Entry* memo) {
  for (int i = 0; i < g.n; ++i) memo[uint64_t{1} << i] = {0, g.rows[i], 0};
}

struct TextbookResult {
  double cost = 0;
  uint64_t pairs = 0;  // csg-cmp pairs (bushy) or (set, last relation) splits
  uint64_t memo_bytes = 0;
};

// DPccp over a direct memo.
class DpCcp {
 public:
  explicit DpCcp(const Graph& g) : g_(g), memo_(NewMemo(g.n)) { InitLeaves(g_, memo_.get()); }

  // DPccp: every csg-cmp pair (S1, S2) in the order EnumerateCsg and
  // EnumerateCmp produce them (each pair's parts are complete by then),
  // joined into BestPlan(S1 u S2).
  TextbookResult Run() {
    EnumerateCsg();
    const uint64_t all = (uint64_t{1} << g_.n) - 1;
    return {memo_[all].cost, pairs_, MemoBytes(g_.n)};
  }

 private:
  // N(S, X): the neighbours of S outside S and X.
  uint64_t Neighbourhood(uint64_t s, uint64_t x) const {
    uint64_t n = 0;
    for (uint64_t rest = s; rest != 0; rest &= rest - 1) n |= g_.adjacent[std::countr_zero(rest)];
    return n & ~(s | x);
  }

  // EnumerateCsg: for i = n-1 down to 0, emit {v_i} and every connected
  // set grown from it within the relations above i (EnumerateCsgRec with
  // X = B_i = {v_0 .. v_i}). For each csg S1, EnumerateCmp(S1).
  void EnumerateCsg() {
    for (int i = g_.n - 1; i >= 0; --i) {
      const uint64_t v = uint64_t{1} << i;
      const auto on_csg = [this](uint64_t s1) { EnumerateCmp(s1); };
      on_csg(v);
      EnumerateCsgRec(v, (v << 1) - 1, on_csg);
    }
  }

  // EnumerateCsgRec(S, X): with N = N(S, X), emit S u S' for every
  // non-empty S' of N first, then recurse on each (S u S', X u N).
  template <class Emit>
  void EnumerateCsgRec(uint64_t s, uint64_t x, const Emit& emit) {
    const uint64_t n = Neighbourhood(s, x);
    if (n == 0) return;
    for (uint64_t sub = n & (0 - n); sub != 0; sub = (sub - n) & n) emit(s | sub);
    for (uint64_t sub = n & (0 - n); sub != 0; sub = (sub - n) & n)
      EnumerateCsgRec(s | sub, x | n, emit);
  }

  // EnumerateCmp(S1): with X = B_min(S1) u S1 and N = N(S1, X), for each
  // v_i of N by decreasing i, emit {v_i} and every connected set grown
  // from it outside X u (B_i n N); each is a complement S2 of S1.
  void EnumerateCmp(uint64_t s1) {
    const uint64_t lowest = s1 & (0 - s1);
    const uint64_t x = ((lowest << 1) - 1) | s1;
    const uint64_t n = Neighbourhood(s1, x);
    const auto on_cmp = [this, s1](uint64_t s2) { Join(s1, s2); };
    for (uint64_t rest = n; rest != 0;) {
      const int i = 63 - std::countl_zero(rest);
      const uint64_t v = uint64_t{1} << i;
      rest &= ~v;
      on_cmp(v);
      EnumerateCsgRec(v, x | (n & ((v << 1) - 1)), on_cmp);
    }
  }

  // One csg-cmp pair: C_out is symmetric, so one order is costed.
  void Join(uint64_t s1, uint64_t s2) {
    ++pairs_;
    Entry* memo = memo_.get();
    Entry& e = Reach(g_, memo, s1, s2);
    const double cost = e.card + memo[s1].cost + memo[s2].cost;
    if (cost < e.cost) {
      e.cost = cost;
      e.left = s1;
    }
  }

  const Graph& g_;
  Memo memo_;
  uint64_t pairs_ = 0;
};

// The textbook left-deep DP over connected sets in mask order (every
// S minus one relation precedes S): cost(S) = min over r in S, S \ {r}
// connected and r joined to it by an edge, of cost(S \ {r}) + card(S).
// A set no such r reaches is not connected and stays unreached.
TextbookResult LeftDeepDp(const Graph& g) {
  Memo memo = NewMemo(g.n);
  InitLeaves(g, memo.get());
  uint64_t pairs = 0;
  const uint64_t all = (uint64_t{1} << g.n) - 1;
  for (uint64_t s = 1; s <= all; ++s) {
    if ((s & (s - 1)) == 0) continue;  // a leaf
    for (uint64_t rest = s; rest != 0; rest &= rest - 1) {
      const int r = std::countr_zero(rest);
      const uint64_t left = s & ~(uint64_t{1} << r);
      if (memo[left].card == 0 || (g.adjacent[r] & left) == 0) continue;
      ++pairs;
      Entry& e = Reach(g, memo.get(), left, uint64_t{1} << r);
      const double cost = memo[left].cost + e.card;
      if (cost < e.cost) {
        e.cost = cost;
        e.left = left;
      }
    }
  }
  return {memo[all].cost, pairs, MemoBytes(g.n)};
}

TextbookResult RunTextbook(const Query& query, PlanShape shape) {
  const Graph g = ReadGraph(query);
  return shape == PlanShape::kBushy ? DpCcp(g).Run() : LeftDeepDp(g);
}

// ---------------------------------------------------------------------------
// sliceplan's side and the table.

struct SliceplanResult {
  double cost = 0;
  uint64_t splits = 0;
  uint64_t memo_bytes = 0;
};

SliceplanResult RunSliceplan(const Query& query, PlanShape shape) {
  SearchControl control;
  absl::StatusOr<SliceResult> result =
      SolveSlice(query, SearchOptions{shape, /*cross_products=*/false, CostModelKind::kCout},
                 SliceSpec{0, 1}, control);
  if (!result.ok()) Die(std::string(result.status().message()));
  if (!result->plan) Die("sliceplan returned no plan");
  if (shape == PlanShape::kLeftDeep && !IsLeftDeep(*result->plan)) {
    Die("sliceplan's left-deep plan is not left-deep");
  }
  return {result->plan->root().cost, result->stats.splits, result->stats.memo_bytes};
}

struct Case {
  GraphShape graph;
  int n;
  PlanShape shape;
};

const char* PlanName(PlanShape shape) { return shape == PlanShape::kBushy ? "bushy" : "left-deep"; }

void PrintHeader() {
  std::printf("%3s %-6s %-9s | %9s %9s %7s | %-22s %-22s | %11s %11s | %11s %11s\n", "n", "graph",
              "plan", "tb_s", "sp_s", "sp/tb", "tb_cost", "sp_cost", "tb_pairs", "sp_splits",
              "tb_memo_B", "sp_memo_B");
}

// Best of three runs each, the textbook's and sliceplan's interleaved so
// both see the same load; aborts unless the optimal costs agree.
void Compare(const Case& c) {
  const Query query = testing::MakeQuery(c.graph, c.n, 1);
  double tb_seconds = kInfinity;
  double sp_seconds = kInfinity;
  TextbookResult tb;
  SliceplanResult sp;
  for (int rep = 0; rep < 3; ++rep) {
    Clock::time_point start = Clock::now();
    tb = RunTextbook(query, c.shape);
    tb_seconds = std::min(tb_seconds, SecondsSince(start));
    start = Clock::now();
    sp = RunSliceplan(query, c.shape);
    sp_seconds = std::min(sp_seconds, SecondsSince(start));
  }
  const std::string name =
      testing::ShapeName(c.graph) + " " + std::to_string(c.n) + " " + PlanName(c.shape);
  if (!(std::abs(tb.cost - sp.cost) <= 1e-9 * std::max(std::abs(tb.cost), std::abs(sp.cost)))) {
    char costs[128];
    std::snprintf(costs, sizeof(costs), "textbook %.17g, sliceplan %.17g", tb.cost, sp.cost);
    Die("optimal costs differ on " + name + ": " + costs);
  }
  std::printf(
      "%3d %-6s %-9s | %9.4f %9.4f %7.2f | %-22.15e %-22.15e | %11llu %11llu | %11llu %11llu\n",
      c.n, testing::ShapeName(c.graph).c_str(), PlanName(c.shape), tb_seconds, sp_seconds,
      sp_seconds / tb_seconds, tb.cost, sp.cost, static_cast<unsigned long long>(tb.pairs),
      static_cast<unsigned long long>(sp.splits), static_cast<unsigned long long>(tb.memo_bytes),
      static_cast<unsigned long long>(sp.memo_bytes));
  std::fflush(stdout);
}

std::vector<Case> Cases(const std::vector<int>& sizes, bool with_random_24) {
  std::vector<Case> cases;
  for (PlanShape shape : {PlanShape::kBushy, PlanShape::kLeftDeep}) {
    for (int n : sizes) {
      for (GraphShape graph : {GraphShape::kRandom, GraphShape::kStar})
        cases.push_back({graph, n, shape});
    }
    if (with_random_24 && shape == PlanShape::kBushy) {
      cases.push_back({GraphShape::kRandom, 24, shape});
    }
  }
  return cases;
}

double PeakRssBytes() {
  rusage usage{};
  getrusage(RUSAGE_SELF, &usage);
  return 1024.0 * static_cast<double>(usage.ru_maxrss);  // Linux: KiB
}

}  // namespace
}  // namespace sliceplan

int main(int argc, char** argv) {
  std::vector<int> sizes;
  for (int i = 1; i < argc; ++i) {
    int n = 0;
    if (!absl::SimpleAtoi(argv[i], &n) || n < 2 || n > 28) {
      std::fprintf(stderr, "bad size %s: want N in [2, 28]\n", argv[i]);
      return 2;
    }
    sizes.push_back(n);
  }
  const bool defaults = sizes.empty();
  if (defaults) sizes = {18, 20, 22};
  sliceplan::PrintHeader();
  for (const sliceplan::Case& c : sliceplan::Cases(sizes, defaults)) sliceplan::Compare(c);
  std::printf(
      "peak RSS of the process: %.0f bytes (one number for all rows; see the memo "
      "columns per row)\n",
      sliceplan::PeakRssBytes());
  return 0;
}
