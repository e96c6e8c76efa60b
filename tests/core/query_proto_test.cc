// Reading the query JSON: a valid file round-trips, and each malformed file
// is refused with a message naming the field and its position.
#include "core/query_proto.h"

#include "gtest/gtest.h"

namespace sliceplan {
namespace {

constexpr char kValid[] = R"({
  "relations": [
    {"name": "shipments", "rows": 2.1e9, "row_bytes": 96},
    {"name": "vessels", "rows": 4000},
    {"name": "ports", "rows": 900}
  ],
  "predicates": [
    {"relations": ["shipments", "vessels"], "selectivity": 2.5e-4},
    {"relations": ["shipments", "vessels", "ports"], "selectivity": 0.01}
  ]
})";

TEST(QueryProtoTest, ParsesAValidQuery) {
  auto q = ParseQueryJson(kValid);
  ASSERT_TRUE(q.ok()) << q.status();
  ASSERT_EQ(q->size(), 3);
  EXPECT_EQ(q->relation(RelationId{0}).name, "shipments");
  EXPECT_DOUBLE_EQ(q->relation(RelationId{0}).rows, 2.1e9);
  EXPECT_DOUBLE_EQ(q->relation(RelationId{0}).row_bytes, 96);
  EXPECT_DOUBLE_EQ(q->relation(RelationId{1}).row_bytes, kDefaultRowBytes);
  ASSERT_EQ(q->predicates().size(), 2u);
  EXPECT_EQ(q->predicates()[0].relations, RelSet{0b011});
  EXPECT_EQ(q->predicates()[1].relations, RelSet{0b111});
  EXPECT_DOUBLE_EQ(q->predicates()[1].selectivity, 0.01);
}

TEST(QueryProtoTest, RoundTripsThroughTheMessage) {
  auto q = ParseQueryJson(kValid);
  ASSERT_TRUE(q.ok());
  auto back = QueryFromProto(QueryToProto(*q));
  ASSERT_TRUE(back.ok());
  EXPECT_EQ(back->size(), 3);
  EXPECT_EQ(back->predicates()[1].relations, q->predicates()[1].relations);
}

struct BadCase {
  const char* what;
  const char* json;
  const char* message;  // a part the error must contain
};

class QueryProtoBadInputTest : public ::testing::TestWithParam<BadCase> {};

TEST_P(QueryProtoBadInputTest, NamesTheFieldAndPosition) {
  const BadCase& c = GetParam();
  auto q = ParseQueryJson(c.json);
  ASSERT_FALSE(q.ok()) << c.what;
  EXPECT_EQ(q.status().code(), absl::StatusCode::kInvalidArgument);
  EXPECT_NE(q.status().message().find(c.message), std::string::npos)
      << c.what << ": " << q.status().message();
}

const BadCase kBadCases[] = {
    {"not JSON", R"({"relations": [)", "query JSON"},
    {"unknown field", R"({"relations": [{"name": "a", "rows": 1, "size": 2}]})",
     "(relations[0]) size"},
    {"unknown top-level field", R"({"relations": [{"name": "a", "rows": 1}], "joins": []})",
     "joins"},
    {"wrong type", R"({"relations": [{"name": "a", "rows": "many"}]})",
     "relations[0].rows"},
    {"no relations", R"({"relations": []})", "relations: the query has no relations"},
    {"duplicate name", R"({"relations": [{"name": "a", "rows": 1}, {"name": "a", "rows": 2}]})",
     "relations[1].name: duplicate relation name \"a\""},
    {"bad name", R"({"relations": [{"name": "9lives", "rows": 1}]})",
     "relations[0].name"},
    {"missing rows", R"({"relations": [{"name": "a"}]})", "relations[0] (a).rows: missing"},
    {"zero rows", R"({"relations": [{"name": "a", "rows": 0}]})", "relations[0] (a).rows"},
    {"negative rows", R"({"relations": [{"name": "b", "rows": 3}, {"name": "a", "rows": -5}]})",
     "relations[1] (a).rows: must be a finite number > 0, got -5"},
    {"zero row_bytes", R"({"relations": [{"name": "a", "rows": 1, "row_bytes": 0}]})",
     "relations[0] (a).row_bytes"},
    {"selectivity zero",
     R"({"relations": [{"name": "a", "rows": 1}, {"name": "b", "rows": 1}],
         "predicates": [{"relations": ["a", "b"], "selectivity": 0}]})",
     "predicates[0].selectivity: must lie in (0, 1], got 0"},
    {"selectivity above one",
     R"({"relations": [{"name": "a", "rows": 1}, {"name": "b", "rows": 1}],
         "predicates": [{"relations": ["a", "b"], "selectivity": 0.5},
                        {"relations": ["a", "b"], "selectivity": 1.5}]})",
     "predicates[1].selectivity"},
    {"missing selectivity",
     R"({"relations": [{"name": "a", "rows": 1}, {"name": "b", "rows": 1}],
         "predicates": [{"relations": ["a", "b"]}]})",
     "predicates[0].selectivity: missing"},
    {"unknown relation",
     R"({"relations": [{"name": "a", "rows": 1}, {"name": "b", "rows": 1}],
         "predicates": [{"relations": ["a", "c"], "selectivity": 0.1}]})",
     "predicates[0].relations[1]: unknown relation \"c\""},
    {"repeated relation",
     R"({"relations": [{"name": "a", "rows": 1}, {"name": "b", "rows": 1}],
         "predicates": [{"relations": ["a", "a"], "selectivity": 0.1}]})",
     "predicates[0].relations[1]: relation \"a\" is named twice"},
    {"one relation",
     R"({"relations": [{"name": "a", "rows": 1}],
         "predicates": [{"relations": ["a"], "selectivity": 0.1}]})",
     "predicates[0].relations: must name two or more"},
};

INSTANTIATE_TEST_SUITE_P(Files, QueryProtoBadInputTest, ::testing::ValuesIn(kBadCases));

TEST(QueryProtoTest, RefusesMoreThanSixtyFourRelations) {
  std::string json = R"({"relations": [)";
  for (int i = 0; i < 65; ++i) {
    json += (i ? "," : "") + std::string(R"({"name": "r)") + std::to_string(i) +
            R"(", "rows": 10})";
  }
  json += "]}";
  auto q = ParseQueryJson(json);
  ASSERT_FALSE(q.ok());
  EXPECT_NE(q.status().message().find("65 relations given; the exact search "
                                      "takes at most 64"),
            std::string::npos)
      << q.status();
}

TEST(QueryProtoTest, MissingFileIsNotFoundWithThePath) {
  auto q = ReadQueryFile("/nonexistent/query.json");
  ASSERT_FALSE(q.ok());
  EXPECT_EQ(q.status().code(), absl::StatusCode::kNotFound);
  EXPECT_NE(q.status().message().find("/nonexistent/query.json"), std::string::npos);
}

}  // namespace
}  // namespace sliceplan
