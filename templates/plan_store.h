// The coordinator's plan store (docs/templates.md, "In the service"):
// prepared templates' plan set files in one SQLite database, by id.
//   - The schema is versioned (PRAGMA user_version); a file of another
//     version, or not a database at all, is refused at open.
//   - The file's integrity is checked at open (PRAGMA integrity_check).
//   - Each template is written in one transaction with a full sync: a
//     crash mid-write leaves every earlier template and either all of the
//     new one or none of it.
// Thread-safe: one connection behind a mutex.
#ifndef SLICEPLAN_TEMPLATES_PLAN_STORE_H_
#define SLICEPLAN_TEMPLATES_PLAN_STORE_H_

#include <memory>
#include <string>
#include <utility>
#include <vector>

#include "absl/base/thread_annotations.h"
#include "absl/status/statusor.h"
#include "absl/synchronization/mutex.h"

struct sqlite3;

namespace sliceplan {

inline constexpr int kPlanStoreSchema = 1;

struct StoredPlanSet {
  std::string id;
  std::string plan_set_json;  // templates/plan_set.h's file
};

class PlanStore {
 public:
  // Opens `path`, creating the database when the file does not exist.
  // FAILED_PRECONDITION naming the file: not an SQLite database, another
  // schema version, an integrity check that fails, a file that cannot be
  // opened or written.
  static absl::StatusOr<std::unique_ptr<PlanStore>> Open(const std::string& path);
  ~PlanStore();
  PlanStore(const PlanStore&) = delete;
  PlanStore& operator=(const PlanStore&) = delete;

  // Adds one template in a transaction. ALREADY_EXISTS for a stored id;
  // RESOURCE_EXHAUSTED when `max_templates` are stored already; INTERNAL
  // naming SQLite's message when the write fails (nothing written).
  absl::Status Put(const StoredPlanSet& entry, size_t max_templates) ABSL_LOCKS_EXCLUDED(mu_);
  // Every stored template, oldest first.
  absl::StatusOr<std::vector<StoredPlanSet>> LoadAll() ABSL_LOCKS_EXCLUDED(mu_);
  const std::string& path() const { return path_; }

 private:
  PlanStore(std::string path, sqlite3* db) : path_(std::move(path)), db_(db) {}
  // Runs statements that return no rows.
  absl::Status Exec(const char* sql) ABSL_EXCLUSIVE_LOCKS_REQUIRED(mu_);
  absl::Status Error(const std::string& what) ABSL_EXCLUSIVE_LOCKS_REQUIRED(mu_);
  // Ends the open transaction and returns `status`.
  absl::Status Rollback(absl::Status status) ABSL_EXCLUSIVE_LOCKS_REQUIRED(mu_);

  const std::string path_;
  absl::Mutex mu_;
  sqlite3* const db_ ABSL_PT_GUARDED_BY(mu_);
};

}  // namespace sliceplan

#endif  // SLICEPLAN_TEMPLATES_PLAN_STORE_H_
