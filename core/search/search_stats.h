// What one slice's search did, in the units of docs/interfaces.md.
#ifndef SLICEPLAN_CORE_SEARCH_SEARCH_STATS_H_
#define SLICEPLAN_CORE_SEARCH_SEARCH_STATS_H_

#include <cstdint>

namespace sliceplan {

struct SearchStats {
  uint64_t memo_entries = 0;  // memo entries created (the answer's `subsets`)
  uint64_t splits = 0;        // (left, right) pairs evaluated
  uint64_t memo_bytes = 0;    // memo size at its peak
  double seconds = 0;         // wall time of the search
};

}  // namespace sliceplan

#endif  // SLICEPLAN_CORE_SEARCH_SEARCH_STATS_H_
