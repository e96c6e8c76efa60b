#include "wire/query_proto.h"

#include <algorithm>
#include <memory>

#include "absl/container/flat_hash_map.h"
#include "absl/strings/str_cat.h"
#include "core/model/status_macros.h"
#include "core/model/user_text.h"
#include "google/protobuf/util/json_util.h"
#include "wire/bounded_file.h"
#include "wire/json_shape.h"

namespace sliceplan {
namespace {

absl::StatusOr<Relation> RelationFromProto(const v1::Relation& m, int i) {
  if (!m.has_rows()) {
    return absl::InvalidArgumentError(absl::StrCat("relations[", i, "] (", ShortName(m.name()),
                                                   ").rows: missing; every relation "
                                                   "needs an estimated row count"));
  }
  Relation rel{m.name(), m.rows(), kDefaultRowBytes};
  if (m.has_row_bytes()) rel.row_bytes = m.row_bytes();
  return rel;
}

// The ids of `names` (the list at `field`, e.g. "predicates[2].relations").
// INVALID_ARGUMENT naming the entry: an unknown relation, one named twice.
absl::StatusOr<std::vector<int32_t>> ResolveNames(
    const google::protobuf::RepeatedPtrField<std::string>& names, const std::string& field,
    const absl::flat_hash_map<std::string_view, int32_t>& ids) {
  std::vector<int32_t> out;
  out.reserve(names.size());
  for (int k = 0; k < names.size(); ++k) {
    const std::string& name = names[k];
    const auto it = ids.find(name);
    if (it == ids.end()) {
      return absl::InvalidArgumentError(
          absl::StrCat(field, "[", k, "]: unknown relation \"", ShortName(name), "\""));
    }
    if (std::find(out.begin(), out.end(), it->second) != out.end()) {
      return absl::InvalidArgumentError(
          absl::StrCat(field, "[", k, "]: relation \"", ShortName(name), "\" is named twice"));
    }
    out.push_back(it->second);
  }
  return out;
}

absl::StatusOr<WidePredicate> PredicateFromProto(
    const v1::Predicate& m, int j, const absl::flat_hash_map<std::string_view, int32_t>& ids) {
  WidePredicate p;
  ASSIGN_OR_RETURN(p.relations,
                   ResolveNames(m.relations(), absl::StrCat("predicates[", j, "].relations"), ids));
  if (!m.has_selectivity()) {
    return absl::InvalidArgumentError(absl::StrCat("predicates[", j, "].selectivity: missing"));
  }
  p.selectivity = m.selectivity();
  return p;
}

// The listed estimates, names resolved to ids. Errors name the entry.
absl::StatusOr<ListedRows> ListedFromProto(
    const v1::Query& message, const absl::flat_hash_map<std::string_view, int32_t>& ids) {
  std::vector<ListedSet> sets;
  sets.reserve(message.cardinalities_size());
  for (int i = 0; i < message.cardinalities_size(); ++i) {
    const v1::SetRows& m = message.cardinalities(i);
    ASSIGN_OR_RETURN(
        const std::vector<int32_t> members,
        ResolveNames(m.relations(), absl::StrCat("cardinalities[", i, "].relations"), ids));
    ListedSet set;
    for (const int32_t r : members) set.relations |= Singleton(RelationId{static_cast<uint8_t>(r)});
    if (!m.has_rows()) {
      return absl::InvalidArgumentError(absl::StrCat("cardinalities[", i, "].rows: missing"));
    }
    set.rows = m.rows();
    sets.push_back(set);
  }
  return ListedRows::Create(static_cast<int>(message.relations_size()), std::move(sets));
}

// A relation list of a joins entry as a mask.
absl::StatusOr<RelSet> SetFromNames(const google::protobuf::RepeatedPtrField<std::string>& names,
                                    const std::string& field,
                                    const absl::flat_hash_map<std::string_view, int32_t>& ids) {
  ASSIGN_OR_RETURN(const std::vector<int32_t> members, ResolveNames(names, field, ids));
  RelSet set = 0;
  for (const int32_t r : members) set |= Singleton(RelationId{static_cast<uint8_t>(r)});
  return set;
}

// The non-inner joins, names resolved. Errors name the entry and field;
// the operators' structure is checked by ValidateJoinOps (ToExactQuery).
absl::StatusOr<std::vector<JoinOp>> JoinsFromProto(
    const v1::Query& message, const absl::flat_hash_map<std::string_view, int32_t>& ids) {
  std::vector<JoinOp> ops;
  for (int k = 0; k < message.joins_size(); ++k) {
    const v1::JoinOp& m = message.joins(k);
    const std::string at = absl::StrCat("joins[", k, "]");
    const std::optional<JoinType> type = ParseJoinType(m.type());
    if (!type || *type == JoinType::kInner) {
      return absl::InvalidArgumentError(
          absl::StrCat(at, ".type: \"", ShortName(m.type()),
                       "\" is not a join type; one of left, full, semi, anti (inner joins are "
                       "the query's predicates)"));
    }
    JoinOp op;
    op.type = *type;
    ASSIGN_OR_RETURN(op.left, SetFromNames(m.left(), at + ".left", ids));
    ASSIGN_OR_RETURN(op.right, SetFromNames(m.right(), at + ".right", ids));
    if (!m.has_predicate()) return absl::InvalidArgumentError(at + ".predicate: missing");
    ASSIGN_OR_RETURN(op.predicate,
                     SetFromNames(m.predicate().relations(), at + ".predicate.relations", ids));
    if (!m.predicate().has_selectivity()) {
      return absl::InvalidArgumentError(at + ".predicate.selectivity: missing");
    }
    op.selectivity = m.predicate().selectivity();
    ops.push_back(op);
  }
  return ops;
}

absl::Status CheckSizes(const v1::Query& message, const InputLimits& limits) {
  if (message.relations_size() > limits.max_relations) {
    return absl::ResourceExhaustedError(absl::StrCat("relations: ", message.relations_size(),
                                                     " relations given; the limit is ",
                                                     limits.max_relations));
  }
  if (message.predicates_size() > limits.max_predicates) {
    return absl::ResourceExhaustedError(absl::StrCat("predicates: ", message.predicates_size(),
                                                     " predicates given; the limit is ",
                                                     limits.max_predicates));
  }
  if (message.cardinalities_size() > limits.max_cardinalities) {
    return absl::ResourceExhaustedError(
        absl::StrCat("cardinalities: ", message.cardinalities_size(),
                     " listed sets given; the limit is ", limits.max_cardinalities));
  }
  if (message.joins_size() > limits.max_predicates) {
    return absl::ResourceExhaustedError(absl::StrCat(
        "joins: ", message.joins_size(), " entries given; the limit is ", limits.max_predicates));
  }
  if (message.joins_size() > 0 && message.relations_size() > kMaxRelations) {
    return absl::InvalidArgumentError(
        absl::StrCat("joins: non-inner joins are taken for queries of up to ", kMaxRelations,
                     " relations; this one has ", message.relations_size()));
  }
  if (message.cardinalities_size() > 0 && message.relations_size() > kMaxRelations) {
    return absl::InvalidArgumentError(
        absl::StrCat("cardinalities: the engine's estimates are taken for queries of up to ",
                     kMaxRelations, " relations; this one has ", message.relations_size()));
  }
  return absl::OkStatus();
}

// Names are checked before any predicate resolves a name, so that two
// relations of one name are reported as such, not as a predicate naming
// one relation twice.
absl::Status CheckNames(const v1::Query& message) {
  absl::flat_hash_map<std::string_view, int> seen;
  for (int i = 0; i < message.relations_size(); ++i) {
    const std::string& name = message.relations(i).name();
    if (name.size() > kMaxNameBytes) {
      return absl::InvalidArgumentError(absl::StrCat("relations[", i, "].name: ", name.size(),
                                                     " bytes; a name has at most ", kMaxNameBytes));
    }
    if (!IsValidRelationName(name)) {
      return absl::InvalidArgumentError(
          absl::StrCat("relations[", i, "].name: \"", ShortName(name),
                       "\" is not a name of the form [A-Za-z_][A-Za-z0-9_]*"));
    }
    const auto [it, inserted] = seen.emplace(name, i);
    if (!inserted) {
      return absl::InvalidArgumentError(
          absl::StrCat("relations[", i, "].name: duplicate relation name \"", ShortName(name),
                       "\" (also relations[", it->second, "])"));
    }
  }
  return absl::OkStatus();
}

}  // namespace

absl::StatusOr<WideQuery> WideQueryFromProto(const v1::Query& message, const InputLimits& limits) {
  RETURN_IF_ERROR(CheckSizes(message, limits));
  RETURN_IF_ERROR(CheckNames(message));
  std::vector<Relation> relations;
  relations.reserve(message.relations_size());
  absl::flat_hash_map<std::string_view, int32_t> ids;
  ids.reserve(message.relations_size());
  for (int i = 0; i < message.relations_size(); ++i) {
    ASSIGN_OR_RETURN(Relation rel, RelationFromProto(message.relations(i), i));
    ids.emplace(message.relations(i).name(), i);
    relations.push_back(std::move(rel));
  }
  std::vector<WidePredicate> predicates;
  predicates.reserve(message.predicates_size());
  for (int j = 0; j < message.predicates_size(); ++j) {
    ASSIGN_OR_RETURN(WidePredicate p, PredicateFromProto(message.predicates(j), j, ids));
    predicates.push_back(std::move(p));
  }
  // Names were checked first, so no predicate resolved to the wrong one of
  // two equal names.
  ASSIGN_OR_RETURN(WideQuery query, WideQuery::Create(std::move(relations), std::move(predicates)));
  if (message.cardinalities_size() > 0) {
    ASSIGN_OR_RETURN(ListedRows listed, ListedFromProto(message, ids));
    query = query.WithListed(std::make_shared<const ListedRows>(std::move(listed)));
  }
  if (message.joins_size() == 0) return query;
  ASSIGN_OR_RETURN(std::vector<JoinOp> joins, JoinsFromProto(message, ids));
  query = query.WithJoins(std::move(joins));
  RETURN_IF_ERROR(ToExactQuery(query).status());  // the operators' structure, by name
  return query;
}

absl::StatusOr<Query> QueryFromProto(const v1::Query& message, const InputLimits& limits) {
  ASSIGN_OR_RETURN(const WideQuery wide, WideQueryFromProto(message, limits));
  return ToExactQuery(wide);
}

v1::Query QueryToProto(const Query& query) { return WideQueryToProto(WideQuery::FromExact(query)); }

v1::Query WideQueryToProto(const WideQuery& query) {
  v1::Query m;
  for (const Relation& rel : query.relations()) {
    v1::Relation* r = m.add_relations();
    r->set_name(rel.name);
    r->set_rows(rel.rows);
    r->set_row_bytes(rel.row_bytes);
  }
  for (const WidePredicate& p : query.predicates()) {
    v1::Predicate* out = m.add_predicates();
    for (const int32_t r : p.relations) out->add_relations(query.relation(r).name);
    out->set_selectivity(p.selectivity);
  }
  if (query.listed() != nullptr) {
    for (const ListedSet& set : query.listed()->sets()) {
      v1::SetRows* out = m.add_cardinalities();
      ForEachMember(set.relations,
                    [&](RelationId r) { out->add_relations(query.relation(r.value).name); });
      out->set_rows(set.rows);
    }
  }
  for (const JoinOp& op : query.joins()) {
    v1::JoinOp* out = m.add_joins();
    out->set_type(JoinTypeName(op.type));
    const auto names = [&](RelSet s, google::protobuf::RepeatedPtrField<std::string>* to) {
      ForEachMember(s, [&](RelationId r) { to->Add(std::string(query.relation(r.value).name)); });
    };
    names(op.left, out->mutable_left());
    names(op.right, out->mutable_right());
    names(op.predicate, out->mutable_predicate()->mutable_relations());
    out->mutable_predicate()->set_selectivity(op.selectivity);
  }
  return m;
}

absl::StatusOr<WideQuery> ParseWideQueryJson(std::string_view json, const InputLimits& limits) {
  if (static_cast<int64_t>(json.size()) > limits.max_query_bytes) {
    return absl::ResourceExhaustedError(
        absl::StrCat("query JSON: ", json.size(), " bytes; the limit is ", limits.max_query_bytes));
  }
  if (!IsValidUtf8(json)) {
    return absl::InvalidArgumentError("query JSON: not valid UTF-8");
  }
  RETURN_IF_ERROR(CheckJsonShape(json));
  v1::Query message;
  google::protobuf::util::JsonParseOptions options;
  options.ignore_unknown_fields = false;
  const auto status = google::protobuf::util::JsonStringToMessage(
      google::protobuf::StringPiece(json.data(), json.size()), &message, options);
  if (!status.ok()) {
    return absl::InvalidArgumentError(absl::StrCat("query JSON: ", status.message().as_string()));
  }
  return WideQueryFromProto(message, limits);
}

absl::StatusOr<Query> ParseQueryJson(std::string_view json, const InputLimits& limits) {
  ASSIGN_OR_RETURN(const WideQuery wide, ParseWideQueryJson(json, limits));
  return ToExactQuery(wide);
}

absl::StatusOr<WideQuery> ReadWideQueryFile(const std::string& path, const InputLimits& limits) {
  ASSIGN_OR_RETURN(const std::string text,
                   ReadBoundedFile(path, limits.max_query_bytes, "the query file"));
  auto query = ParseWideQueryJson(text, limits);
  if (!query.ok()) {
    return absl::Status(query.status().code(), absl::StrCat(path, ": ", query.status().message()));
  }
  return query;
}

absl::StatusOr<Query> ReadQueryFile(const std::string& path, const InputLimits& limits) {
  ASSIGN_OR_RETURN(const WideQuery wide, ReadWideQueryFile(path, limits));
  auto query = ToExactQuery(wide);
  if (!query.ok()) {
    return absl::Status(query.status().code(), absl::StrCat(path, ": ", query.status().message()));
  }
  return query;
}

}  // namespace sliceplan
