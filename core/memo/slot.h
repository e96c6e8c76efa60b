// A memo slot: the index of one relation set in a slice's memo (dense or
// connected-sets). 32 bits: a slice memo holds fewer than 2^32 sets (the
// memo checks refuse larger ones up front). Plain value type.
#ifndef SLICEPLAN_CORE_MEMO_SLOT_H_
#define SLICEPLAN_CORE_MEMO_SLOT_H_

#include <cstdint>

namespace sliceplan {

using Slot = uint32_t;
inline constexpr Slot kNoSlot = ~Slot{0};

}  // namespace sliceplan

#endif  // SLICEPLAN_CORE_MEMO_SLOT_H_
