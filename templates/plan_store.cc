#include "templates/plan_store.h"

#include <sqlite3.h>

#include <ctime>
#include <optional>

#include "absl/strings/str_cat.h"

namespace sliceplan {
namespace {

constexpr const char* kSchema =
    "CREATE TABLE plan_sets ("
    "  seq INTEGER PRIMARY KEY,"
    "  id TEXT NOT NULL UNIQUE,"
    "  created_unix INTEGER NOT NULL,"
    "  plan_set TEXT NOT NULL);";

// A prepared statement, finalized on scope exit.
class Statement {
 public:
  Statement(sqlite3* db, const char* sql) {
    rc_ = sqlite3_prepare_v2(db, sql, -1, &stmt_, nullptr);
  }
  ~Statement() { sqlite3_finalize(stmt_); }
  Statement(const Statement&) = delete;
  Statement& operator=(const Statement&) = delete;
  bool ok() const { return rc_ == SQLITE_OK; }
  sqlite3_stmt* get() const { return stmt_; }
  // SQLITE_ROW, SQLITE_DONE or an error code.
  int Step() { return sqlite3_step(stmt_); }
  std::string Text(int column) const {
    const auto* p = sqlite3_column_text(stmt_, column);
    return p == nullptr ? std::string()
                        : std::string(reinterpret_cast<const char*>(p),
                                      static_cast<size_t>(sqlite3_column_bytes(stmt_, column)));
  }

 private:
  sqlite3_stmt* stmt_ = nullptr;
  int rc_ = SQLITE_ERROR;
};

absl::Status Refused(const std::string& path, const std::string& why) {
  return absl::FailedPreconditionError(absl::StrCat("--plan_store=", path, ": ", why));
}

// The first row's first column of `sql` as an integer; nullopt on error.
std::optional<int64_t> Scalar(sqlite3* db, const char* sql) {
  Statement s(db, sql);
  if (!s.ok() || s.Step() != SQLITE_ROW) return std::nullopt;
  return sqlite3_column_int64(s.get(), 0);
}

// "ok", or the integrity check's first complaints.
std::string IntegrityCheck(sqlite3* db) {
  Statement s(db, "PRAGMA integrity_check(5)");
  if (!s.ok()) return sqlite3_errmsg(db);
  std::string out;
  for (int rc; (rc = s.Step()) == SQLITE_ROW;)
    absl::StrAppend(&out, out.empty() ? "" : "; ", s.Text(0));
  return out.empty() ? sqlite3_errmsg(db) : out;
}

}  // namespace

absl::StatusOr<std::unique_ptr<PlanStore>> PlanStore::Open(const std::string& path) {
  sqlite3* db = nullptr;
  const int rc =
      sqlite3_open_v2(path.c_str(), &db, SQLITE_OPEN_READWRITE | SQLITE_OPEN_CREATE, nullptr);
  if (rc != SQLITE_OK) {
    const std::string why = db != nullptr ? sqlite3_errmsg(db) : sqlite3_errstr(rc);
    sqlite3_close(db);
    return Refused(path, why);
  }
  std::unique_ptr<PlanStore> store(new PlanStore(path, db));
  absl::MutexLock lock(&store->mu_);
  sqlite3_busy_timeout(db, 5000);
  // Reading the version is the first read of the file: a file that is not
  // a database fails here.
  const auto version = Scalar(db, "PRAGMA user_version");
  if (!version) return Refused(path, absl::StrCat("not a plan store: ", sqlite3_errmsg(db)));
  if (const std::string check = IntegrityCheck(db); check != "ok") {
    return Refused(path, absl::StrCat("the integrity check failed: ", check));
  }
  if (*version == 0) {
    const auto tables = Scalar(db, "SELECT count(*) FROM sqlite_master");
    if (!tables || *tables != 0) {
      return Refused(path, "an SQLite database, but not a plan store (no schema version)");
    }
    const std::string create = absl::StrCat(
        "BEGIN IMMEDIATE; ", kSchema, " PRAGMA user_version = ", kPlanStoreSchema, "; COMMIT;");
    if (auto s = store->Exec(create.c_str()); !s.ok())
      return Refused(path, std::string(s.message()));
  } else if (*version != kPlanStoreSchema) {
    return Refused(path, absl::StrCat("schema version ", *version, "; this build reads version ",
                                      kPlanStoreSchema));
  }
  if (auto s = store->Exec("PRAGMA synchronous = FULL"); !s.ok()) {
    return Refused(path, std::string(s.message()));
  }
  return store;
}

PlanStore::~PlanStore() {
  absl::MutexLock lock(&mu_);
  sqlite3_close(db_);
}

absl::Status PlanStore::Error(const std::string& what) {
  return absl::InternalError(
      absl::StrCat("plan store ", path_, ": ", what, ": ", sqlite3_errmsg(db_)));
}

absl::Status PlanStore::Exec(const char* sql) {
  char* message = nullptr;
  if (sqlite3_exec(db_, sql, nullptr, nullptr, &message) == SQLITE_OK) return absl::OkStatus();
  std::string why = message != nullptr ? message : sqlite3_errmsg(db_);
  sqlite3_free(message);
  return absl::InternalError(why);
}

absl::Status PlanStore::Rollback(absl::Status status) {
  Exec("ROLLBACK").IgnoreError();
  return status;
}

absl::Status PlanStore::Put(const StoredPlanSet& entry, size_t max_templates) {
  absl::MutexLock lock(&mu_);
  if (!Exec("BEGIN IMMEDIATE").ok()) return Error("cannot begin a transaction");
  const auto count = Scalar(db_, "SELECT count(*) FROM plan_sets");
  if (!count) return Rollback(Error("cannot count the templates"));
  if (static_cast<size_t>(*count) >= max_templates) {
    return Rollback(absl::ResourceExhaustedError(
        absl::StrCat("the plan store holds ", *count, *count == 1 ? " template" : " templates",
                     ", its limit (--max_templates)")));
  }
  Statement insert(db_, "INSERT INTO plan_sets (id, created_unix, plan_set) VALUES (?, ?, ?)");
  if (!insert.ok()) return Rollback(Error("cannot prepare the insert"));
  if (sqlite3_bind_text(insert.get(), 1, entry.id.data(), static_cast<int>(entry.id.size()),
                        SQLITE_TRANSIENT) != SQLITE_OK ||
      sqlite3_bind_int64(insert.get(), 2, static_cast<int64_t>(std::time(nullptr))) != SQLITE_OK ||
      sqlite3_bind_text(insert.get(), 3, entry.plan_set_json.data(),
                        static_cast<int>(entry.plan_set_json.size()),
                        SQLITE_TRANSIENT) != SQLITE_OK) {
    return Rollback(Error("cannot bind the template"));
  }
  if (const int rc = insert.Step(); rc != SQLITE_DONE) {
    if (rc == SQLITE_CONSTRAINT) {
      return Rollback(
          absl::AlreadyExistsError(absl::StrCat("template id ", entry.id, " is stored")));
    }
    return Rollback(Error("cannot insert the template"));
  }
  if (!Exec("COMMIT").ok()) return Rollback(Error("cannot commit"));
  return absl::OkStatus();
}

absl::StatusOr<std::vector<StoredPlanSet>> PlanStore::LoadAll() {
  absl::MutexLock lock(&mu_);
  Statement s(db_, "SELECT id, plan_set FROM plan_sets ORDER BY seq");
  if (!s.ok()) return Error("cannot read the templates");
  std::vector<StoredPlanSet> out;
  int rc;
  while ((rc = s.Step()) == SQLITE_ROW) out.push_back({s.Text(0), s.Text(1)});
  if (rc != SQLITE_DONE) return Error("cannot read the templates");
  return out;
}

}  // namespace sliceplan
