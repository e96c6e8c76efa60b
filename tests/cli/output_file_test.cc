// The CLI's safe output file (cli/output_file.h): refused up front when it
// is an input, a symbolic link, a directory or in a missing directory;
// written whole by rename; nothing left behind when not committed.
#include "cli/output_file.h"

#include <unistd.h>

#include <filesystem>
#include <fstream>
#include <sstream>
#include <string>

#include "gtest/gtest.h"

namespace sliceplan {
namespace {

namespace fs = std::filesystem;

class OutputFileTest : public ::testing::Test {
 protected:
  void SetUp() override {
    dir_ = fs::path(::testing::TempDir()) / ("output_file_" + std::to_string(getpid()));
    fs::create_directories(dir_);
  }
  void TearDown() override { fs::remove_all(dir_); }
  std::string Path(const std::string& name) const { return (dir_ / name).string(); }
  static std::string Read(const std::string& path) {
    std::ifstream in(path);
    std::stringstream s;
    s << in.rdbuf();
    return s.str();
  }
  size_t Entries() const {
    return static_cast<size_t>(std::distance(fs::directory_iterator(dir_), {}));
  }
  fs::path dir_;
};

TEST_F(OutputFileTest, RefusesInputsLinksDirectoriesAndMissingDirectories) {
  const std::string query = Path("q.json");
  std::ofstream(query) << "{}";
  const auto refusal = [&](const std::string& path) {
    auto f = OutputFile::Prepare(path, "--plot", {query});
    return f.ok() ? std::string("accepted") : std::string(f.status().message());
  };
  EXPECT_NE(refusal(query).find("is the input file"), std::string::npos);
  fs::create_symlink(query, Path("link.svg"));
  EXPECT_NE(refusal(Path("link.svg")).find("is a symbolic link"), std::string::npos);
  EXPECT_NE(refusal(dir_.string()).find("is a directory"), std::string::npos);
  EXPECT_NE(refusal(Path("no/such/p.svg")).find("cannot be written"), std::string::npos);
  EXPECT_EQ(Read(query), "{}");  // untouched
}

TEST_F(OutputFileTest, CommitReplacesTheFileWhole) {
  const std::string path = Path("p.svg");
  std::ofstream(path) << "old";
  auto f = OutputFile::Prepare(path, "--plot", {});
  ASSERT_TRUE(f.ok()) << f.status();
  EXPECT_EQ(Read(path), "old");  // nothing written before the commit
  ASSERT_TRUE(f->Commit("<svg/>").ok());
  EXPECT_EQ(Read(path), "<svg/>");
  EXPECT_EQ(Entries(), 1u);  // no temporary file left
}

TEST_F(OutputFileTest, NothingIsLeftWhenNotCommitted) {
  {
    auto f = OutputFile::Prepare(Path("p.svg"), "--plot", {});
    ASSERT_TRUE(f.ok());
    EXPECT_EQ(Entries(), 1u);  // the temporary file
  }
  EXPECT_EQ(Entries(), 0u);
}

}  // namespace
}  // namespace sliceplan
