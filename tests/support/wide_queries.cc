#include "tests/support/wide_queries.h"

#include <algorithm>
#include <cmath>
#include <cstdlib>
#include <iostream>
#include <random>
#include <vector>

#include "absl/strings/str_cat.h"

namespace sliceplan::testing {

std::string WideShapeName(WideShape shape) {
  switch (shape) {
    case WideShape::kTree:
      return "tree";
    case WideShape::kSnowflake:
      return "snowflake";
    case WideShape::kTreeWithCycles:
      return "cycles";
    case WideShape::kTreeWithHyperedges:
      return "hyper";
  }
  return "?";
}

WideQuery MakeWideQuery(WideShape shape, int n, uint64_t seed) {
  std::mt19937_64 rng(seed * 104729 + 31);
  std::uniform_real_distribution<double> unit(0, 1);
  std::vector<int32_t> parent(n, -1);
  std::vector<int> depth(n, 0);
  for (int i = 1; i < n; ++i) {
    // Snowflakes: a fact table, dimensions around it, sub-dimensions
    // around those (about four children each).
    parent[i] =
        shape == WideShape::kSnowflake ? (i - 1) / 4 : static_cast<int32_t>(rng() % uint64_t(i));
    depth[i] = depth[parent[i]] + 1;
  }
  std::vector<Relation> relations;
  for (int i = 0; i < n; ++i) {
    const double rows = shape == WideShape::kSnowflake
                            ? std::max(10.0, 1e8 / std::pow(10.0, depth[i]) * (0.5 + unit(rng)))
                            : std::pow(10.0, 1 + 6 * unit(rng));
    relations.push_back({absl::StrCat("t", i), std::round(rows), 100});
  }
  const auto key_join = [&](int32_t a, int32_t b) {
    const double larger = std::max(relations[a].rows, relations[b].rows);
    return std::min(1.0, (0.5 + unit(rng)) / larger);
  };
  std::vector<WidePredicate> predicates;
  for (int32_t i = 1; i < n; ++i) predicates.push_back({{parent[i], i}, key_join(parent[i], i)});
  if (shape == WideShape::kTreeWithCycles) {
    for (int extra = 0; extra < n / 10; ++extra) {
      const auto a = static_cast<int32_t>(rng() % uint64_t(n));
      const auto b = static_cast<int32_t>(rng() % uint64_t(n));
      if (a != b) predicates.push_back({{std::min(a, b), std::max(a, b)}, 0.1 + 0.8 * unit(rng)});
    }
  }
  if (shape == WideShape::kTreeWithHyperedges) {
    for (int32_t i = 2; i < n; i += 20) {
      if (parent[i] > 0) {
        predicates.push_back({{parent[parent[i]], parent[i], i}, 0.2 + 0.6 * unit(rng)});
      }
    }
  }
  auto query = WideQuery::Create(std::move(relations), std::move(predicates));
  if (!query.ok()) {
    std::cerr << "MakeWideQuery: " << query.status() << "\n";
    std::abort();
  }
  return *std::move(query);
}

}  // namespace sliceplan::testing
