#include "core/query_proto.h"

#include <cerrno>
#include <cstring>
#include <fstream>
#include <sstream>

#include "absl/container/flat_hash_map.h"
#include "absl/strings/str_cat.h"
#include "core/status_macros.h"
#include "google/protobuf/util/json_util.h"

namespace sliceplan {
namespace {

absl::StatusOr<Relation> RelationFromProto(const v1::Relation& m, int i) {
  if (!m.has_rows()) {
    return absl::InvalidArgumentError(absl::StrCat(
        "relations[", i, "] (", m.name(), ").rows: missing; every relation "
        "needs an estimated row count"));
  }
  Relation rel{m.name(), m.rows().value(), kDefaultRowBytes};
  if (m.has_row_bytes()) rel.row_bytes = m.row_bytes().value();
  return rel;
}

absl::StatusOr<Predicate> PredicateFromProto(
    const v1::Predicate& m, int j,
    const absl::flat_hash_map<std::string, RelationId>& ids) {
  Predicate p;
  for (int k = 0; k < m.relations_size(); ++k) {
    const std::string& name = m.relations(k);
    const auto it = ids.find(name);
    if (it == ids.end()) {
      return absl::InvalidArgumentError(
          absl::StrCat("predicates[", j, "].relations[", k,
                       "]: unknown relation \"", name, "\""));
    }
    if (Contains(p.relations, it->second)) {
      return absl::InvalidArgumentError(
          absl::StrCat("predicates[", j, "].relations[", k,
                       "]: relation \"", name, "\" is named twice"));
    }
    p.relations |= Singleton(it->second);
  }
  if (!m.has_selectivity()) {
    return absl::InvalidArgumentError(
        absl::StrCat("predicates[", j, "].selectivity: missing"));
  }
  p.selectivity = m.selectivity().value();
  return p;
}

}  // namespace

absl::StatusOr<Query> QueryFromProto(const v1::Query& message) {
  if (message.relations_size() > kMaxRelations) {
    return absl::InvalidArgumentError(absl::StrCat(
        "relations: ", message.relations_size(),
        " relations given; the exact search takes at most ", kMaxRelations));
  }
  std::vector<Relation> relations;
  absl::flat_hash_map<std::string, RelationId> ids;
  for (int i = 0; i < message.relations_size(); ++i) {
    ASSIGN_OR_RETURN(Relation rel, RelationFromProto(message.relations(i), i));
    ids.emplace(rel.name, RelationId{static_cast<uint8_t>(i)});
    relations.push_back(std::move(rel));
  }
  std::vector<Predicate> predicates;
  for (int j = 0; j < message.predicates_size(); ++j) {
    ASSIGN_OR_RETURN(Predicate p,
                     PredicateFromProto(message.predicates(j), j, ids));
    predicates.push_back(p);
  }
  // Query::Create reports duplicate names before a predicate could have
  // resolved to the wrong one of two equal names: names are checked first.
  return Query::Create(std::move(relations), std::move(predicates));
}

v1::Query QueryToProto(const Query& query) {
  v1::Query m;
  for (const Relation& rel : query.relations()) {
    v1::Relation* r = m.add_relations();
    r->set_name(rel.name);
    r->mutable_rows()->set_value(rel.rows);
    r->mutable_row_bytes()->set_value(rel.row_bytes);
  }
  for (const Predicate& p : query.predicates()) {
    v1::Predicate* out = m.add_predicates();
    ForEachMember(p.relations, [&](RelationId r) {
      out->add_relations(query.relation(r).name);
    });
    out->mutable_selectivity()->set_value(p.selectivity);
  }
  return m;
}

absl::StatusOr<Query> ParseQueryJson(std::string_view json) {
  v1::Query message;
  google::protobuf::util::JsonParseOptions options;
  options.ignore_unknown_fields = false;
  const auto status = google::protobuf::util::JsonStringToMessage(
      google::protobuf::StringPiece(json.data(), json.size()), &message,
      options);
  if (!status.ok()) {
    return absl::InvalidArgumentError(
        absl::StrCat("query JSON: ", status.message().as_string()));
  }
  return QueryFromProto(message);
}

absl::StatusOr<Query> ReadQueryFile(const std::string& path) {
  std::ifstream in(path, std::ios::binary);
  if (!in) {
    const int err = errno;
    const std::string why = absl::StrCat(path, ": ", std::strerror(err));
    return err == EACCES ? absl::PermissionDeniedError(why)
                         : absl::NotFoundError(why);
  }
  std::ostringstream text;
  text << in.rdbuf();
  auto query = ParseQueryJson(text.str());
  if (!query.ok()) {
    return absl::Status(query.status().code(),
                        absl::StrCat(path, ": ", query.status().message()));
  }
  return query;
}

}  // namespace sliceplan
