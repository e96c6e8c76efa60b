// Reading the query JSON: a valid file round-trips, and each malformed file
// is refused with a message naming the field and its position.
#include "wire/query_proto.h"

#include <cctype>

#include "gtest/gtest.h"

namespace sliceplan {
namespace {

// A query of relations a, b, c and d with `joins` as its joins entries.
std::string JoinsQuery(std::string joins) {
  return R"({"relations": [{"name": "a", "rows": 1}, {"name": "b", "rows": 1},
             {"name": "c", "rows": 1}, {"name": "d", "rows": 1}], "joins": [)" +
         joins + "]}";
}

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

TEST(QueryProtoTest, JoinsRoundTripThroughTheMessage) {
  auto q =
      ReadQueryFile(std::string(SLICEPLAN_SOURCE_DIR) + "/examples/port_inspections_joins.json");
  ASSERT_TRUE(q.ok()) << q.status();
  ASSERT_EQ(q->joins().size(), 3u);
  EXPECT_EQ(q->joins()[0].type, JoinType::kSemi);
  EXPECT_EQ(q->joins()[1].type, JoinType::kLeft);
  EXPECT_EQ(q->joins()[2].type, JoinType::kAnti);
  EXPECT_EQ(q->joins()[2].left, RelSet{1} << 6);   // berths
  EXPECT_EQ(q->joins()[2].right, RelSet{1} << 7);  // bookings
  EXPECT_DOUBLE_EQ(q->joins()[1].selectivity, 4.8e-7);
  auto back = QueryFromProto(QueryToProto(*q));
  ASSERT_TRUE(back.ok()) << back.status();
  ASSERT_EQ(back->joins().size(), 3u);
  for (size_t k = 0; k < 3; ++k) {
    EXPECT_EQ(back->joins()[k].type, q->joins()[k].type);
    EXPECT_EQ(back->joins()[k].left, q->joins()[k].left);
    EXPECT_EQ(back->joins()[k].right, q->joins()[k].right);
    EXPECT_EQ(back->joins()[k].predicate, q->joins()[k].predicate);
    EXPECT_EQ(back->joins()[k].selectivity, q->joins()[k].selectivity);
  }
}

struct BadCase {
  const char* what;
  std::string json;
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
    {"unknown top-level field", R"({"relations": [{"name": "a", "rows": 1}], "hints": []})",
     "hints"},
    // Non-inner joins (docs/joins.md), each refused by entry and field.
    {"join type", JoinsQuery(R"({"type": "lft", "left": ["a"], "right": ["b"],
       "predicate": {"relations": ["a", "b"], "selectivity": 0.1}})"),
     "joins[0].type: \"lft\" is not a join type"},
    {"inner as a join", JoinsQuery(R"({"type": "inner", "left": ["a"], "right": ["b"],
       "predicate": {"relations": ["a", "b"], "selectivity": 0.1}})"),
     "joins[0].type: \"inner\" is not a join type"},
    {"join unknown relation", JoinsQuery(R"({"type": "left", "left": ["a"], "right": ["x"],
       "predicate": {"relations": ["a", "b"], "selectivity": 0.1}})"),
     "joins[0].right[0]: unknown relation \"x\""},
    {"join relation in both sides", JoinsQuery(R"({"type": "left", "left": ["a", "b"],
       "right": ["b"], "predicate": {"relations": ["a", "b"], "selectivity": 0.1}})"),
     "joins[0].right: b also in left"},
    {"join predicate one side", JoinsQuery(R"({"type": "semi", "left": ["a"], "right": ["b", "c"],
       "predicate": {"relations": ["b", "c"], "selectivity": 0.1}})"),
     "joins[0].predicate: must name a relation of each side"},
    {"join predicate missing", JoinsQuery(R"({"type": "anti", "left": ["a"], "right": ["b"]})"),
     "joins[0].predicate: missing"},
    {"joins not nesting", JoinsQuery(R"({"type": "left", "left": ["a"], "right": ["b"],
       "predicate": {"relations": ["a", "b"], "selectivity": 0.1}},
      {"type": "left", "left": ["b"], "right": ["c"],
       "predicate": {"relations": ["b", "c"], "selectivity": 0.1}})"),
     "joins[1].left: its relations and those of joins[0] do not nest like a tree"},
    {"join reads a semi join's right side", JoinsQuery(R"({"type": "semi", "left": ["a"],
       "right": ["b"], "predicate": {"relations": ["a", "b"], "selectivity": 0.1}},
      {"type": "left", "left": ["a", "b"], "right": ["c"],
       "predicate": {"relations": ["b", "c"], "selectivity": 0.1}})"),
     "joins[1].predicate: reads b, the right side of the semi join joins[0], from above it"},
    {"inner predicate on a null-supplying side",
     R"({"relations": [{"name": "a", "rows": 1}, {"name": "b", "rows": 1}, {"name": "c", "rows": 1}],
       "predicates": [{"relations": ["b", "c"], "selectivity": 0.5}],
       "joins": [{"type": "left", "left": ["a"], "right": ["b"],
                  "predicate": {"relations": ["a", "b"], "selectivity": 0.1}}]})",
     "predicates[0]: joins b, the null-supplying side of the left join joins[0], to a relation "
     "outside it; it rejects the padded nulls, so send that join as inner"},
    {"wrong type", R"({"relations": [{"name": "a", "rows": "many"}]})", "relations[0].rows"},
    {"no relations", R"({"relations": []})", "relations: the query has no relations"},
    {"duplicate name", R"({"relations": [{"name": "a", "rows": 1}, {"name": "a", "rows": 2}]})",
     "relations[1].name: duplicate relation name \"a\""},
    {"bad name", R"({"relations": [{"name": "9lives", "rows": 1}]})", "relations[0].name"},
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
    {"duplicate name used by a predicate",
     R"({"relations": [{"name": "a", "rows": 1}, {"name": "a", "rows": 2}],
         "predicates": [{"relations": ["a", "a"], "selectivity": 0.1}]})",
     "relations[1].name: duplicate relation name \"a\" (also relations[0])"},
    {"array inside the predicate list",
     R"({"relations": [{"name": "a", "rows": 1}, {"name": "b", "rows": 1}],
         "predicates": [{"relations": ["a", "b"], "selectivity": 0.1}, [[]]]})",
     "predicates[1]: an array inside an array"},
    {"null relation", R"({"relations": [{"name": "a", "rows": 1}, null]})",
     "relations[1]: null inside an array"},
    {"key given twice", R"({"relations": [{"name": "a", "rows": 1, "rows": 2}]})",
     "relations[0].rows: given twice in one object"},
    {"key given twice, once escaped",
     R"({"relations": [{"name": "a", "rows": 1, "r\u006fws": 2}]})", "given twice in one object"},
    {"list given twice, once escaped",
     R"({"relations": [{"name": "a", "rows": 1}, {"name": "b", "rows": 1}],
         "predicates": [{"relations": ["a", "b"], "selectivity": 0.5}],
         "pr\u0065dicates": [{"relations": ["a", "b"], "selectivity": 1}]})",
     "given twice in one object"},
    {"key given in both spellings",
     R"({"relations": [{"name": "a", "rows": 1, "row_bytes": 5, "rowBytes": 7}]})",
     "given twice in one object"},
    {"too deep", R"({"relations": [{"name": {"a": {"b": {"c": {"d": {"e": {"f": {"g": {"h":
         {"i": {"j": {"k": {"l": {"m": {"n": {"o": {}}}}}}}}}}}}}}}}}]})",
     "nested deeper than 16 levels"},
    {"invalid UTF-8", "{\"relations\": [{\"name\": \"\xc3\x28\", \"rows\": 1}]}",
     "query JSON: not valid UTF-8"},
    {"row width past the bound", R"({"relations": [{"name": "a", "rows": 1, "row_bytes": 1e300}]})",
     "relations[0] (a).row_bytes: must be a number in (0, 1e+12], got 1e+300"},
    {"estimate naming an unknown relation",
     R"({"relations": [{"name": "a", "rows": 1}, {"name": "b", "rows": 1}],
         "cardinalities": [{"relations": ["a", "c"], "rows": 5}]})",
     "cardinalities[0].relations[1]: unknown relation \"c\""},
    {"estimate naming a relation twice",
     R"({"relations": [{"name": "a", "rows": 1}, {"name": "b", "rows": 1}],
         "cardinalities": [{"relations": ["b", "b"], "rows": 5}]})",
     "cardinalities[0].relations[1]: relation \"b\" is named twice"},
    {"estimate without rows",
     R"({"relations": [{"name": "a", "rows": 1}, {"name": "b", "rows": 1}],
         "cardinalities": [{"relations": ["a", "b"]}]})",
     "cardinalities[0].rows: missing"},
    {"estimate of no relations",
     R"({"relations": [{"name": "a", "rows": 1}],
         "cardinalities": [{"relations": [], "rows": 5}]})",
     "cardinalities[0].relations: empty"},
    {"estimate of negative rows",
     R"({"relations": [{"name": "a", "rows": 1}, {"name": "b", "rows": 1}],
         "cardinalities": [{"relations": ["a", "b"], "rows": 5},
                           {"relations": ["b"], "rows": -2}]})",
     "cardinalities[1].rows: must be finite and > 0, got -2"},
    {"estimate of infinite rows",
     R"({"relations": [{"name": "a", "rows": 1}],
         "cardinalities": [{"relations": ["a"], "rows": "Infinity"}]})",
     "cardinalities[0].rows: must be finite and > 0, got inf"},
    {"one set estimated twice apart",
     R"({"relations": [{"name": "a", "rows": 1}, {"name": "b", "rows": 1}],
         "cardinalities": [{"relations": ["a", "b"], "rows": 5},
                           {"relations": ["b", "a"], "rows": 6}]})",
     "cardinalities[1]: the same relations are listed again with other rows (6 against 5)"},
};

INSTANTIATE_TEST_SUITE_P(Files, QueryProtoBadInputTest, ::testing::ValuesIn(kBadCases),
                         [](const ::testing::TestParamInfo<BadCase>& param_info) {
                           std::string name = param_info.param.what;
                           for (char& c : name) {
                             if (!std::isalnum(static_cast<unsigned char>(c))) c = '_';
                           }
                           return name;
                         });

TEST(QueryProtoTest, EstimatesRoundTripAndKeepTheirSets) {
  const std::string json = R"({
    "relations": [{"name": "quays", "rows": 40}, {"name": "berths", "rows": 300},
                  {"name": "cranes", "rows": 90}],
    "predicates": [{"relations": ["quays", "berths"], "selectivity": 0.02},
                   {"relations": ["berths", "cranes"], "selectivity": 0.01}],
    "cardinalities": [{"relations": ["berths", "quays"], "rows": 410},
                      {"relations": ["cranes"], "rows": 88},
                      {"relations": ["cranes"], "rows": 88}]})";
  auto q = ParseQueryJson(json);
  ASSERT_TRUE(q.ok()) << q.status();
  ASSERT_NE(q->listed(), nullptr);
  EXPECT_EQ(q->listed()->size(), 2u);  // the repeat with the same rows is one
  EXPECT_EQ(q->listed()->Find(0b011), 410);
  EXPECT_EQ(q->listed()->Find(0b100), 88);
  auto back = QueryFromProto(QueryToProto(*q));
  ASSERT_TRUE(back.ok()) << back.status();
  ASSERT_NE(back->listed(), nullptr);
  EXPECT_EQ(back->listed()->size(), 2u);
  EXPECT_EQ(back->listed()->Find(0b011), 410);
}

TEST(QueryProtoTest, EstimatesAreLimitedBeforeAnythingIsBuilt) {
  const std::string json = R"({"relations": [{"name": "a", "rows": 1}, {"name": "b", "rows": 1}],
      "cardinalities": [{"relations": ["a"], "rows": 1}, {"relations": ["b"], "rows": 2},
                        {"relations": ["a", "b"], "rows": 3}]})";
  InputLimits limits;
  limits.max_cardinalities = 2;
  auto q = ParseQueryJson(json, limits);
  ASSERT_FALSE(q.ok());
  EXPECT_EQ(q.status().code(), absl::StatusCode::kResourceExhausted);
  EXPECT_EQ(q.status().message(), "cardinalities: 3 listed sets given; the limit is 2");
  // Past 64 relations the estimates are refused by name.
  std::string wide = R"({"relations": [)";
  for (int i = 0; i < 65; ++i) {
    wide +=
        (i ? "," : "") + std::string(R"({"name": "r)") + std::to_string(i) + R"(", "rows": 10})";
  }
  wide += R"(], "cardinalities": [{"relations": ["r0"], "rows": 3}]})";
  auto w = ParseWideQueryJson(wide);
  ASSERT_FALSE(w.ok());
  EXPECT_EQ(w.status().message(),
            "cardinalities: the engine's estimates are taken for queries of up to 64 relations; "
            "this one has 65");
}

TEST(QueryProtoTest, RefusesMoreThanSixtyFourRelations) {
  std::string json = R"({"relations": [)";
  for (int i = 0; i < 65; ++i) {
    json +=
        (i ? "," : "") + std::string(R"({"name": "r)") + std::to_string(i) + R"(", "rows": 10})";
  }
  json += "]}";
  auto q = ParseQueryJson(json);
  ASSERT_FALSE(q.ok());
  EXPECT_NE(q.status().message().find("65 relations given; the exact search "
                                      "takes at most 64"),
            std::string::npos)
      << q.status();
}

TEST(QueryProtoTest, LongNamesAreRefusedAndNeverEchoedWhole) {
  const std::string name(100000, 'x');
  auto q = ParseQueryJson(R"({"relations": [{"name": ")" + name + R"(", "rows": 1}]})");
  ASSERT_FALSE(q.ok());
  EXPECT_EQ(q.status().message(), "relations[0].name: 100000 bytes; a name has at most 256");
  auto unknown = ParseQueryJson(
      R"({"relations": [{"name": "a", "rows": 1}, {"name": "b", "rows": 1}],
          "predicates": [{"relations": ["a", ")" +
      name + R"("], "selectivity": 0.1}]})");
  ASSERT_FALSE(unknown.ok());
  EXPECT_LT(unknown.status().message().size(), 200u) << unknown.status();
  EXPECT_NE(unknown.status().message().find("... (100000 bytes)"), std::string::npos);
}

// Sizes are checked before anything is built from the message.
TEST(QueryProtoTest, SizeLimitsAreResourceExhaustedWithTheNumbers) {
  InputLimits limits;
  limits.max_predicates = 3;
  limits.max_query_bytes = 400;
  std::string json = R"({"relations": [{"name": "a", "rows": 1}, {"name": "b", "rows": 1}],
                         "predicates": [)";
  for (int i = 0; i < 4; ++i) {
    json += std::string(i ? "," : "") + R"({"relations": ["a", "b"], "selectivity": 0.5})";
  }
  json += "]}";
  auto q = ParseQueryJson(json, limits);
  ASSERT_FALSE(q.ok());
  EXPECT_EQ(q.status().code(), absl::StatusCode::kResourceExhausted);
  EXPECT_EQ(q.status().message(), "predicates: 4 predicates given; the limit is 3");
  limits.max_query_bytes = 100;
  q = ParseQueryJson(json, limits);
  ASSERT_FALSE(q.ok());
  EXPECT_EQ(q.status().code(), absl::StatusCode::kResourceExhausted);
  EXPECT_NE(q.status().message().find("bytes; the limit is 100"), std::string::npos);
  limits.max_relations = 1;
  v1::Query two;
  two.add_relations()->set_name("a");
  two.add_relations()->set_name("b");
  auto r = QueryFromProto(two, limits);
  ASSERT_FALSE(r.ok());
  EXPECT_EQ(r.status().message(), "relations: 2 relations given; the limit is 1");
}

// Four predicates over {a, b} of selectivity 0.5 apply together: one of
// 0.0625, so card(a b) = 10 * 10 * 0.0625 = 6.25 either way.
TEST(QueryProtoTest, PredicatesOverOneSetAreMergedIntoOne) {
  std::string json = R"({"relations": [{"name": "a", "rows": 10}, {"name": "b", "rows": 10}],
                         "predicates": [)";
  for (int i = 0; i < 4; ++i) {
    json += std::string(i ? "," : "") + R"({"relations": ["b", "a"], "selectivity": 0.5})";
  }
  json += "]}";
  auto q = ParseQueryJson(json);
  ASSERT_TRUE(q.ok()) << q.status();
  ASSERT_EQ(q->predicates().size(), 1u);
  EXPECT_EQ(q->predicates()[0].selectivity, 0.0625);
}

TEST(QueryProtoTest, MissingFileIsNotFoundWithThePath) {
  auto q = ReadQueryFile("/nonexistent/query.json");
  ASSERT_FALSE(q.ok());
  EXPECT_EQ(q.status().code(), absl::StatusCode::kNotFound);
  EXPECT_NE(q.status().message().find("/nonexistent/query.json"), std::string::npos);
}

}  // namespace
}  // namespace sliceplan
