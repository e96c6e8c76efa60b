// The progress bar: drawn on a terminal only, silent for the first second,
// never with --quiet, and cleared at the end. stderr is pointed at a
// pseudo-terminal for the test, so isatty() answers as for a user.
#include "cli/progress_bar.h"

#include <fcntl.h>
#include <poll.h>
#include <stdlib.h>
#include <unistd.h>

#include <string>

#include "gtest/gtest.h"

namespace sliceplan::cli {
namespace {

// Runs `body` with stderr on a fresh pseudo-terminal; returns what it wrote.
template <class Body>
std::string OnTerminal(Body body) {
  const int master = posix_openpt(O_RDWR | O_NOCTTY);
  EXPECT_GE(master, 0);
  EXPECT_EQ(grantpt(master), 0);
  EXPECT_EQ(unlockpt(master), 0);
  const int slave = open(ptsname(master), O_RDWR | O_NOCTTY);
  EXPECT_GE(slave, 0);
  fflush(stderr);
  const int saved = dup(STDERR_FILENO);
  dup2(slave, STDERR_FILENO);
  body();
  fflush(stderr);
  dup2(saved, STDERR_FILENO);
  close(saved);
  close(slave);
  std::string out;
  pollfd p{master, POLLIN, 0};
  char buf[512];
  while (poll(&p, 1, 50) > 0) {
    const ssize_t n = read(master, buf, sizeof buf);
    if (n <= 0) break;
    out.append(buf, static_cast<size_t>(n));
  }
  close(master);
  return out;
}

ScheduleProgress Progress(uint32_t done, double seconds) { return {done, 8, 123.0, seconds}; }

TEST(ProgressBarTest, DrawnOnATerminalAfterTheFirstSecondAndCleared) {
  const std::string out = OnTerminal([] {
    ProgressBar bar(true);
    bar.Update(Progress(1, 0.5));  // too early: nothing
    bar.Update(Progress(4, 2.0));  // half done after 2 s: ETA 2 s
  });
  EXPECT_EQ(out.find("1/8"), std::string::npos) << out;
  EXPECT_NE(out.find("[###############...............] 4/8 slices, best 123, ETA 2 s"),
            std::string::npos)
      << out;
  EXPECT_EQ(out.substr(out.size() - 4), "\r\033[K") << "cleared at the end";
}

// The anytime search has no slices: the set's size and the trees.
TEST(ProgressBarTest, TheAnytimeSearchShowsItsSetsSize) {
  const std::string out = OnTerminal([] {
    ProgressBar bar(true);
    ScheduleProgress p;
    p.elapsed_seconds = 3;
    p.frontier_plans = 41;
    p.trees = 1200;
    bar.Update(p);
  });
  EXPECT_NE(out.find("anytime search: 41 plans in the set, 1200 trees, 3 s"), std::string::npos)
      << out;
}

TEST(ProgressBarTest, QuietDrawsNothing) {
  const std::string out = OnTerminal([] {
    ProgressBar bar(false);
    bar.Update(Progress(4, 2.0));
  });
  EXPECT_EQ(out, "");
}

TEST(ProgressBarTest, NothingWhenStderrIsAPipe) {
  int fds[2];
  ASSERT_EQ(pipe(fds), 0);
  fflush(stderr);
  const int saved = dup(STDERR_FILENO);
  dup2(fds[1], STDERR_FILENO);
  {
    ProgressBar bar(true);
    bar.Update(Progress(4, 2.0));
  }
  fflush(stderr);
  dup2(saved, STDERR_FILENO);
  close(saved);
  close(fds[1]);
  char buf[64];
  EXPECT_EQ(read(fds[0], buf, sizeof buf), 0) << "the bar wrote to a pipe";
  close(fds[0]);
}

}  // namespace
}  // namespace sliceplan::cli
