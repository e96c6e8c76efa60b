// How a connected-only search runs: which memo and which enumerator
// (docs/benchmarks.md, "Connected-only search").
//   push, hashed:   DPhyp over a hash memo, when 2^n sets do not fit the
//                   memo limit or few of them are connected;
//   push, direct:   DPhyp (or the left-deep push) over a direct memo
//                   (slot = set), for hyperedges;
//   pull, every split: every split of every connected set tested by memo
//                   bits: bushy (connected_pull.h) when most splits are
//                   csg-cmp pairs (dense graphs), every left-deep search
//                   (connected_left_deep.h); no hyperedge;
//   pull, set ccps: each connected set's csg-cmp pairs walked from the
//                   set (set_ccp_walk.h), the other bushy searches
//                   over binary predicates.
// Pure functions of the query and the limits; thread-safe.
#ifndef SLICEPLAN_CORE_SEARCH_CONNECTED_STRATEGY_H_
#define SLICEPLAN_CORE_SEARCH_CONNECTED_STRATEGY_H_

#include <cstdint>
#include <optional>

#include "core/graph/join_graph.h"
#include "core/memo/direct_memo.h"
#include "core/model/plan_shape.h"
#include "core/model/query.h"

namespace sliceplan {

enum class ConnectedMethod { kPushHashed, kPushDirect, kPullEverySplit, kPullSetCcps };

// A direct memo is used only when at least one set in this many is
// connected: below that its 2^n entries cost more to clear than hashing
// (DPhyp: direct and hashed memos cost alike near one set in 20).
inline constexpr uint64_t kDirectSparsity = 16;
// The same for the pulled searches (every split, set ccps), which take their
// pairs at half the hashed DPhyp's time or less down to one set in 20 and
// pay about a nanosecond per slot of the 2^n (docs/benchmarks.md).
inline constexpr uint64_t kPulledSparsity = 64;
// The density rule's sparsity for a search of `shape` plans over a graph
// with or without hyperedges.
uint64_t DirectSparsity(PlanShape shape, bool hyperedges);
// The every-split pull search is chosen when at least this share of the splits
// it tests are csg-cmp pairs: it tests a split in about the time DPhyp
// spends per pair times this share (measured, docs/benchmarks.md).
inline constexpr double kEverySplitMinHitRate = 0.25;

struct ConnectedStrategy {
  ConnectedMethod method = ConnectedMethod::kPushHashed;
  // kPullEverySplit and kPullSetCcps: the connected sets, marked.
  // Otherwise empty.
  std::optional<DirectMemo> connected;
  double hit_rate = 0;  // the sampled share (0 when not sampled)
};

// The strategy for `query` (in the search's numbering) with a policy of
// `bytes_per_slot` memo bytes per set and a memo limit of `limit` bytes.
// `wanted` (tests) skips the density and hit-rate rules, not the limits:
// a direct memo still needs 2^n sets within the limit, and the pull
// searches bushy plans over binary predicates.
ConnectedStrategy ChooseConnectedStrategy(const Query& query, const JoinGraph& graph,
                                          PlanShape shape, uint64_t bytes_per_slot, uint64_t limit,
                                          std::optional<ConnectedMethod> wanted = std::nullopt);

// Bytes of a direct memo over n relations with `bytes_per_slot` per set.
double DirectMemoBytes(int n, uint64_t bytes_per_slot);
// Whether a search over `sets` connected sets of n relations takes a
// direct memo by the limit and the density rule (`sparsity`:
// DirectSparsity).
bool TakesDirectMemo(int n, double sets, uint64_t bytes_per_slot, uint64_t limit,
                     uint64_t sparsity);
// Bytes of the memo a search over `sets` connected sets of n relations
// would use: direct where ChooseConnectedStrategy would take it by the
// density rule (`sparsity`: DirectSparsity), else hashed.
double ConnectedMemoBytes(int n, double sets, uint64_t bytes_per_slot, uint64_t limit,
                          uint64_t sparsity);

// The share of the splits the every-split pull search would test (S1 holding
// S's lowest relation, S1 != S, over every connected S of two or more
// relations) whose two sides are both connected, estimated from `samples`
// splits drawn with probability proportional to each set's split count,
// among the sets of about 4,096 presence words (all of them up to 18
// relations; past that a hashed choice of words). 0 when there is no set
// of two or more relations. Deterministic.
double EverySplitHitRate(const DirectMemo& connected, int samples);

}  // namespace sliceplan

#endif  // SLICEPLAN_CORE_SEARCH_CONNECTED_STRATEGY_H_
