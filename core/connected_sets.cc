#include "core/connected_sets.h"

#include "core/join_graph.h"

namespace sliceplan {
namespace {

class CsgEnumerator {
 public:
  CsgEnumerator(const Query& query, uint64_t cap) : graph_(query), cap_(cap) {}

  std::vector<RelSet> Run(int n) {
    for (int v = n - 1; v >= 0 && !Full(); --v) {
      const RelSet start = RelSet{1} << v;
      out_.push_back(start);
      Grow(start, FullSet(v + 1));
    }
    return std::move(out_);
  }

 private:
  bool Full() const { return out_.size() >= cap_; }

  void Grow(RelSet s, RelSet x) {
    const RelSet nb = graph_.Around(s) & ~x;
    if (nb == 0) return;
    for (RelSet sub = nb & (0 - nb); !Full(); sub = (sub - nb) & nb) {
      out_.push_back(s | sub);
      if (sub == nb) break;
    }
    for (RelSet sub = nb & (0 - nb); !Full(); sub = (sub - nb) & nb) {
      Grow(s | sub, x | nb);
      if (sub == nb) break;
    }
  }

  JoinGraph graph_;
  uint64_t cap_;
  std::vector<RelSet> out_;
};

}  // namespace

std::vector<RelSet> ConnectedSets(const Query& query, uint64_t cap) {
  return CsgEnumerator(query, cap).Run(query.size());
}

}  // namespace sliceplan
