// The capacity planner's table, worked by hand for a 20-relation bushy
// search with cross products at 1 ns per split and no slice overhead.
// Splits of one slice, symmetric (docs/slicing.md), f = 20 - 3k:
//   (3^f 21^k - 2 2^f 7^k + 1) / 2
//   k = 0: 1,742,343,625   k = 1: 1,355,054,208   k = 2: 1,053,841,849
//   k = 3:   819,576,720   k = 4:   637,380,265   k = 5:   495,680,448
// The planner picks k minimising ceil(2^k / slots) x splits(k), so W
// workers of one thread run 2^k = W slices up to k = 6 (3k <= 20); the
// wall time is that slice's splits x 1 ns.
#include "core/capacity/capacity_table.h"

#include <cmath>

#include "core/cost/cout_policy.h"
#include "core/slice_planner.h"
#include "core/slicing/search_estimate.h"
#include "gtest/gtest.h"
#include "tests/support/test_queries.h"

namespace sliceplan {
namespace {

using testing::GraphShape;
using testing::MakeQuery;

MachineRates OneNanosecond() {
  MachineRates rates;
  rates.dense_split_seconds = 1e-9;
  rates.slice_overhead_seconds = 0;
  return rates;
}

TEST(CapacityTableTest, TwentyRelationsWorkedByHand) {
  const Query q = MakeQuery(GraphShape::kRandom, 20, 3);
  auto t = PlanCapacity(q, SearchOptions{}, 1.0, 1, OneNanosecond());
  ASSERT_TRUE(t.ok()) << t.status();
  ASSERT_EQ(t->rows.size(), 11u);  // 1, 2, 4, ... 1,024
  const double expected[] = {1.742343625, 1.355054208, 1.053841849, 0.819576720, 0.637380265};
  for (int i = 0; i < 5; ++i) {
    EXPECT_EQ(t->rows[i].workers, 1 << i);
    EXPECT_EQ(t->rows[i].slices, 1u << i);
    EXPECT_NEAR(t->rows[i].seconds, expected[i], 1e-12) << "row " << i;
  }
  // 1 s: eight workers (0.8196 s) are the first to meet it; auto's 60%
  // (0.6 s) needs 32 (k = 5: 0.4957 s; at 16 the 0.637 s of k = 4).
  EXPECT_EQ(t->enough_workers, 8);
  EXPECT_EQ(t->auto_exact_workers, 32);
  EXPECT_NEAR(t->rows[5].seconds, 0.495680448, 1e-12);
  // Past 3k <= 20 (k = 6) no more slices: the rows level off.
  EXPECT_EQ(t->rows[10].slices, 64u);
  EXPECT_DOUBLE_EQ(t->rows[10].seconds, t->rows[6].seconds);
  // Memo per worker: one slice of 7^k 2^(20-3k) slots at a time.
  EXPECT_DOUBLE_EQ(t->rows[3].memo_bytes, 343.0 * 2048 * CoutPolicy::kBytesPerSlot);
  EXPECT_NE(t->summary.find("8 workers finish the exact search within 1 s"), std::string::npos)
      << t->summary;
}

TEST(CapacityTableTest, ThreadsPerWorkerSpeedUpEachSlice) {
  // Two threads per worker: each slice runs 1 + 0.75 = 1.75 times faster
  // (kThreadEfficiency) and a worker still holds one slice at a time, so
  // four workers get P = 4 (k = 2, f = 14): (3^14 21^2 - 2 2^14 7^2 + 1) / 2
  // = 1,053,841,849 splits at 1 ns over 1.75 = 0.602195342 s. One worker
  // runs the unsliced 1,742,343,625 splits in 0.9956 s: within 1 s.
  const Query q = MakeQuery(GraphShape::kRandom, 20, 3);
  auto t = PlanCapacity(q, SearchOptions{}, 1.0, 2, OneNanosecond());
  ASSERT_TRUE(t.ok()) << t.status();
  EXPECT_EQ(t->rows[2].slices, 4u);
  EXPECT_NEAR(t->rows[2].seconds, 1.053841849 / 1.75, 1e-12);
  EXPECT_NEAR(t->rows[0].seconds, 1.742343625 / 1.75, 1e-12);
  EXPECT_EQ(t->enough_workers, 1);
  EXPECT_DOUBLE_EQ(t->rows[2].memo_bytes, 49.0 * 16384 * CoutPolicy::kBytesPerSlot);
  // Without cross products only the pulled bushy searches thread.
  SearchOptions connected;
  connected.cross_products = false;
  connected.threads = 5;
  EXPECT_EQ(ThreadSpeedup(connected), 1.0);
  EXPECT_EQ(ThreadSpeedup(connected, true), 4.0);
  connected.shape = PlanShape::kLeftDeep;
  EXPECT_EQ(ThreadSpeedup(connected, true), 1.0);
  connected.cross_products = true;
  EXPECT_EQ(ThreadSpeedup(connected), 4.0);
  connected.threads = 1;
  EXPECT_EQ(ThreadSpeedup(connected), 1.0);
}

TEST(CapacityTableTest, EveryRowIsTheForecastOfItsPool) {
  // Left-deep, with the default rates and overhead: each row is the least
  // over P = 2^k up to the largest planner's P of a pool up to W of
  // ceil(P / W) x (splits(k) x rate + overhead), so never slower than the
  // planner's P.
  SearchOptions options;
  options.shape = PlanShape::kLeftDeep;
  const Query q = MakeQuery(GraphShape::kChain, 24, 1);
  const MachineRates rates;
  auto t = PlanCapacity(q, options, 0.5, 1, rates);
  ASSERT_TRUE(t.ok()) << t.status();
  const auto seconds = [&](int workers, int k) {
    const double rounds = std::ceil(std::ldexp(1.0, k) / workers);
    return rounds * (DenseSplits(24, PlanShape::kLeftDeep, k, true) * rates.dense_split_seconds +
                     rates.slice_overhead_seconds);
  };
  for (const CapacityRow& r : t->rows) {
    uint32_t most = 1;
    for (int w = 1; w <= r.workers; ++w) most = std::max(most, ChooseSliceCount(q, options, w));
    double least = INFINITY;
    uint32_t least_p = 0;
    for (int k = 0; (1u << k) <= most; ++k) {
      if (seconds(r.workers, k) < least) least = seconds(r.workers, k), least_p = 1u << k;
    }
    EXPECT_EQ(r.slices, least_p) << r.workers;
    EXPECT_NEAR(r.seconds, least, least * 1e-12) << r.workers;
    const uint32_t planned = ChooseSliceCount(q, options, r.workers);
    EXPECT_LE(r.seconds, seconds(r.workers, std::countr_zero(planned)) * (1 + 1e-12));
  }
}

TEST(CapacityTableTest, NoPoolMeetsAnImpossibleDeadline) {
  const Query q = MakeQuery(GraphShape::kClique, 40, 1);
  auto t = PlanCapacity(q, SearchOptions{}, 1.0, 1, OneNanosecond());
  ASSERT_TRUE(t.ok()) << t.status();
  EXPECT_FALSE(t->enough_workers.has_value());
  EXPECT_FALSE(t->auto_exact_workers.has_value());
  EXPECT_NE(t->summary.find("No pool of up to 1024 workers"), std::string::npos) << t->summary;
  EXPECT_NE(t->summary.find("idp"), std::string::npos);
}

TEST(CapacityTableTest, ConnectedOnlyUsesTheConnectedSetCount) {
  // A 30-relation chain has 465 connected sets: too few to slice, one
  // slice on every pool, 465 x the rate.
  SearchOptions options;
  options.cross_products = false;
  MachineRates rates = OneNanosecond();
  rates.connected_set_seconds = 1e-6;
  auto t = PlanCapacity(MakeQuery(GraphShape::kChain, 30, 1), options, 1.0, 1, rates);
  ASSERT_TRUE(t.ok()) << t.status();
  EXPECT_FALSE(t->estimated);
  for (const CapacityRow& r : t->rows) {
    EXPECT_EQ(r.slices, 1u);
    EXPECT_NEAR(r.seconds, 465e-6, 1e-15);
  }
  EXPECT_EQ(t->enough_workers, 1);
}

TEST(CapacityTableTest, OnlyPulledConnectedSearchesSpeedUpOnThreads) {
  // A 16-star has 2^15 + 15 connected sets, one in two of the 2^16: a
  // direct memo, bushy plans pulled and threaded (2 threads: 1.75x). On
  // one worker the planner keeps one slice. Left-deep plans (DPhyp) and a
  // 30-chain's 465 sets (a hashed memo) get no speed-up.
  SearchOptions options;
  options.cross_products = false;
  options.threads = 2;
  MachineRates rates = OneNanosecond();
  rates.connected_set_seconds = 1e-6;
  const Query star = MakeQuery(GraphShape::kStar, 16, 1);
  auto bushy = PlanCapacity(star, options, 1.0, 2, rates);
  ASSERT_TRUE(bushy.ok()) << bushy.status();
  ASSERT_EQ(bushy->rows[0].slices, 1u);
  EXPECT_NEAR(bushy->rows[0].seconds, 32783e-6 / 1.75, 1e-12);
  options.shape = PlanShape::kLeftDeep;
  auto left_deep = PlanCapacity(star, options, 1.0, 2, rates);
  ASSERT_TRUE(left_deep.ok()) << left_deep.status();
  ASSERT_EQ(left_deep->rows[0].slices, 1u);
  EXPECT_NEAR(left_deep->rows[0].seconds, 32783e-6, 1e-12);
  options.shape = PlanShape::kBushy;
  auto chain = PlanCapacity(MakeQuery(GraphShape::kChain, 30, 1), options, 1.0, 2, rates);
  ASSERT_TRUE(chain.ok()) << chain.status();
  EXPECT_NEAR(chain->rows[0].seconds, 465e-6, 1e-15);
}

TEST(CapacityTableTest, ASliceOverTheMemoLimitNeverCounts) {
  // An 8 MiB limit: a slice of P = 2^k holds 7^k 2^(20-3k) x 12 bytes,
  // 12 MiB unsliced and 8.04 MiB at P = 8, 7.03 MiB at P = 16; the planner
  // skips k < 4, so every row slices at least 16 ways, and one worker
  // meets a generous deadline in 16 rounds.
  SearchOptions options;
  options.memo_limit_bytes = 8 << 20;
  auto t = PlanCapacity(MakeQuery(GraphShape::kRandom, 20, 3), options, 100.0, 1, OneNanosecond());
  ASSERT_TRUE(t.ok()) << t.status();
  for (const CapacityRow& r : t->rows) {
    const double slice_bytes =
        DenseSlots(20, PlanShape::kBushy, std::countr_zero(r.slices)) * CoutPolicy::kBytesPerSlot;
    EXPECT_EQ(r.fits_memo, slice_bytes <= 8 << 20) << r.workers;
    EXPECT_GE(r.slices, 16u);
  }
  EXPECT_EQ(t->enough_workers, 1);
  // A limit no slice count meets: no row counts.
  options.memo_limit_bytes = 1024;
  t = PlanCapacity(MakeQuery(GraphShape::kRandom, 20, 3), options, 100.0, 1, OneNanosecond());
  ASSERT_TRUE(t.ok()) << t.status();
  EXPECT_FALSE(t->enough_workers.has_value());
}

TEST(CapacityTableTest, BadDeadlineAndThreadsAreRefused) {
  const Query q = MakeQuery(GraphShape::kChain, 5, 1);
  for (double d : {0.0, -1.0, std::nan(""), static_cast<double>(INFINITY)}) {
    auto t = PlanCapacity(q, SearchOptions{}, d, 1, MachineRates{});
    EXPECT_EQ(t.status().code(), absl::StatusCode::kInvalidArgument) << d;
  }
  EXPECT_EQ(PlanCapacity(q, SearchOptions{}, 1, 0, MachineRates{}).status().code(),
            absl::StatusCode::kInvalidArgument);
  EXPECT_EQ(PlanCapacity(q, SearchOptions{}, 1, 1025, MachineRates{}).status().code(),
            absl::StatusCode::kInvalidArgument);
}

TEST(CapacityTableTest, PastTheExactReachNamesWhatAutoDoes) {
  const CapacityTable t = CapacityPastExact(500, 2.0, 1);
  EXPECT_TRUE(t.rows.empty());
  EXPECT_FALSE(t.enough_workers.has_value());
  EXPECT_NE(t.summary.find("500 relations: past the exact search's 64"), std::string::npos);
  EXPECT_NE(t.summary.find("greedy and linear"), std::string::npos);
  // Past 1,000 relations there is no linear tier.
  EXPECT_EQ(CapacityPastExact(1001, 2.0, 1).summary.find("linear"), std::string::npos);
}

// More workers never get a slower forecast: the fastest slice count of a
// pool is open to any larger pool. Connected-only searches, where the
// planner's slice count can be predicted slower than fewer slices, and the
// dense search, on 1 to 64 workers.
TEST(CapacityTableTest, TheForecastNeverRisesWithTheWorkers) {
  for (bool cross : {true, false}) {
    for (testing::GraphShape shape : {testing::GraphShape::kRandom, testing::GraphShape::kStar}) {
      const Query q = testing::MakeQuery(shape, 20, 5);
      SearchOptions options{PlanShape::kBushy, cross, CostModelKind::kCout};
      const ExactWork work = MeasureExactWork(q, options);
      double last = INFINITY;
      for (int workers = 1; workers <= 64; ++workers) {
        const ExactForecast f = FastestForecast(q, options, work, workers);
        EXPECT_LE(f.seconds, last) << testing::ShapeName(shape) << " workers=" << workers;
        EXPECT_LE(f.seconds, ForecastExact(q, options, work, workers).seconds);
        EXPECT_EQ(f.seconds, ForecastExact(q, options, work, workers, {}, f.slices).seconds);
        last = f.seconds;
      }
    }
  }
}

}  // namespace
}  // namespace sliceplan
