// Reading the outside workload's join graphs with true cardinalities
// (tests/data/ceb-imdb/: graphs of the CEB-IMDb cardinality-estimation
// workload as published with the DPconv paper, Stoian and Kipf 2024, MIT;
// see the README there). Each file lists every connected set of its
// relations with the set's true row count.
#ifndef SLICEPLAN_TESTS_SUPPORT_CEB_GRAPHS_H_
#define SLICEPLAN_TESTS_SUPPORT_CEB_GRAPHS_H_

#include <string>
#include <vector>

#include "absl/status/statusor.h"
#include "core/model/query.h"

namespace sliceplan::testing {

struct CebGraph {
  // Relations named by the file's aliases, rows the true rows of each one;
  // a predicate per edge, its selectivity the independence model's
  // rows({a, b}) / (rows(a) rows(b)). No listed estimates.
  Query model;
  // The same query with every connected set listed at its true rows.
  Query listed;
};

// Parses one file. INVALID_ARGUMENT naming the line on a malformed file.
absl::StatusOr<CebGraph> ReadCebGraph(const std::string& path);

// The graph files of tests/data/ceb-imdb/, sorted by name.
std::vector<std::string> CebGraphFiles();

}  // namespace sliceplan::testing

#endif  // SLICEPLAN_TESTS_SUPPORT_CEB_GRAPHS_H_
