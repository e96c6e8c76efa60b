// The coordinator's plan store (templates/plan_store.h): round trips and
// restarts, the limit, and every file it must refuse at open (not a
// database, another program's database, another schema version, a
// damaged file, a path it cannot create).
#include "templates/plan_store.h"

#include <sqlite3.h>
#include <unistd.h>

#include <cstdio>
#include <filesystem>
#include <fstream>

#include "gtest/gtest.h"
#include "tests/support/temp_path.h"

namespace sliceplan {
namespace {

void RunSql(const std::string& path, const char* sql) {
  sqlite3* db = nullptr;
  ASSERT_EQ(sqlite3_open(path.c_str(), &db), SQLITE_OK);
  char* error = nullptr;
  EXPECT_EQ(sqlite3_exec(db, sql, nullptr, nullptr, &error), SQLITE_OK) << error;
  sqlite3_free(error);
  sqlite3_close(db);
}

TEST(PlanStoreTest, TemplatesSurviveReopeningInOrder) {
  testing::TempPath file("store.db");
  {
    auto store = PlanStore::Open(file.str());
    ASSERT_TRUE(store.ok()) << store.status();
    EXPECT_TRUE((*store)->Put({"a1", "{\"x\": 1}"}, 10).ok());
    EXPECT_TRUE((*store)->Put({"b2", "{\"y\": 2}"}, 10).ok());
  }
  auto store = PlanStore::Open(file.str());
  ASSERT_TRUE(store.ok()) << store.status();
  auto all = (*store)->LoadAll();
  ASSERT_TRUE(all.ok()) << all.status();
  ASSERT_EQ(all->size(), 2u);
  EXPECT_EQ((*all)[0].id, "a1");
  EXPECT_EQ((*all)[0].plan_set_json, "{\"x\": 1}");
  EXPECT_EQ((*all)[1].id, "b2");
}

TEST(PlanStoreTest, TheLimitAndARepeatedIdWriteNothing) {
  testing::TempPath file("limit.db");
  auto store = PlanStore::Open(file.str());
  ASSERT_TRUE(store.ok()) << store.status();
  ASSERT_TRUE((*store)->Put({"a", "1"}, 2).ok());
  const absl::Status twice = (*store)->Put({"a", "2"}, 2);
  EXPECT_EQ(twice.code(), absl::StatusCode::kAlreadyExists) << twice;
  ASSERT_TRUE((*store)->Put({"b", "2"}, 2).ok());
  const absl::Status full = (*store)->Put({"c", "3"}, 2);
  EXPECT_EQ(full.code(), absl::StatusCode::kResourceExhausted) << full;
  EXPECT_NE(full.message().find("--max_templates"), std::string::npos) << full;
  auto all = (*store)->LoadAll();
  ASSERT_TRUE(all.ok());
  ASSERT_EQ(all->size(), 2u);
  EXPECT_EQ((*all)[0].plan_set_json, "1");
}

TEST(PlanStoreTest, ATextFileIsRefusedByName) {
  testing::TempPath file("text.db");
  std::ofstream(file.str()) << "this is a plan set file, not a database\n";
  auto store = PlanStore::Open(file.str());
  ASSERT_FALSE(store.ok());
  EXPECT_EQ(store.status().code(), absl::StatusCode::kFailedPrecondition);
  EXPECT_NE(store.status().message().find(file.str()), std::string::npos) << store.status();
  EXPECT_NE(store.status().message().find("not a plan store"), std::string::npos) << store.status();
}

TEST(PlanStoreTest, AnotherProgramsDatabaseIsRefused) {
  testing::TempPath file("other.db");
  RunSql(file.str(), "CREATE TABLE invoices (id INTEGER);");
  auto store = PlanStore::Open(file.str());
  ASSERT_FALSE(store.ok());
  EXPECT_NE(store.status().message().find("not a plan store"), std::string::npos) << store.status();
}

TEST(PlanStoreTest, AnotherSchemaVersionIsRefused) {
  testing::TempPath file("v9.db");
  { ASSERT_TRUE(PlanStore::Open(file.str()).ok()); }
  RunSql(file.str(), "PRAGMA user_version = 9;");
  auto store = PlanStore::Open(file.str());
  ASSERT_FALSE(store.ok());
  EXPECT_NE(store.status().message().find("schema version 9; this build reads version 1"),
            std::string::npos)
      << store.status();
}

TEST(PlanStoreTest, ADamagedFileFailsItsIntegrityCheck) {
  testing::TempPath file("damaged.db");
  {
    auto store = PlanStore::Open(file.str());
    ASSERT_TRUE(store.ok());
    // Enough rows for several pages of the table and its id index.
    for (int i = 0; i < 200; ++i) {
      ASSERT_TRUE((*store)->Put({"id" + std::to_string(i), std::string(300, 'p')}, 1000).ok());
    }
  }
  // Overwrite the middle of the file (past the header page) with garbage.
  {
    std::fstream f(file.str(), std::ios::in | std::ios::out | std::ios::binary);
    f.seekp(4096 * 3);
    const std::string junk(4096 * 4, '\x5a');
    f.write(junk.data(), static_cast<std::streamsize>(junk.size()));
  }
  auto store = PlanStore::Open(file.str());
  ASSERT_FALSE(store.ok());
  EXPECT_EQ(store.status().code(), absl::StatusCode::kFailedPrecondition);
  EXPECT_NE(store.status().message().find(file.str()), std::string::npos) << store.status();
}

TEST(PlanStoreTest, AnUncreatablePathIsRefusedByName) {
  auto store = PlanStore::Open("/nonexistent-dir-sliceplan/plans.db");
  ASSERT_FALSE(store.ok());
  EXPECT_EQ(store.status().code(), absl::StatusCode::kFailedPrecondition);
  EXPECT_NE(store.status().message().find("/nonexistent-dir-sliceplan/plans.db"), std::string::npos)
      << store.status();
}

}  // namespace
}  // namespace sliceplan
