// The memo of a connected-sets-only search: a direct memo (slot = set) when
// the query's 2^n sets fit the memo limit and enough of them are connected,
// else a hash memo (connected sets are far fewer than 2^n: a 60-relation
// chain has 1,830). The enumerators are templates over the concrete memo;
// this holds either for the questions asked of a finished search.
#ifndef SLICEPLAN_CORE_MEMO_CONNECTED_MEMO_H_
#define SLICEPLAN_CORE_MEMO_CONNECTED_MEMO_H_

#include <optional>
#include <variant>

#include "absl/status/statusor.h"
#include "absl/strings/str_cat.h"
#include "core/memo/direct_memo.h"
#include "core/memo/hash_memo.h"

namespace sliceplan {

class ConnectedMemo {
 public:
  explicit ConnectedMemo(HashMemo memo) : memo_(std::move(memo)) {}
  explicit ConnectedMemo(DirectMemo memo) : memo_(std::move(memo)) {}

  std::optional<Slot> Find(RelSet s) const {
    return std::visit([s](const auto& m) { return m.Find(s); }, memo_);
  }
  RelSet SetOf(Slot slot) const {
    return std::visit([slot](const auto& m) { return m.SetOf(slot); }, memo_);
  }
  size_t size() const {
    return std::visit([](const auto& m) { return m.size(); }, memo_);
  }
  size_t bytes() const {
    return std::visit([](const auto& m) { return m.bytes(); }, memo_);
  }
  bool direct() const { return std::holds_alternative<DirectMemo>(memo_); }
  // Calls fn(HashMemo&) or fn(DirectMemo&).
  template <class Fn>
  decltype(auto) Visit(Fn&& fn) {
    return std::visit(std::forward<Fn>(fn), memo_);
  }

 private:
  std::variant<HashMemo, DirectMemo> memo_;
};

// The slot of `s` in `memo`, adding it (and growing and initialising the
// policy's entry) if new; `added` (when given) says whether it was.
// RESOURCE_EXHAUSTED at the memo's slot limit. A direct memo's policy
// arrays are sized once by the caller. O(1) (amortised for a hash memo).
template <class Memo, class Policy>
absl::StatusOr<Slot> AddConnectedSet(Memo& memo, Policy& policy, RelSet s,
                                     bool* added_out = nullptr) {
  bool added = false;
  const Slot slot = memo.Insert(s, added);
  if (added_out != nullptr) *added_out = added;
  if (slot == kNoSlot) {
    return absl::ResourceExhaustedError(
        absl::StrCat("connected-sets memo reached its limit of ", memo.size(),
                     " entries; allow more memory or use more slices"));
  }
  if (added) {
    if constexpr (Memo::kGrows) policy.Resize(memo.size());
    policy.InitSet(slot, s);
  }
  return slot;
}

}  // namespace sliceplan

#endif  // SLICEPLAN_CORE_MEMO_CONNECTED_MEMO_H_
