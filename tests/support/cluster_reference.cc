#include "tests/support/cluster_reference.h"

#include <algorithm>
#include <cmath>
#include <map>

#include "tests/support/reference_search.h"
#include "tiers/wide_plan.h"

namespace sliceplan::testing {
namespace {

struct RefPlan {
  RefCosts c;
  double rows;
  bool leaf;
};

// docs/cost-models.md, "`cluster`: stages on a rented cluster", transcribed
// separately from core/.
double Stage(const ClusterParams& p, int strategy, int m, const RefPlan& l, double wl,
             const RefPlan& r, double wr, double out_rows) {
  const double bl = l.rows * wl, br = r.rows * wr;
  const double scan = ((l.leaf ? bl : 0) + (r.leaf ? br : 0)) / (m * p.scan_bytes_per_s);
  const double start = p.stage_startup_s + scan;
  if (strategy == 0) {
    return start + (bl + br) / (m * p.net_bytes_per_s) +
           (l.rows + r.rows + out_rows) / (m * p.cpu_rows_per_s);
  }
  if (strategy == 1) {  // broadcast right
    return start + br / p.net_bytes_per_s + (l.rows / m + r.rows + out_rows / m) / p.cpu_rows_per_s;
  }
  return start + bl / p.net_bytes_per_s + (r.rows / m + l.rows + out_rows / m) / p.cpu_rows_per_s;
}

double Width(const Query& q, RelSet s) {
  double w = 0;
  for (int i = 0; i < q.size(); ++i) {
    if ((s >> i) & 1) w += q.relations()[i].row_bytes;
  }
  return w;
}

// Completeness values are products of rates in tree order: equal levels
// differ in the last places, so they compare with a 1e-12 tolerance.
bool Dominates(const RefCosts& a, const RefCosts& b) {
  return a.latency <= b.latency && a.node_seconds <= b.node_seconds &&
         a.completeness >= b.completeness * (1 - 1e-12);
}

class AllPlans {
 public:
  AllPlans(const Query& q, const ClusterParams& p, bool left_deep, bool prune_across,
           bool connected = false)
      : q_(q), p_(p), left_deep_(left_deep), prune_(prune_across), connected_(connected) {}

  const std::vector<RefPlan>& Of(RelSet s) {
    auto it = memo_.find(s);
    if (it != memo_.end()) return it->second;
    std::vector<RefPlan> out;
    if ((s & (s - 1)) == 0) {
      const int i = __builtin_ctzll(s);
      for (double f : p_.sample_rates) {
        out.push_back({{0, 0, f}, q_.relations()[i].rows * f, true});
      }
    } else {
      const double card = RefCard(q_, s);
      const RelSet first = s & (~s + 1);
      for (RelSet l = (s - 1) & s; l != 0; l = (l - 1) & s) {
        if ((l & first) == 0) continue;
        const RelSet r = s & ~l;
        const bool l_leaf = (l & (l - 1)) == 0, r_leaf = (r & (r - 1)) == 0;
        if (left_deep_ && !l_leaf && !r_leaf) continue;
        if (connected_ && !RefJoinable(q_, l, r)) continue;
        const std::vector<RefPlan>& lp = Of(l);
        const std::vector<RefPlan>& rp = Of(r);
        const double wl = Width(q_, l), wr = Width(q_, r);
        for (const RefPlan& a : lp) {
          for (const RefPlan& b : rp) {
            const double comp = a.c.completeness * b.c.completeness;
            const double rows = card * comp;
            for (int strategy = 0; strategy < 3; ++strategy) {
              for (int m : p_.node_counts) {
                const double t = Stage(p_, strategy, m, a, wl, b, wr, rows);
                out.push_back({{std::max(a.c.latency, b.c.latency) + t,
                                a.c.node_seconds + b.c.node_seconds + m * t, comp},
                               rows,
                               false});
              }
            }
          }
        }
      }
    }
    // The shortcut prunes every set, leaves included: a full read (lat 0,
    // node-seconds 0, completeness 1) then beats every sampled read.
    if (prune_) out = Prune(out);
    return memo_.emplace(s, std::move(out)).first->second;
  }

 private:
  static std::vector<RefPlan> Prune(std::vector<RefPlan> in) {
    std::sort(in.begin(), in.end(), [](const RefPlan& a, const RefPlan& b) {
      if (a.c.latency != b.c.latency) return a.c.latency < b.c.latency;
      if (a.c.node_seconds != b.c.node_seconds) return a.c.node_seconds < b.c.node_seconds;
      return a.c.completeness > b.c.completeness;
    });
    std::vector<RefPlan> out;
    for (const RefPlan& p : in) {
      bool beaten = false;
      for (const RefPlan& k : out) beaten = beaten || Dominates(k.c, p.c);
      if (!beaten) out.push_back(p);
    }
    return out;
  }

  const Query& q_;
  const ClusterParams& p_;
  bool left_deep_;
  bool prune_;
  bool connected_;
  std::map<RelSet, std::vector<RefPlan>> memo_;
};

}  // namespace

std::vector<RefCosts> RefAllClusterPlans(const Query& query, const ClusterParams& params,
                                         bool left_deep, bool connected_only) {
  AllPlans all(query, params, left_deep, false, connected_only);
  std::vector<RefCosts> out;
  for (const RefPlan& p : all.Of(query.all())) out.push_back(p.c);
  return out;
}

std::vector<RefCosts> RefFrontier(const std::vector<RefCosts>& plans) {
  // Sorted so that whatever dominates a plan comes before it; each plan is
  // then checked against the frontier kept so far.
  std::vector<RefCosts> sorted = plans;
  std::sort(sorted.begin(), sorted.end(), [](const RefCosts& a, const RefCosts& b) {
    if (a.latency != b.latency) return a.latency < b.latency;
    if (a.node_seconds != b.node_seconds) return a.node_seconds < b.node_seconds;
    return a.completeness > b.completeness;
  });
  std::vector<RefCosts> out;
  for (const RefCosts& p : sorted) {
    bool beaten = false;
    for (const RefCosts& k : out) beaten = beaten || Dominates(k, p);
    if (!beaten) out.push_back(p);
  }
  return out;
}

std::vector<RefCosts> RefFrontierPruningAcrossLevels(const Query& query,
                                                     const ClusterParams& params) {
  AllPlans all(query, params, false, true);
  std::vector<RefCosts> out;
  for (const RefPlan& p : all.Of(query.all())) out.push_back(p.c);
  return RefFrontier(out);
}

RefCosts RefCostsOf(const Query& query, const ClusterParams& params, const Plan& plan) {
  std::vector<RefPlan> at(plan.nodes.size());
  for (size_t i = 0; i < plan.nodes.size(); ++i) {
    const PlanNode& n = plan.nodes[i];
    if (n.is_leaf()) {
      const int r = __builtin_ctzll(n.relations);
      at[i] = {{0, 0, n.sample_rate}, query.relations()[r].rows * n.sample_rate, true};
      continue;
    }
    const RefPlan& a = at[n.left];
    const RefPlan& b = at[n.right];
    const RelSet l = plan.nodes[n.left].relations, r = plan.nodes[n.right].relations;
    const double comp = a.c.completeness * b.c.completeness;
    const double rows = RefCard(query, n.relations) * comp;
    const int strategy = static_cast<int>(n.strategy);
    const double t = Stage(params, strategy, n.nodes, a, Width(query, l), b, Width(query, r), rows);
    at[i] = {{std::max(a.c.latency, b.c.latency) + t,
              a.c.node_seconds + b.c.node_seconds + n.nodes * t, comp},
             rows,
             false};
  }
  return at.back().c;
}

RefCosts RefCostsOfWide(const WideQuery& query, const ClusterParams& params, const WidePlan& plan) {
  const size_t n = static_cast<size_t>(query.size());
  std::vector<std::vector<bool>> in(plan.nodes.size(), std::vector<bool>(n, false));
  std::vector<RefPlan> at(plan.nodes.size());
  std::vector<double> width(plan.nodes.size(), 0);
  for (size_t i = 0; i < plan.nodes.size(); ++i) {
    const WideNode& node = plan.nodes[i];
    if (node.is_leaf()) {
      const Relation& r = query.relation(node.relation);
      in[i][static_cast<size_t>(node.relation)] = true;
      width[i] = r.row_bytes;
      at[i] = {{0, 0, node.sample_rate}, r.rows * node.sample_rate, true};
      continue;
    }
    const size_t l = static_cast<size_t>(node.left), r = static_cast<size_t>(node.right);
    // Summed in logarithms: the rows of hundreds of relations overflow a
    // double long before their selectivities bring the product back.
    double log_card = 0;
    for (size_t k = 0; k < n; ++k) {
      in[i][k] = in[l][k] || in[r][k];
      if (in[i][k]) log_card += std::log(query.relation(static_cast<int32_t>(k)).rows);
    }
    for (const WidePredicate& p : query.predicates()) {
      bool inside = true;
      for (int32_t k : p.relations) inside = inside && in[i][static_cast<size_t>(k)];
      if (inside) log_card += std::log(p.selectivity);
    }
    const double card = std::exp(log_card);
    width[i] = width[l] + width[r];
    const RefPlan& a = at[l];
    const RefPlan& b = at[r];
    const double comp = a.c.completeness * b.c.completeness;
    const double rows = card * comp;
    const double t =
        Stage(params, static_cast<int>(node.strategy), node.nodes, a, width[l], b, width[r], rows);
    at[i] = {{std::max(a.c.latency, b.c.latency) + t,
              a.c.node_seconds + b.c.node_seconds + node.nodes * t, comp},
             rows,
             false};
  }
  return at.back().c;
}

}  // namespace sliceplan::testing
