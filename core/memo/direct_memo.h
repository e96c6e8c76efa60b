// The connected-sets memo for queries whose 2^n sets fit in memory: the
// slot of a set is the set itself, and a bit per set says whether it is in
// the memo, so finding a set is one bit test and nothing is hashed. The
// policy's arrays are sized 2^n once, up front. Single-threaded.
#ifndef SLICEPLAN_CORE_MEMO_DIRECT_MEMO_H_
#define SLICEPLAN_CORE_MEMO_DIRECT_MEMO_H_

#include <bit>
#include <cstdint>
#include <optional>
#include <vector>

#include "core/memo/slot.h"
#include "core/model/relation_set.h"

namespace sliceplan {

// The most relations a direct memo takes: a slot is 32 bits and the full
// set must differ from kNoSlot.
inline constexpr int kMaxDirectRelations = 31;

class DirectMemo {
 public:
  static constexpr bool kGrows = false;

  // REQUIRES: 1 <= n <= kMaxDirectRelations.
  explicit DirectMemo(int n) : n_(n), present_(((uint64_t{1} << n) + 63) / 64, 0) {}

  // Bytes of the presence bits for n relations (the policy's arrays aside).
  static uint64_t BitmapBytes(int n) { return ((uint64_t{1} << n) + 63) / 64 * 8; }

  bool Contains(RelSet s) const { return (present_[s >> 6] >> (s & 63)) & 1; }
  std::optional<Slot> Find(RelSet s) const {
    if (!Contains(s)) return std::nullopt;
    return static_cast<Slot>(s);
  }
  // The slot of `s` (= s), adding it if new (`added` says which).
  Slot Insert(RelSet s, bool& added) {
    added = !Contains(s);
    present_[s >> 6] |= uint64_t{1} << (s & 63);
    return static_cast<Slot>(s);
  }
  // Takes `s` out again (a set found to have no admissible split). Threads
  // may erase sets of different 64-set words at once.
  void Erase(RelSet s) { present_[s >> 6] &= ~(uint64_t{1} << (s & 63)); }
  // Takes out the 64 sets of presence word `w` (sets 64w .. 64w + 63).
  void EraseWord(size_t w) { present_[w] = 0; }
  RelSet SetOf(Slot slot) const { return slot; }
  // The sets present, counted over every word: O(2^n / 64), never per split.
  size_t size() const {
    size_t count = 0;
    for (uint64_t w : present_) count += static_cast<size_t>(std::popcount(w));
    return count;
  }
  uint64_t slot_count() const { return uint64_t{1} << n_; }
  size_t bytes() const { return present_.size() * sizeof(uint64_t); }
  // The presence words, for callers that walk the sets in order.
  const std::vector<uint64_t>& words() const { return present_; }

 private:
  int n_;
  std::vector<uint64_t> present_;
};

}  // namespace sliceplan

#endif  // SLICEPLAN_CORE_MEMO_DIRECT_MEMO_H_
