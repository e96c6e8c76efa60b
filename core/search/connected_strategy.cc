#include "core/search/connected_strategy.h"

#include <algorithm>
#include <cmath>

#include "core/graph/connected_sets.h"
#include "core/memo/hash_memo.h"

namespace sliceplan {
namespace {

constexpr int kHitRateSamples = 4096;

// Presence words read per hit-rate estimate, about: past this, one word in
// words / kHitRateWords (chosen by a hash of its number, so no relation's
// bit is left out the way a plain stride would leave the low ones) stands
// for the others. A 22-star's estimate read its 2 million sets twice, 6%
// of a slice's time.
constexpr size_t kHitRateWords = 4096;

uint64_t SplitMix(uint64_t& state) {
  uint64_t z = (state += 0x9E3779B97F4A7C15ull);
  z = (z ^ (z >> 30)) * 0xBF58476D1CE4E5B9ull;
  z = (z ^ (z >> 27)) * 0x94D049BB133111EBull;
  return z ^ (z >> 31);
}

// Calls fn(set) for every set of two or more relations in the words of
// `memo` the estimate reads, in increasing order.
template <class Fn>
void ForEachJoinSet(const DirectMemo& memo, Fn&& fn) {
  const std::vector<uint64_t>& words = memo.words();
  const size_t stride = std::max<size_t>(1, words.size() / kHitRateWords);
  for (size_t w = 0; w < words.size(); ++w) {
    if (stride > 1) {
      uint64_t state = w;
      if (SplitMix(state) % stride != 0) continue;
    }
    for (uint64_t bits = words[w]; bits != 0; bits &= bits - 1) {
      const RelSet set = (RelSet{w} << 6) | static_cast<RelSet>(std::countr_zero(bits));
      if (Size(set) >= 2) fn(set);
    }
  }
}

// The splits the every-split pull search tests for `set`.
double TestedSplits(RelSet set) {
  return static_cast<double>((uint64_t{1} << (Size(set) - 1)) - 1);
}

}  // namespace

double DirectMemoBytes(int n, uint64_t bytes_per_slot) {
  return std::ldexp(static_cast<double>(bytes_per_slot), n) +
         static_cast<double>(DirectMemo::BitmapBytes(n));
}

uint64_t DirectSparsity(PlanShape shape, bool hyperedges) {
  return shape == PlanShape::kBushy && !hyperedges ? kPulledSparsity : kDirectSparsity;
}

bool TakesDirectMemo(int n, double sets, uint64_t bytes_per_slot, uint64_t limit,
                     uint64_t sparsity) {
  return n <= kMaxDirectRelations &&
         DirectMemoBytes(n, bytes_per_slot) <= static_cast<double>(limit) &&
         sets * static_cast<double>(sparsity) >= std::ldexp(1.0, n);
}

double ConnectedMemoBytes(int n, double sets, uint64_t bytes_per_slot, uint64_t limit,
                          uint64_t sparsity) {
  if (TakesDirectMemo(n, sets, bytes_per_slot, limit, sparsity)) {
    return DirectMemoBytes(n, bytes_per_slot);
  }
  return sets * static_cast<double>(bytes_per_slot + HashMemo::kBytesPerSet);
}

double EverySplitHitRate(const DirectMemo& connected, int samples) {
  double total = 0;
  ForEachJoinSet(connected, [&](RelSet set) { total += TestedSplits(set); });
  if (total <= 0 || samples <= 0) return 0;
  // Systematic sampling: a split is drawn each time the running split
  // count passes the next multiple of total / samples.
  const double step = total / samples;
  double running = 0, next = step / 2;
  uint64_t state = 0x5111CE;
  int drawn = 0, hits = 0;
  ForEachJoinSet(connected, [&](RelSet set) {
    running += TestedSplits(set);
    const RelSet lowest = LowestBit(set), rest = set ^ lowest;
    for (; next < running && drawn < samples; next += step, ++drawn) {
      RelSet sub = SplitMix(state) & rest;
      while (sub == rest) sub = SplitMix(state) & rest;  // S1 = S is no split
      const RelSet left = sub | lowest, right = set ^ left;
      if (connected.Contains(left) && connected.Contains(right)) ++hits;
    }
  });
  return drawn == 0 ? 0 : static_cast<double>(hits) / drawn;
}

ConnectedStrategy ChooseConnectedStrategy(const Query& query, const JoinGraph& graph,
                                          PlanShape shape, uint64_t bytes_per_slot, uint64_t limit,
                                          std::optional<ConnectedMethod> wanted) {
  ConnectedStrategy out;
  const int n = query.size();
  if (n > kMaxDirectRelations || DirectMemoBytes(n, bytes_per_slot) > static_cast<double>(limit) ||
      wanted == ConnectedMethod::kPushHashed) {
    return out;
  }
  const uint64_t sparsity = DirectSparsity(shape, graph.has_hyperedges());
  const uint64_t enough = std::max<uint64_t>(1, (uint64_t{1} << n) / sparsity);
  if (!wanted && CountConnectedSets(query, enough) < enough) return out;
  out.method = ConnectedMethod::kPushDirect;
  if (graph.has_hyperedges() || wanted == ConnectedMethod::kPushDirect) return out;
  DirectMemo connected(n);
  MarkConnectedSets(query, connected);
  if (shape == PlanShape::kLeftDeep) {  // every left-deep split is one memo bit
    out.method = ConnectedMethod::kPullEverySplit;
    out.connected.emplace(std::move(connected));
    return out;
  }
  if (wanted != ConnectedMethod::kPullSetCcps) {
    out.hit_rate = EverySplitHitRate(connected, kHitRateSamples);
  }
  const bool every_split =
      wanted ? wanted == ConnectedMethod::kPullEverySplit : out.hit_rate >= kEverySplitMinHitRate;
  out.method = every_split ? ConnectedMethod::kPullEverySplit : ConnectedMethod::kPullSetCcps;
  out.connected.emplace(std::move(connected));
  return out;
}

}  // namespace sliceplan
