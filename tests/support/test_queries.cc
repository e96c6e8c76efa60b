#include "tests/support/test_queries.h"

#include <cmath>
#include <cstdlib>
#include <iostream>
#include <random>

#include "absl/strings/str_cat.h"

namespace sliceplan::testing {

std::string ShapeName(GraphShape shape) {
  switch (shape) {
    case GraphShape::kChain:
      return "chain";
    case GraphShape::kCycle:
      return "cycle";
    case GraphShape::kStar:
      return "star";
    case GraphShape::kClique:
      return "clique";
    case GraphShape::kRandom:
      return "random";
    case GraphShape::kHyper:
      return "hyper";
  }
  return "?";
}

bool ShapeFromName(const std::string& name, GraphShape& shape) {
  for (GraphShape s : {GraphShape::kChain, GraphShape::kCycle, GraphShape::kStar,
                       GraphShape::kClique, GraphShape::kRandom, GraphShape::kHyper}) {
    if (ShapeName(s) == name) {
      shape = s;
      return true;
    }
  }
  return false;
}

std::vector<std::vector<int>> ShapeEdges(GraphShape shape, int n, uint64_t seed) {
  std::vector<std::vector<int>> edges;
  switch (shape) {
    case GraphShape::kChain:
    case GraphShape::kHyper:
      for (int i = 0; i + 1 < n; ++i) edges.push_back({i, i + 1});
      if (shape == GraphShape::kHyper && n >= 4) edges.push_back({0, n / 2, n - 1});
      break;
    case GraphShape::kCycle:
      for (int i = 0; i + 1 < n; ++i) edges.push_back({i, i + 1});
      if (n >= 3) edges.push_back({n - 1, 0});
      break;
    case GraphShape::kStar:
      for (int i = 1; i < n; ++i) edges.push_back({0, i});
      break;
    case GraphShape::kClique:
      for (int i = 0; i < n; ++i)
        for (int j = i + 1; j < n; ++j) edges.push_back({i, j});
      break;
    case GraphShape::kRandom: {
      std::mt19937_64 rng(seed * 7919 + 17);
      for (int i = 1; i < n; ++i) {
        edges.push_back({static_cast<int>(rng() % static_cast<uint64_t>(i)), i});
      }
      for (int extra = 0; extra < n / 2; ++extra) {
        const int a = static_cast<int>(rng() % static_cast<uint64_t>(n));
        const int b = static_cast<int>(rng() % static_cast<uint64_t>(n));
        bool known = a == b;
        for (const auto& e : edges) {
          known |= (e[0] == a && e[1] == b) || (e[0] == b && e[1] == a);
        }
        if (!known) edges.push_back({a, b});
      }
      break;
    }
  }
  return edges;
}

Query MakeQueryOrDie(std::vector<Relation> relations, std::vector<Predicate> predicates) {
  auto query = Query::Create(std::move(relations), std::move(predicates));
  if (!query.ok()) {
    std::cerr << "bad test query: " << query.status() << "\n";
    std::abort();
  }
  return *std::move(query);
}

namespace {

Query Build(GraphShape shape, int n, uint64_t seed, bool uniform) {
  std::mt19937_64 rng(seed);
  std::uniform_real_distribution<double> unit(0.0, 1.0);
  std::vector<Relation> rels;
  for (int i = 0; i < n; ++i) {
    const double rows = uniform ? 100 : std::round(std::pow(10.0, 1 + 5 * unit(rng)));
    // StrCat, not "r" + std::to_string(i): GCC 12 at -O3 reports a false
    // -Wrestrict inside std::string's operator+.
    rels.push_back({absl::StrCat("r", i), rows, kDefaultRowBytes});
  }
  std::vector<Predicate> preds;
  for (const auto& edge : ShapeEdges(shape, n, seed)) {
    RelSet set = 0;
    for (int v : edge) set |= RelSet{1} << v;
    const double sel = uniform ? 0.5 : std::pow(10.0, -4 + 3.7 * unit(rng));
    preds.push_back({set, sel});
  }
  return MakeQueryOrDie(std::move(rels), std::move(preds));
}

}  // namespace

Query MakeQuery(GraphShape shape, int n, uint64_t seed) { return Build(shape, n, seed, false); }

Query MakeUniformQuery(GraphShape shape, int n) { return Build(shape, n, 0, true); }

}  // namespace sliceplan::testing
