// Durability: an edit is committed before anyone is told it is done. A
// helper edits a project as fast as it can and acknowledges each committed
// edit on stdout; the test kills it with SIGKILL at random moments, many
// times over, and checks that every acknowledged edit is in the journal, the
// file opens cleanly and verify passes.
#include <fcntl.h>
#include <gtest/gtest.h>
#include <poll.h>
#include <signal.h>
#include <sys/wait.h>
#include <time.h>
#include <unistd.h>

#include <chrono>
#include <random>
#include <sstream>

#include "core/store/journal.h"
#include "core/store/verify.h"
#include "tests/core/store/fixture.h"

namespace budledger::store {
namespace {

struct Ack {
  std::int64_t seq;
  std::string hash;
};

// Runs the storm until `acksBeforeKill` acks have arrived, waits `delayUs`,
// kills it, and returns every ack it managed to print.
std::vector<Ack> stormAndKill(const std::string& project, unsigned seed, int acksBeforeKill,
                              int delayUs) {
  int out[2];
  if (pipe(out) != 0) return {};
  const pid_t child = fork();
  if (child == 0) {
    dup2(out[1], STDOUT_FILENO);
    close(out[0]);
    close(out[1]);
    const std::string s = std::to_string(seed);
    execl(JOURNAL_STORM_PATH, "journal_storm", "storm", project.c_str(), s.c_str(),
          static_cast<char*>(nullptr));
    _exit(127);
  }
  close(out[1]);
  std::string text;
  auto acks = [&] { return std::count(text.begin(), text.end(), '\n'); };
  char buf[4096];
  bool killed = false;
  const auto deadline = std::chrono::steady_clock::now() + std::chrono::seconds(20);
  while (true) {
    if (!killed && acks() >= acksBeforeKill) {
      if (delayUs > 0) {
        timespec ts{0, delayUs * 1000L};
        nanosleep(&ts, nullptr);
      }
      kill(child, SIGKILL);
      killed = true;
    }
    if (!killed && std::chrono::steady_clock::now() > deadline) {
      kill(child, SIGKILL);
      killed = true;
      ADD_FAILURE() << "the storm made too little progress";
    }
    pollfd pfd{out[0], POLLIN, 0};
    if (poll(&pfd, 1, 100) <= 0) continue;
    const auto n = read(out[0], buf, sizeof buf);
    if (n <= 0) break;  // the pipe closes when the child is gone
    text.append(buf, static_cast<std::size_t>(n));
  }
  close(out[0]);
  int status = 0;
  waitpid(child, &status, 0);
  EXPECT_TRUE(WIFSIGNALED(status) && WTERMSIG(status) == SIGKILL)
      << "the storm ended by itself, status " << status;
  std::vector<Ack> out_;
  std::istringstream in(text);
  std::string word;
  Ack a;
  // A line cut by the kill has no newline and is not an acknowledgement.
  std::string line;
  while (std::getline(in, line)) {
    if (in.eof() && text.back() != '\n') break;
    std::istringstream l(line);
    if (l >> word >> a.seq >> a.hash && word == "ack") out_.push_back(a);
  }
  return out_;
}

TEST(Durability, EveryAcknowledgedEditSurvivesSigkill) {
  const auto dir = testing::scratchDir("durability");
  const auto path = (dir / "storm.budledger").string();
  {
    auto p = Project::create(path);
    testing::makeFixture(p, {.positions = 1, .traps = 6, .frames = 100, .seed = 3});
  }
  std::mt19937 rng(777);  // fixed, so a failure can be replayed
  std::vector<Ack> all;
  constexpr int kRounds = 30;
  for (int round = 0; round < kRounds; ++round) {
    const int acksBeforeKill = std::uniform_int_distribution<int>(1, 25)(rng);
    // Half the kills come right after an ack, half a little later, most
    // likely in the middle of the next transaction.
    const int delayUs = round % 2 ? std::uniform_int_distribution<int>(0, 4000)(rng) : 0;
    const auto acks = stormAndKill(path, rng(), acksBeforeKill, delayUs);
    EXPECT_GE(static_cast<int>(acks.size()), acksBeforeKill) << "round " << round;
    all.insert(all.end(), acks.begin(), acks.end());

    auto p = Project::open(path);
    ASSERT_FALSE(p.readOnly()) << "round " << round << ": " << p.readOnlyReason();
    for (const auto& a : all) {
      const auto e = readEntry(p.db(), a.seq);
      ASSERT_TRUE(e) << "round " << round << ": acknowledged entry " << a.seq << " is gone";
      EXPECT_EQ(e->hash, a.hash) << "round " << round << ": entry " << a.seq << " changed";
    }
    const auto report = verifyProject(p);
    ASSERT_TRUE(report.ok()) << "round " << round << ": " << report.problems.front();
  }
  EXPECT_GT(all.size(), static_cast<std::size_t>(kRounds * 5));
  std::filesystem::remove_all(dir);
}

}  // namespace
}  // namespace budledger::store
