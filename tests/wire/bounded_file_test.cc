// The bounded file reader (wire/bounded_file.h): regular files up to the
// limit are read whole; a device that never ends, a directory and a pipe
// are refused by name before anything is read; a file past the limit is
// refused as soon as the limit is passed.
#include "wire/bounded_file.h"

#include <sys/stat.h>
#include <unistd.h>

#include <cstdio>
#include <fstream>
#include <string>

#include "gtest/gtest.h"

namespace sliceplan {
namespace {

std::string TempPath(const std::string& name) {
  return ::testing::TempDir() + "/bounded_file_" + std::to_string(getpid()) + "_" + name;
}

std::string Write(const std::string& name, const std::string& text) {
  const std::string path = TempPath(name);
  std::ofstream(path, std::ios::binary) << text;
  return path;
}

TEST(BoundedFileTest, ARegularFileUpToTheLimitIsReadWhole) {
  const std::string path = Write("ok", "0123456789");
  auto text = ReadBoundedFile(path, 10);
  ASSERT_TRUE(text.ok()) << text.status();
  EXPECT_EQ(*text, "0123456789");
  std::remove(path.c_str());
}

TEST(BoundedFileTest, PastTheLimitIsResourceExhausted) {
  const std::string path = Write("big", std::string(200000, 'x'));
  auto text = ReadBoundedFile(path, 100000, "the query file");
  ASSERT_FALSE(text.ok());
  EXPECT_EQ(text.status().code(), absl::StatusCode::kResourceExhausted);
  EXPECT_NE(text.status().message().find("is larger than 100000 bytes"), std::string::npos);
  EXPECT_EQ(text.status().message().rfind("the query file: ", 0), 0u) << text.status();
  std::remove(path.c_str());
}

TEST(BoundedFileTest, DevicesDirectoriesAndPipesAreRefusedByName) {
  auto zero = ReadBoundedFile("/dev/zero", 1 << 20, "--token-file");
  ASSERT_FALSE(zero.ok());
  EXPECT_EQ(zero.status().message(), "--token-file: /dev/zero is not a regular file");
  auto dir = ReadBoundedFile("/tmp", 1 << 20);
  ASSERT_FALSE(dir.ok());
  EXPECT_EQ(dir.status().message(), "/tmp is a directory");
  // A pipe with no writer: refused at once, not waited on.
  const std::string fifo = TempPath("fifo");
  ASSERT_EQ(mkfifo(fifo.c_str(), 0600), 0);
  auto pipe = ReadBoundedFile(fifo, 1 << 20);
  ASSERT_FALSE(pipe.ok());
  EXPECT_NE(pipe.status().message().find("is not a regular file"), std::string::npos);
  std::remove(fifo.c_str());
}

TEST(BoundedFileTest, AMissingFileIsNotFoundWithItsPath) {
  auto text = ReadBoundedFile("/nonexistent/q.json", 10);
  ASSERT_FALSE(text.ok());
  EXPECT_EQ(text.status().code(), absl::StatusCode::kNotFound);
  EXPECT_NE(text.status().message().find("/nonexistent/q.json"), std::string::npos);
}

}  // namespace
}  // namespace sliceplan
