// A second writer gets a clear read-only project, never a lost update; a
// crashed writer's lock does not block anyone.
#include "core/store/write_lock.h"

#include <gtest/gtest.h>
#include <signal.h>
#include <sys/wait.h>
#include <unistd.h>

#include "core/store/editor.h"
#include "core/store/materialised.h"
#include "tests/core/store/fixture.h"

namespace budledger::store {
namespace {

class LockTest : public ::testing::Test {
 protected:
  void SetUp() override {
    dir_ = testing::scratchDir(::testing::UnitTest::GetInstance()->current_test_info()->name());
    path_ = (dir_ / "p.budledger").string();
    auto p = Project::create(path_);
    fx_ = testing::makeFixture(p);
  }
  void TearDown() override { std::filesystem::remove_all(dir_); }
  std::filesystem::path dir_;
  std::string path_;
  testing::Fixture fx_;
};

TEST_F(LockTest, SecondOpenInTheSameProcessIsReadOnlyAndSaysWhy) {
  auto writer = Project::open(path_);
  ASSERT_FALSE(writer.readOnly());
  EXPECT_TRUE(writer.readOnlyReason().empty());
  auto second = Project::open(path_);
  ASSERT_TRUE(second.readOnly());
  EXPECT_NE(second.readOnlyReason().find("pid " + std::to_string(getpid())), std::string::npos)
      << second.readOnlyReason();
  EXPECT_NE(second.readOnlyReason().find("read-only"), std::string::npos);

  const auto id = currentEvents(writer.db()).front().event.id;
  Editor readOnlyEditor(second);
  try {
    readOnlyEditor.accept(testing::kTech, id);
    FAIL() << "a read-only project accepted an edit";
  } catch (const EditRefused& e) {
    EXPECT_EQ(std::string(e.what()), second.readOnlyReason());
  }
  EXPECT_THROW(second.addPosition({0, "posX", "", 10, 10, 10}), StoreError);
  // The writer's edits are visible to the reader as soon as they commit.
  Editor ed(writer);
  ASSERT_TRUE(ed.accept(testing::kTech, id).recorded());
  EXPECT_EQ(currentEvent(second.db(), id)->status, EventStatus::Accepted);
}

TEST_F(LockTest, ClosingReleasesTheLockAndTheSidecar) {
  { auto writer = Project::open(path_); }
  EXPECT_FALSE(std::filesystem::exists(WriteLock::sidecarPath(path_)));
  auto again = Project::open(path_);
  EXPECT_FALSE(again.readOnly());
  EXPECT_TRUE(std::filesystem::exists(WriteLock::sidecarPath(path_)));
}

TEST_F(LockTest, ReadOnlyOnRequest) {
  auto p = Project::open(path_, Database::Access::ReadOnly);
  EXPECT_TRUE(p.readOnly());
  EXPECT_EQ(p.readOnlyReason(), "opened read-only");
  // and it takes no lock: a writer can still come.
  EXPECT_FALSE(Project::open(path_).readOnly());
}

TEST_F(LockTest, AnotherProcessHoldsItThenCrashes) {
  int ready[2];
  ASSERT_EQ(pipe(ready), 0);
  const pid_t child = fork();
  ASSERT_GE(child, 0);
  if (child == 0) {
    close(ready[0]);
    auto p = Project::open(path_);
    const char c = p.readOnly() ? 'r' : 'w';
    if (write(ready[1], &c, 1) != 1) _exit(2);
    pause();  // until killed
    _exit(0);
  }
  close(ready[1]);
  char c = 0;
  ASSERT_EQ(read(ready[0], &c, 1), 1);
  close(ready[0]);
  ASSERT_EQ(c, 'w');
  {
    auto p = Project::open(path_);
    EXPECT_TRUE(p.readOnly());
    EXPECT_NE(p.readOnlyReason().find("pid " + std::to_string(child)), std::string::npos)
        << p.readOnlyReason();
  }
  kill(child, SIGKILL);
  int status = 0;
  waitpid(child, &status, 0);
  EXPECT_TRUE(WIFSIGNALED(status));
  // The crash left the sidecar behind; it does not block.
  EXPECT_TRUE(std::filesystem::exists(WriteLock::sidecarPath(path_)));
  auto p = Project::open(path_);
  EXPECT_FALSE(p.readOnly()) << p.readOnlyReason();
}

}  // namespace
}  // namespace budledger::store
