// The connected-sets memo for queries whose 2^n sets do not fit in memory:
// open addressing on the relation set itself (linear probing, Fibonacci
// hashing, load at most 1/2), each entry the set and its slot, so a probe
// reads one cache line. Slots are handed out in insertion order and never
// move, so the policy's arrays grow with the memo. Refuses to grow past a
// slot limit so a search cannot exhaust memory. Single-threaded.
#ifndef SLICEPLAN_CORE_MEMO_HASH_MEMO_H_
#define SLICEPLAN_CORE_MEMO_HASH_MEMO_H_

#include <bit>
#include <optional>
#include <vector>

#include "core/memo/memo_allocator.h"
#include "core/memo/slot.h"
#include "core/model/relation_set.h"

namespace sliceplan {

class HashMemo {
  struct Entry {
    RelSet set = 0;  // 0: empty (the empty set is never stored)
    Slot slot = kNoSlot;
  };

 public:
  // The memo's slots grow one by one as sets are added.
  static constexpr bool kGrows = true;
  // Bytes per set: the set list, and two index entries at the highest load
  // (up to four just after the index doubled).
  static constexpr size_t kBytesPerSet = sizeof(RelSet) + 2 * sizeof(Entry);

  explicit HashMemo(size_t max_slots) : max_slots_(max_slots) { Rebuild(kInitialBits); }

  std::optional<Slot> Find(RelSet s) const {
    for (size_t i = Home(s);; i = (i + 1) & mask_) {
      const Entry& e = index_[i];
      if (e.set == s) return e.slot;
      if (e.set == 0) return std::nullopt;
    }
  }
  // The slot of `s` (not empty), adding it if new (`added` says which).
  // kNoSlot when adding would pass the slot limit.
  Slot Insert(RelSet s, bool& added) {
    added = false;
    size_t i = Home(s);
    for (; index_[i].set != 0; i = (i + 1) & mask_) {
      if (index_[i].set == s) return index_[i].slot;
    }
    if (sets_.size() >= max_slots_) return kNoSlot;
    const Slot slot = static_cast<Slot>(sets_.size());
    index_[i] = {s, slot};
    sets_.push_back(s);
    added = true;
    if (2 * sets_.size() > index_.size()) Rebuild(bits_ + 1);
    return slot;
  }
  RelSet SetOf(Slot slot) const { return sets_[slot]; }
  size_t size() const { return sets_.size(); }
  size_t bytes() const { return sets_.capacity() * sizeof(RelSet) + index_.size() * sizeof(Entry); }

 private:
  static constexpr int kInitialBits = 6;

  size_t Home(RelSet s) const {
    return static_cast<size_t>((s * 0x9E3779B97F4A7C15ull) >> (64 - bits_));
  }
  void Rebuild(int bits) {
    bits_ = bits;
    index_.assign(size_t{1} << bits, Entry{});
    mask_ = index_.size() - 1;
    for (size_t slot = 0; slot < sets_.size(); ++slot) {
      size_t i = Home(sets_[slot]);
      while (index_[i].set != 0) i = (i + 1) & mask_;
      index_[i] = {sets_[slot], static_cast<Slot>(slot)};
    }
  }

  size_t max_slots_;
  int bits_ = 0;
  size_t mask_ = 0;
  std::vector<Entry, MemoAllocator<Entry>> index_;
  std::vector<RelSet, MemoAllocator<RelSet>> sets_;
};

}  // namespace sliceplan

#endif  // SLICEPLAN_CORE_MEMO_HASH_MEMO_H_
