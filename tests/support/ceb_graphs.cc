#include "tests/support/ceb_graphs.h"

#include <algorithm>
#include <filesystem>
#include <fstream>
#include <memory>
#include <sstream>

#include "absl/container/flat_hash_map.h"
#include "absl/strings/str_cat.h"
#include "core/model/status_macros.h"

namespace sliceplan::testing {
namespace {

absl::Status Malformed(const std::string& path, const std::string& what) {
  return absl::InvalidArgumentError(absl::StrCat(path, ": ", what));
}

}  // namespace

absl::StatusOr<CebGraph> ReadCebGraph(const std::string& path) {
  std::ifstream in(path);
  if (!in) return absl::NotFoundError(path);
  int n = 0, m = 0;
  uint64_t k = 0;
  if (!(in >> n >> m >> k) || n < 1 || n > kMaxRelations || m < 0) {
    return Malformed(path, "line 1: expected n m k");
  }
  std::vector<Relation> relations(n);
  for (Relation& r : relations) {
    if (!(in >> r.name)) return Malformed(path, "line 2: expected n aliases");
  }
  std::vector<RelSet> edges;
  for (int e = 0; e < m; ++e) {
    int a = 0, b = 0;
    if (!(in >> a >> b) || a < 0 || b < 0 || a >= n || b >= n || a == b) {
      return Malformed(path, absl::StrCat("line 3: edge ", e));
    }
    edges.push_back((RelSet{1} << a) | (RelSet{1} << b));
  }
  // An edge listed twice is one predicate (merging would square it).
  std::sort(edges.begin(), edges.end());
  edges.erase(std::unique(edges.begin(), edges.end()), edges.end());
  std::vector<ListedSet> sets;
  absl::flat_hash_map<RelSet, double> rows;
  for (uint64_t i = 0; i < k; ++i) {
    ListedSet s;
    if (!(in >> s.relations >> s.rows)) return Malformed(path, absl::StrCat("set line ", i));
    sets.push_back(s);
    rows[s.relations] = s.rows;
  }
  std::vector<Predicate> predicates;
  for (RelSet e : edges) {
    const RelSet a = LowestBit(e), b = e ^ a;
    if (!rows.contains(e) || !rows.contains(a) || !rows.contains(b)) {
      return Malformed(path, "an edge or relation without its row count");
    }
    predicates.push_back({e, std::min(1.0, rows[e] / (rows[a] * rows[b]))});
  }
  for (int r = 0; r < n; ++r) relations[r].rows = rows[RelSet{1} << r];
  ASSIGN_OR_RETURN(Query model, Query::Create(std::move(relations), std::move(predicates)));
  ASSIGN_OR_RETURN(ListedRows listed, ListedRows::Create(n, std::move(sets)));
  Query with = model.WithListed(std::make_shared<const ListedRows>(std::move(listed)));
  return CebGraph{std::move(model), std::move(with)};
}

std::vector<std::string> CebGraphFiles() {
  std::vector<std::string> out;
  for (const auto& entry :
       std::filesystem::directory_iterator(SLICEPLAN_SOURCE_DIR "/tests/data/ceb-imdb")) {
    if (entry.path().extension() == ".csv") out.push_back(entry.path().string());
  }
  std::sort(out.begin(), out.end());
  return out;
}

}  // namespace sliceplan::testing
