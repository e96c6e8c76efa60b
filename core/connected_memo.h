// The memo of a connected-sets-only search: a hash map from relation set to
// slot, since connected sets are far fewer than 2^n (a 60-relation chain has
// 1,830). Grows as the enumerator finds sets; refuses to grow past a slot
// limit so a search cannot exhaust memory. Single-threaded.
#ifndef SLICEPLAN_CORE_CONNECTED_MEMO_H_
#define SLICEPLAN_CORE_CONNECTED_MEMO_H_

#include <optional>
#include <vector>

#include "absl/container/flat_hash_map.h"
#include "absl/status/statusor.h"
#include "absl/strings/str_cat.h"
#include "core/dense_layout.h"
#include "core/relation_set.h"

namespace sliceplan {

class ConnectedMemo {
 public:
  // Bytes the memo itself spends per entry (hash slot and reverse map),
  // on top of the policy's kBytesPerSlot.
  static constexpr size_t kOverheadBytesPerSlot = 2 * sizeof(RelSet) + 16;

  explicit ConnectedMemo(size_t max_slots) : max_slots_(max_slots) {}

  std::optional<Slot> Find(RelSet s) const {
    const auto it = slots_.find(s);
    if (it == slots_.end()) return std::nullopt;
    return it->second;
  }
  // The slot of `s`, adding it if new (`added` says which). Returns kNoSlot
  // when adding would pass the slot limit.
  Slot Insert(RelSet s, bool& added) {
    added = false;
    const auto it = slots_.find(s);
    if (it != slots_.end()) return it->second;
    if (sets_.size() >= max_slots_) return kNoSlot;
    const Slot slot = static_cast<Slot>(sets_.size());
    slots_.emplace(s, slot);
    sets_.push_back(s);
    added = true;
    return slot;
  }
  RelSet SetOf(Slot slot) const { return sets_[slot]; }
  size_t size() const { return sets_.size(); }

 private:
  size_t max_slots_;
  absl::flat_hash_map<RelSet, Slot> slots_;
  std::vector<RelSet> sets_;
};

// The slot of `s` in `memo`, adding it (and growing and initialising the
// policy's entry) if new. RESOURCE_EXHAUSTED at the memo's slot limit.
template <class Policy>
absl::StatusOr<Slot> AddConnectedSet(ConnectedMemo& memo, Policy& policy, RelSet s) {
  bool added = false;
  const Slot slot = memo.Insert(s, added);
  if (slot == kNoSlot) {
    return absl::ResourceExhaustedError(
        absl::StrCat("connected-sets memo reached its limit of ", memo.size(),
                     " entries; allow more memory or use more slices"));
  }
  if (added) {
    policy.Resize(memo.size());
    policy.InitSet(slot, s);
  }
  return slot;
}

}  // namespace sliceplan

#endif  // SLICEPLAN_CORE_CONNECTED_MEMO_H_
