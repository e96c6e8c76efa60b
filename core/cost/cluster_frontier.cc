#include "core/cost/cluster_frontier.h"

#include <algorithm>

namespace sliceplan {

// In a staircase the entry that could cover a point is the last one with
// latency <= alpha * its latency (the least node-seconds among those that
// could), and the entries a point dominates are one run right after its
// own position: O(log F) per point instead of a scan.
bool StaircaseRule::Covers(const ClusterEntry* begin, const ClusterEntry* end, double lat,
                           double ns) const {
  const ClusterEntry* cover = std::upper_bound(
      begin, end, alpha_ * lat, [&](double v, const ClusterEntry& x) { return v < Lat(x); });
  return cover != begin && Ns(*(cover - 1)) <= alpha_ * ns;
}

void StaircaseRule::Insert(std::vector<ClusterEntry>& v, size_t begin, size_t end,
                           const ClusterEntry& e) const {
  const double lat_e = Lat(e), ns_e = Ns(e);
  if (Covers(v.data() + begin, v.data() + end, lat_e, ns_e)) return;
  // Entries e dominates exactly: latency >= lat_e and node-seconds >= ns_e.
  const auto level_begin = v.begin() + static_cast<std::ptrdiff_t>(begin);
  const auto level_end = v.begin() + static_cast<std::ptrdiff_t>(end);
  const auto first = std::lower_bound(level_begin, level_end, lat_e,
                                      [&](const ClusterEntry& x, double l) { return Lat(x) < l; });
  auto last = first;
  while (last != level_end && Ns(*last) >= ns_e) ++last;
  if (first != last) {  // reuse the first dominated entry's place
    *first = e;
    v.erase(first + 1, last);
  } else {
    v.insert(first, e);
  }
}

namespace {

std::pair<size_t, size_t> LevelRange(const std::vector<ClusterEntry>& v, int64_t level) {
  const auto b = std::lower_bound(v.begin(), v.end(), level,
                                  [](const ClusterEntry& x, int64_t l) { return x.level < l; });
  const auto e = std::upper_bound(b, v.end(), level,
                                  [](int64_t l, const ClusterEntry& x) { return l < x.level; });
  return {static_cast<size_t>(b - v.begin()), static_cast<size_t>(e - v.begin())};
}

}  // namespace

bool FlatFrontier::Covers(const StaircaseRule& rule, int64_t level, double lat, double ns) const {
  const auto [b, e] = LevelRange(v_, level);
  return rule.Covers(v_.data() + b, v_.data() + e, lat, ns);
}

void FlatFrontier::Insert(const StaircaseRule& rule, const ClusterEntry& e) {
  const auto [b, end] = LevelRange(v_, e.level);
  rule.Insert(v_, b, end, e);
}

void LevelFrontier::Clear() {
  for (const uint32_t r : run_) runs_[r].clear();
  keys_.clear();
  run_.clear();
}

const std::vector<ClusterEntry>* LevelFrontier::Find(int64_t level) const {
  const auto it = std::lower_bound(keys_.begin(), keys_.end(), level);
  if (it == keys_.end() || *it != level) return nullptr;
  return &runs_[run_[static_cast<size_t>(it - keys_.begin())]];
}

bool LevelFrontier::Covers(const StaircaseRule& rule, int64_t level, double lat, double ns) const {
  const std::vector<ClusterEntry>* run = Find(level);
  return run != nullptr && rule.Covers(run->data(), run->data() + run->size(), lat, ns);
}

LevelFrontier::Level LevelFrontier::At(int64_t level) {
  const auto it = std::lower_bound(keys_.begin(), keys_.end(), level);
  const auto at = static_cast<size_t>(it - keys_.begin());
  if (it == keys_.end() || *it != level) {
    // A new level takes the next spare vector (kept from earlier sets).
    const auto r = static_cast<uint32_t>(keys_.size());
    if (runs_.size() <= r) runs_.emplace_back();
    keys_.insert(it, level);
    run_.insert(run_.begin() + static_cast<std::ptrdiff_t>(at), r);
  }
  return Level(runs_[run_[at]]);
}

void LevelFrontier::Insert(const StaircaseRule& rule, const ClusterEntry& e) {
  At(e.level).Insert(rule, e);
}

size_t LevelFrontier::size() const {
  size_t n = 0;
  for (const uint32_t r : run_) n += runs_[r].size();
  return n;
}

void LevelFrontier::AppendTo(std::vector<ClusterEntry>& out) const {
  for (const uint32_t r : run_) out.insert(out.end(), runs_[r].begin(), runs_[r].end());
}

}  // namespace sliceplan
