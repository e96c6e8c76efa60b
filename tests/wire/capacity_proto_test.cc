// The capacity table through the wire and back, and every malformed reply
// refused naming its field.
#include "wire/capacity_proto.h"

#include <limits>

#include "gtest/gtest.h"

namespace sliceplan {
namespace {

CapacityTable Table() {
  CapacityTable t;
  for (int w = 1, k = 0; w <= 4; w *= 2, ++k) {
    t.rows.push_back({w, 1u << k, 2.0 / w, 1e6 / w, w > 1});
  }
  t.enough_workers = 2;
  t.deadline_seconds = 1.5;
  t.threads_per_worker = 3;
  t.estimated = true;
  t.rates = {1.1e-9, 7e-6, 2e-4};
  t.summary = "2 workers finish the exact search within 1.5 s.";
  return t;
}

TEST(CapacityProtoTest, RoundTrip) {
  auto back = CapacityFromProto(CapacityToProto(Table()));
  ASSERT_TRUE(back.ok()) << back.status();
  const CapacityTable want = Table();
  ASSERT_EQ(back->rows.size(), want.rows.size());
  for (size_t i = 0; i < want.rows.size(); ++i) {
    EXPECT_EQ(back->rows[i].workers, want.rows[i].workers);
    EXPECT_EQ(back->rows[i].slices, want.rows[i].slices);
    EXPECT_EQ(back->rows[i].seconds, want.rows[i].seconds);
    EXPECT_EQ(back->rows[i].memo_bytes, want.rows[i].memo_bytes);
    EXPECT_EQ(back->rows[i].fits_memo, want.rows[i].fits_memo);
  }
  EXPECT_EQ(back->enough_workers, 2);
  EXPECT_FALSE(back->auto_exact_workers.has_value());
  EXPECT_EQ(back->deadline_seconds, 1.5);
  EXPECT_EQ(back->threads_per_worker, 3);
  EXPECT_TRUE(back->estimated);
  EXPECT_EQ(back->rates.dense_split_seconds, 1.1e-9);
  EXPECT_EQ(back->rates.connected_set_seconds, 7e-6);
  EXPECT_EQ(back->rates.slice_overhead_seconds, 2e-4);
  EXPECT_EQ(back->summary, want.summary);
}

TEST(CapacityProtoTest, MalformedRepliesNameTheField) {
  const double nan = std::numeric_limits<double>::quiet_NaN();
  struct Case {
    const char* field;
    void (*spoil)(v1::CapacityResponse&);
  };
  const Case cases[] = {
      {"rows[1].workers", [](v1::CapacityResponse& m) { m.mutable_rows(1)->set_workers(3); }},
      {"rows[2].slices", [](v1::CapacityResponse& m) { m.mutable_rows(2)->set_slices(6); }},
      {"rows[0].seconds", [](v1::CapacityResponse& m) { m.mutable_rows(0)->set_seconds(-1); }},
      {"rows[0].memo_bytes",
       [](v1::CapacityResponse& m) {
         m.mutable_rows(0)->set_memo_bytes(std::numeric_limits<double>::infinity());
       }},
      {"enough_workers", [](v1::CapacityResponse& m) { m.set_enough_workers(3); }},
      {"rates", [](v1::CapacityResponse& m) { m.set_seconds_per_split(0); }},
      {"threads_per_worker", [](v1::CapacityResponse& m) { m.set_threads_per_worker(0); }},
      {"deadline_seconds", [](v1::CapacityResponse& m) { m.set_deadline_seconds(-2); }},
  };
  for (const Case& c : cases) {
    v1::CapacityResponse m = CapacityToProto(Table());
    c.spoil(m);
    auto r = CapacityFromProto(m);
    ASSERT_FALSE(r.ok()) << c.field;
    EXPECT_EQ(r.status().code(), absl::StatusCode::kInvalidArgument);
    EXPECT_NE(r.status().message().find(c.field), std::string::npos) << r.status();
  }
  v1::CapacityResponse m = CapacityToProto(Table());
  m.set_seconds_per_connected_set(nan);
  EXPECT_FALSE(CapacityFromProto(m).ok());
  for (int i = 0; i < 9; ++i) *m.add_rows() = m.rows(0);
  EXPECT_FALSE(CapacityFromProto(m).ok());
}

}  // namespace
}  // namespace sliceplan
